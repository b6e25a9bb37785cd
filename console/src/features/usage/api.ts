import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, unwrap } from '@/lib/api';

export const getUsage = () => unwrap(api.GET('/v1/usage'));
export const getUsageQueryOptions = () => queryOptions({ queryKey: ['usage'], queryFn: getUsage });
export const useUsage = () => useQuery(getUsageQueryOptions());

export const getTenant = () => unwrap(api.GET('/v1/tenant'));
export const getTenantQueryOptions = () => queryOptions({ queryKey: ['tenant'], queryFn: getTenant });
export const useTenant = () => useQuery(getTenantQueryOptions());

export const listPlans = () => unwrap(api.GET('/v1/plans'));
export const getPlansQueryOptions = () => queryOptions({ queryKey: ['plans'], queryFn: listPlans, staleTime: 300_000 });
export const usePlans = () => useQuery(getPlansQueryOptions());
