import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api';
import { apiRequest } from '@/lib/api-client';
import { isProblem } from '@/lib/api-problem';
import type { PointerIssue } from './lib/spec-diagnostics';

export type SpecWarning = Schemas['ResultWarning'];
export type ModelSize = Schemas['SpecValidation']['modelSize'];

export interface SpecCheck {
  valid: boolean;
  errors: PointerIssue[];
  warnings: SpecWarning[];
  modelSize: ModelSize | null;
}

/**
 * Asks the API to check a spec without running it. A 400 with field errors is an answer here
 * (the spec is invalid), so it comes back as a report, not as a failure.
 */
export async function checkSpec(spec: unknown): Promise<SpecCheck> {
  try {
    const body = await unwrap(api.POST('/v1/specs/validate', { body: spec as Schemas['SiteSpec'] }));
    return { valid: true, errors: [], warnings: body.warnings, modelSize: body.modelSize };
  } catch (err) {
    if (isProblem(err) && err.status === 400 && err.errors.length > 0) return { valid: false, errors: err.errors, warnings: [], modelSize: null };
    throw err;
  }
}

export function useCheckSpec() {
  return useMutation({ mutationFn: checkSpec });
}

export function submitRun(spec: unknown) {
  return unwrap(api.POST('/v1/runs', { body: spec as Schemas['SiteSpec'], params: { header: { 'Idempotency-Key': crypto.randomUUID() } } }));
}

export function useSubmitRun() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: submitRun, onSuccess: () => queryClient.invalidateQueries({ queryKey: ['runs'] }) });
}

/** The submitted run, polled until it settles, so the workbench can follow it. */
export function getFollowedRunQueryOptions(id: string) {
  return queryOptions({
    queryKey: ['runs', 'detail', id],
    queryFn: () => unwrap(api.GET('/v1/runs/{runId}', { params: { path: { runId: id } } })),
    refetchInterval: (q) => (q.state.data && ['queued', 'running'].includes(q.state.data.status) ? 1000 : false),
  });
}

export function useFollowedRun(id: string | null) {
  return useQuery({ ...getFollowedRunQueryOptions(id ?? ''), enabled: !!id });
}

export type UploadedSeries = Schemas['SeriesSummary'];

/** Multipart upload; the options travel as query parameters, as the route documents. */
export async function uploadSeries(input: { file: File; name: string }): Promise<UploadedSeries[]> {
  const form = new FormData();
  form.set('file', input.file);
  const body = await apiRequest<{ items: UploadedSeries[] }>('/v1/series', { method: 'POST', body: form, query: { name: input.name || undefined } });
  return body.items;
}

export function useUploadSeries() {
  return useMutation({ mutationFn: uploadSeries });
}

export type KeyChoice = Schemas['ApiKey'];

export function listKeyChoices() {
  return unwrap(api.GET('/v1/api-keys', { params: { query: { limit: 200 } } }));
}

export function getKeyChoicesQueryOptions() {
  return queryOptions({ queryKey: ['api-keys', 'choices'], queryFn: listKeyChoices });
}

export function useKeyChoices(enabled: boolean) {
  return useQuery({ ...getKeyChoicesQueryOptions(), enabled });
}
