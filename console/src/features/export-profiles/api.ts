import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api';

export type ExportProfile = Schemas['ExportProfile'];
export type ExportProfileInput = Schemas['ExportProfileInput'];

export const listExportProfiles = () => unwrap(api.GET('/v1/export-profiles'));
export const getExportProfilesQueryOptions = () => queryOptions({ queryKey: ['export-profiles'], queryFn: listExportProfiles });
export const useExportProfiles = () => useQuery(getExportProfilesQueryOptions());

function useProfilesMutation<I, O>(fn: (input: I) => Promise<O>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => queryClient.invalidateQueries({ queryKey: ['export-profiles'] }) });
}

export const useCreateExportProfile = () => useProfilesMutation((body: ExportProfileInput) => unwrap(api.POST('/v1/export-profiles', { body })));

export const useDeleteExportProfile = () =>
  useProfilesMutation((id: string) => unwrap(api.DELETE('/v1/export-profiles/{profileId}', { params: { path: { profileId: id } } })));
