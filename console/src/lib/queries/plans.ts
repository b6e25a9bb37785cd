import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, unwrap } from '@/lib/api-client';

export const listPlans = () => unwrap(api.GET('/v1/plans'));

export function getPlansQueryOptions() {
  return queryOptions({ queryKey: ['plans'], queryFn: listPlans, staleTime: 300_000 });
}

export function usePlans() {
  return useQuery(getPlansQueryOptions());
}
