import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { RunStatus } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import { api, nextCursorFromLink, saveDownload, unwrap } from '@/lib/api-client';
import { isActive, runsQueryKey, type Run } from '@/lib/queries/runs';
import { withSiteModelDefaults, type ShownResult } from './lib/stored-result';

export interface RunFilters {
  status?: RunStatus | '';
  cursor?: string | null;
  limit?: number;
}

export function objectiveValue(run: Run): number | null {
  return run.objective?.value ?? null;
}

/** The SPEC.md §3 result of a finished run, or null while it has none. */
export function runResult(run: Run): ShownResult | null {
  if (!run.model || !run.objective || !run.outcome) return null;
  return withSiteModelDefaults({
    status: run.status,
    outcome: run.outcome,
    objective: run.objective,
    kpis: run.kpis ?? null,
    schedule: run.schedule ?? null,
    model: run.model,
    warnings: run.warnings ?? [],
  });
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
    queryKey: [...runsQueryKey, 'list', filters],
    queryFn: () => listRuns(filters),
    placeholderData: keepPreviousData,
    // Live while anything on the page is still in flight; quiet otherwise.
    refetchInterval: (q) => (q.state.data?.items.some((r) => isActive(r.status)) ? 2000 : false),
  });
}

export function useRuns(filters: RunFilters) {
  return useQuery(getRunsQueryOptions(filters));
}

export async function getRunSpec(id: string): Promise<SiteSpec> {
  return (await unwrap(api.GET('/v1/runs/{runId}/spec', { params: { path: { runId: id } } }))) as SiteSpec;
}

export function getRunSpecQueryOptions(id: string) {
  return queryOptions({ queryKey: [...runsQueryKey, 'spec', id], queryFn: () => getRunSpec(id), staleTime: Infinity });
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
    onSuccess: () => queryClient.invalidateQueries({ queryKey: runsQueryKey }),
  });
}

export function downloadSchedule(id: string, format: 'json' | 'csv', profileId?: string) {
  return saveDownload(
    api.GET('/v1/runs/{runId}/schedule', {
      params: { path: { runId: id }, query: { format, profile: profileId } },
      headers: { Accept: format === 'csv' ? 'text/csv' : 'application/json' },
      parseAs: 'blob',
    }),
    `run-${id}-schedule.${format}`,
  );
}

export function listRunDeliveries(id: string) {
  return unwrap(api.GET('/v1/runs/{runId}/webhook-deliveries', { params: { path: { runId: id } } }));
}

export function getRunDeliveriesQueryOptions(id: string) {
  return queryOptions({ queryKey: [...runsQueryKey, 'deliveries', id], queryFn: () => listRunDeliveries(id) });
}

export function useRunDeliveries(id: string, enabled: boolean) {
  return useQuery({ ...getRunDeliveriesQueryOptions(id), enabled });
}
