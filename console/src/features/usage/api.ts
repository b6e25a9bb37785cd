import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, unwrap } from '@/lib/api-client';

export const getUsage = () => unwrap(api.GET('/v1/usage'));
export const getUsageQueryOptions = () => queryOptions({ queryKey: ['usage'], queryFn: getUsage });
export const useUsage = () => useQuery(getUsageQueryOptions());

export const getTenant = () => unwrap(api.GET('/v1/tenant'));
export const getTenantQueryOptions = () => queryOptions({ queryKey: ['tenant'], queryFn: getTenant });
export const useTenant = () => useQuery(getTenantQueryOptions());
