import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, unwrap } from '@/lib/api-client';

export const exportProfilesQueryKey = ['export-profiles'] as const;

export const listExportProfiles = () => unwrap(api.GET('/v1/export-profiles'));

export function getExportProfilesQueryOptions() {
  return queryOptions({ queryKey: exportProfilesQueryKey, queryFn: listExportProfiles });
}

export function useExportProfiles(enabled = true) {
  return useQuery({ ...getExportProfilesQueryOptions(), enabled });
}
