import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, multipartBody, unwrap, type Schemas } from '@/lib/api-client';
import { isProblem } from '@/lib/api-problem';
import { runsQueryKey } from '@/lib/queries/runs';
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
  return useMutation({ mutationFn: submitRun, onSuccess: () => queryClient.invalidateQueries({ queryKey: runsQueryKey }) });
}

export type UploadedSeries = Schemas['SeriesSummary'];
export type SeriesRole = Schemas['SeriesRole'];
export type SpecDraft = Schemas['SpecDraft'];
export type SpecDraftRequest = Schemas['SpecDraftRequest'];

export const seriesQueryKey = ['series'] as const;

export const listSeries = async () => (await unwrap(api.GET('/v1/series'))).items;

export function getSeriesListQueryOptions() {
  return queryOptions({ queryKey: [...seriesQueryKey, 'list'], queryFn: listSeries });
}

/** The tenant's uploaded series, newest first: uploads stay reusable across sessions. */
export function useSeriesList(enabled = true) {
  return useQuery({ ...getSeriesListQueryOptions(), enabled });
}

/** Multipart upload; the options travel as query parameters, as the route documents. */
export async function uploadSeries(input: { file: File; name: string; timezone?: string }): Promise<UploadedSeries[]> {
  const body = await unwrap(
    api.POST('/v1/series', {
      params: { query: { name: input.name || undefined, timezone: input.timezone || undefined } },
      // The generated type calls the binary part a string; multipartBody sends the File as it is.
      body: { file: input.file as unknown as string },
      bodySerializer: multipartBody,
    }),
  );
  return body.items;
}

export function useUploadSeries() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: uploadSeries, onSuccess: () => queryClient.invalidateQueries({ queryKey: seriesQueryKey }) });
}

/** The spec fields the roles give, built into the spec being edited (`base`). */
export const draftSpec = (request: SpecDraftRequest) => unwrap(api.POST('/v1/series/spec-draft', { body: request }));

export function useDraftSpec() {
  return useMutation({ mutationFn: draftSpec });
}
