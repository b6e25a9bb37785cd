import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { RunResult, RunStatus, SolveOutcome } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { api, unwrap, type Schemas } from '@/lib/api';
import { apiDownload, nextCursorFromLink } from '@/lib/api-client';

/** A run as the API lists it; once it has a result, the fields of SPEC.md §3 sit at the top level. */
export interface Run extends Partial<Pick<RunResult, 'objective' | 'kpis' | 'schedule' | 'model' | 'warnings'>> {
  id: string;
  name: string | null;
  status: RunStatus;
  outcome?: SolveOutcome | null;
  steps?: number | null;
  units?: number | null;
  solverSeconds?: number | null;
  progress?: { windowsDone: number; windowsTotal: number | null; percent?: number } | null;
  createdAt: string;
  startedAt?: string | null;
  finishedAt?: string | null;
  cancelRequestedAt?: string | null;
  error?: { code?: string; message: string } | string | null;
}

export interface RunFilters {
  status?: RunStatus | '';
  cursor?: string | null;
  limit?: number;
}

export const activeStatuses: RunStatus[] = ['queued', 'running'];
export const isActive = (status: RunStatus) => activeStatuses.includes(status);

export function objectiveValue(run: Run): number | null {
  return run.objective?.value ?? null;
}

/** The SPEC.md §3 result of a finished run, or null while it has none. */
export function runResult(run: Run): RunResult | null {
  if (!run.model || !run.objective || !run.outcome) return null;
  return {
    status: run.status,
    outcome: run.outcome,
    objective: run.objective,
    kpis: run.kpis ?? null,
    schedule: run.schedule ?? null,
    model: run.model,
    warnings: run.warnings ?? [],
  };
}

export async function listRuns(filters: RunFilters): Promise<{ items: Run[]; nextCursor: string | null }> {
  const call = api.GET('/v1/runs', {
    params: { query: { status: filters.status || undefined, cursor: filters.cursor ?? undefined, limit: filters.limit ?? 50 } },
  });
  const page = await unwrap(call);
  const { response } = await call;
  // The body's cursor and the Link header agree; the header is the documented one.
  return { items: page.items as Run[], nextCursor: page.nextCursor ?? nextCursorFromLink(response.headers.get('link')) };
}

export function getRunsQueryOptions(filters: RunFilters) {
  return queryOptions({
    queryKey: ['runs', 'list', filters],
    queryFn: () => listRuns(filters),
    placeholderData: keepPreviousData,
    // Live while anything on the page is still in flight; quiet otherwise.
    refetchInterval: (q) => (q.state.data?.items.some((r) => isActive(r.status)) ? 2000 : false),
  });
}

export function useRuns(filters: RunFilters) {
  return useQuery(getRunsQueryOptions(filters));
}

// The document types `model` and `kpis` loosely; the shapes are the shared result types of SPEC.md §3.
export async function getRun(id: string): Promise<Run> {
  return (await unwrap(api.GET('/v1/runs/{runId}', { params: { path: { runId: id } } }))) as Run;
}

export function getRunQueryOptions(id: string) {
  return queryOptions({
    queryKey: ['runs', 'detail', id],
    queryFn: () => getRun(id),
    refetchInterval: (q) => (q.state.data && isActive(q.state.data.status) ? 1000 : false),
  });
}

export function useRun(id: string) {
  return useQuery(getRunQueryOptions(id));
}

export async function getRunSpec(id: string): Promise<SiteSpec> {
  return (await unwrap(api.GET('/v1/runs/{runId}/spec', { params: { path: { runId: id } } }))) as SiteSpec;
}

export function getRunSpecQueryOptions(id: string) {
  return queryOptions({ queryKey: ['runs', 'spec', id], queryFn: () => getRunSpec(id), staleTime: Infinity });
}

export function useRunSpec(id: string) {
  return useQuery(getRunSpecQueryOptions(id));
}

export function cancelRun(id: string) {
  return unwrap(api.POST('/v1/runs/{runId}/cancel', { params: { path: { runId: id } } }));
}

export function useCancelRun(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => cancelRun(id),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['runs'] }),
  });
}

export function listExportProfiles() {
  return unwrap(api.GET('/v1/export-profiles'));
}

export function getExportProfilesQueryOptions() {
  return queryOptions({ queryKey: ['export-profiles'], queryFn: listExportProfiles });
}

export function useExportProfiles(enabled: boolean) {
  return useQuery({ ...getExportProfilesQueryOptions(), enabled });
}

export function downloadSchedule(id: string, format: 'json' | 'csv', profileId?: string) {
  return apiDownload(
    `/v1/runs/${encodeURIComponent(id)}/schedule`,
    { format, profile: profileId },
    `run-${id}-schedule.${format}`,
    format === 'csv' ? 'text/csv' : 'application/json',
  );
}

export type Delivery = Schemas['WebhookDelivery'];

export function listRunDeliveries(id: string) {
  return unwrap(api.GET('/v1/runs/{runId}/webhook-deliveries', { params: { path: { runId: id } } }));
}

export function getRunDeliveriesQueryOptions(id: string) {
  return queryOptions({ queryKey: ['runs', 'deliveries', id], queryFn: () => listRunDeliveries(id) });
}

export function useRunDeliveries(id: string, enabled: boolean) {
  return useQuery({ ...getRunDeliveriesQueryOptions(id), enabled });
}
