import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api-client';
import { apiKeysQueryKey } from '@/lib/queries/api-keys';

export type Scope = Schemas['Scope'];
export const allScopes: Scope[] = ['runs:read', 'runs:write', 'series:write', 'webhooks:manage'];

export interface CreateKeyInput {
  name: string;
  scopes: Scope[];
  expiresAt: string | null;
}

export function createApiKey(input: CreateKeyInput) {
  return unwrap(api.POST('/v1/api-keys', { body: input }));
}

export function revokeApiKey(id: string) {
  return unwrap(api.POST('/v1/api-keys/{id}/revoke', { params: { path: { id } } }));
}

export function useCreateApiKey() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: createApiKey, onSuccess: () => queryClient.invalidateQueries({ queryKey: apiKeysQueryKey }) });
}

export function useRevokeApiKey() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: revokeApiKey, onSuccess: () => queryClient.invalidateQueries({ queryKey: apiKeysQueryKey }) });
}
