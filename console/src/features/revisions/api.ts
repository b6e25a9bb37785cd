import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { PlannedState, ReplanRequest, RevisionChain, RevisionDiff } from '@gridwright/shared/revisions';
import { api, unwrap } from '@/lib/api-client';
import { runsQueryKey, type Run } from '@/lib/queries/runs';

export function getRevisions(runId: string): Promise<RevisionChain> {
  return unwrap(api.GET('/v1/runs/{runId}/revisions', { params: { path: { runId } } })) as Promise<RevisionChain>;
}

export function getRevisionsQueryOptions(runId: string) {
  return queryOptions({
    queryKey: [...runsQueryKey, 'revisions', runId],
    queryFn: () => getRevisions(runId),
    // A re-plan in the chain may still be solving.
    refetchInterval: (q) => (q.state.data?.items.some((i) => i.status === 'queued' || i.status === 'running') ? 2000 : false),
  });
}

export function useRevisions(runId: string) {
  return useQuery(getRevisionsQueryOptions(runId));
}

export function getRevisionDiff(runId: string, base: string): Promise<RevisionDiff> {
  return unwrap(api.GET('/v1/runs/{runId}/revision-diff', { params: { path: { runId }, query: { base } } })) as Promise<RevisionDiff>;
}

export function getRevisionDiffQueryOptions(runId: string, base: string) {
  return queryOptions({ queryKey: [...runsQueryKey, 'revision-diff', runId, base], queryFn: () => getRevisionDiff(runId, base), staleTime: Infinity });
}

export function useRevisionDiff(runId: string, base: string | null) {
  return useQuery({ ...getRevisionDiffQueryOptions(runId, base ?? ''), enabled: base !== null });
}

export function getPlannedState(runId: string, at: number): Promise<PlannedState> {
  return unwrap(api.GET('/v1/runs/{runId}/planned-state', { params: { path: { runId }, query: { at: String(at) } } })) as Promise<PlannedState>;
}

export function getPlannedStateQueryOptions(runId: string, at: number) {
  return queryOptions({ queryKey: [...runsQueryKey, 'planned-state', runId, at], queryFn: () => getPlannedState(runId, at), staleTime: Infinity });
}

export function usePlannedState(runId: string, at: number | null) {
  return useQuery({ ...getPlannedStateQueryOptions(runId, at ?? 0), enabled: at !== null });
}

export function createReplan(runId: string, body: ReplanRequest): Promise<Run> {
  return unwrap(api.POST('/v1/runs/{runId}/replans', { params: { path: { runId } }, body: body as never })) as Promise<Run>;
}

export function useCreateReplan(runId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: ReplanRequest) => createReplan(runId, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: runsQueryKey }),
  });
}
