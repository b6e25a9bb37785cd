import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { SiteSpec } from '@gridwright/shared/site-spec';
import type { StudyComparison, StudyRequest, StudyView } from '@gridwright/shared/studies';
import { api, unwrap } from '@/lib/api-client';
import { runsQueryKey } from '@/lib/queries/runs';

/** Every study query's key starts with this, so creating or cancelling one refreshes them all. */
const studiesQueryKey = ['studies'] as const;

const live = (study: StudyView | undefined) => study?.status === 'running';

export async function listStudies(cursor: string | null): Promise<{ items: StudyView[]; nextCursor: string | null }> {
  const page = await unwrap(api.GET('/v1/studies', { params: { query: { cursor: cursor ?? undefined, limit: 50 } } }));
  return page as { items: StudyView[]; nextCursor: string | null };
}

export function getStudiesQueryOptions(cursor: string | null) {
  return queryOptions({
    queryKey: [...studiesQueryKey, 'list', cursor],
    queryFn: () => listStudies(cursor),
    placeholderData: keepPreviousData,
    refetchInterval: (q) => (q.state.data?.items.some(live) ? 2000 : false),
  });
}

export function useStudies(cursor: string | null) {
  return useQuery(getStudiesQueryOptions(cursor));
}

export function getStudy(id: string): Promise<StudyView> {
  return unwrap(api.GET('/v1/studies/{studyId}', { params: { path: { studyId: id } } })) as Promise<StudyView>;
}

export function getStudyQueryOptions(id: string) {
  return queryOptions({
    queryKey: [...studiesQueryKey, 'detail', id],
    queryFn: () => getStudy(id),
    refetchInterval: (q) => (live(q.state.data) ? 1000 : false),
  });
}

export function useStudy(id: string) {
  return useQuery(getStudyQueryOptions(id));
}

export function getStudyComparison(id: string): Promise<StudyComparison> {
  return unwrap(api.GET('/v1/studies/{studyId}/comparison', { params: { path: { studyId: id } } })) as Promise<StudyComparison>;
}

const unsettled = (c: StudyComparison | undefined) => c?.rows.some((r) => r.status === 'queued' || r.status === 'running') ?? false;

/** The comparison fills in as runs end: refetched while any of its rows still waits for its run. */
export function getStudyComparisonQueryOptions(id: string) {
  return queryOptions({
    queryKey: [...studiesQueryKey, 'comparison', id],
    queryFn: () => getStudyComparison(id),
    refetchInterval: (q) => (unsettled(q.state.data) ? 2000 : false),
  });
}

export function useStudyComparison(id: string) {
  return useQuery(getStudyComparisonQueryOptions(id));
}

export function createStudy(body: StudyRequest): Promise<StudyView> {
  return unwrap(api.POST('/v1/studies', { body: body as never })) as Promise<StudyView>;
}

export function useCreateStudy() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createStudy,
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: studiesQueryKey });
      await queryClient.invalidateQueries({ queryKey: runsQueryKey });
    },
  });
}

export function cancelStudy(id: string): Promise<StudyView> {
  return unwrap(api.POST('/v1/studies/{studyId}/cancel', { params: { path: { studyId: id } } })) as Promise<StudyView>;
}

export function useCancelStudy(id: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => cancelStudy(id),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: studiesQueryKey });
      await queryClient.invalidateQueries({ queryKey: runsQueryKey });
    },
  });
}

/** A run's spec as submitted, to start a study from. */
export async function getRunSpecForStudy(runId: string): Promise<SiteSpec> {
  return (await unwrap(api.GET('/v1/runs/{runId}/spec', { params: { path: { runId } } }))) as SiteSpec;
}
