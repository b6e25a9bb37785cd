import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api-client';
import { exportProfilesQueryKey } from '@/lib/queries/export-profiles';

export type ExportProfileInput = Schemas['ExportProfileInput'];

function useProfilesMutation<I, O>(fn: (input: I) => Promise<O>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => queryClient.invalidateQueries({ queryKey: exportProfilesQueryKey }) });
}

export const useCreateExportProfile = () => useProfilesMutation((body: ExportProfileInput) => unwrap(api.POST('/v1/export-profiles', { body })));

export const useDeleteExportProfile = () =>
  useProfilesMutation((id: string) => unwrap(api.DELETE('/v1/export-profiles/{profileId}', { params: { path: { profileId: id } } })));
