import { queryOptions, useQuery } from '@tanstack/react-query';
import type { RunResult, RunStatus, SolveOutcome } from '@gridwright/shared/run-result';
import { api, unwrap } from '@/lib/api-client';

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

export const activeStatuses: RunStatus[] = ['queued', 'running'];
export const isActive = (status: RunStatus) => activeStatuses.includes(status);

/** Every run query's key starts with this, so a submission or a cancel refreshes them all. */
export const runsQueryKey = ['runs'] as const;

// The document types `model` and `kpis` loosely; the shapes are the shared result types of SPEC.md §3.
export async function getRun(id: string): Promise<Run> {
  return (await unwrap(api.GET('/v1/runs/{runId}', { params: { path: { runId: id } } }))) as Run;
}

export function getRunQueryOptions(id: string) {
  return queryOptions({
    queryKey: [...runsQueryKey, 'detail', id],
    queryFn: () => getRun(id),
    // Polled until it settles, so the run screen and the workbench both follow a run live.
    refetchInterval: (q) => (q.state.data && isActive(q.state.data.status) ? 1000 : false),
  });
}

export function useRun(id: string) {
  return useQuery(getRunQueryOptions(id));
}
