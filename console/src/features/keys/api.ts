import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api';

export type ApiKey = Schemas['ApiKey'];
export type Scope = Schemas['Scope'];
export const allScopes: Scope[] = ['runs:read', 'runs:write', 'series:write', 'webhooks:manage'];

export function listApiKeys(includeRevoked: boolean) {
  return unwrap(api.GET('/v1/api-keys', { params: { query: { includeRevoked, limit: 200 } } }));
}

export function getApiKeysQueryOptions(includeRevoked: boolean) {
  return queryOptions({ queryKey: ['api-keys', 'list', { includeRevoked }], queryFn: () => listApiKeys(includeRevoked) });
}

export function useApiKeys(includeRevoked: boolean) {
  return useQuery(getApiKeysQueryOptions(includeRevoked));
}

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
  return useMutation({ mutationFn: createApiKey, onSuccess: () => queryClient.invalidateQueries({ queryKey: ['api-keys'] }) });
}

export function useRevokeApiKey() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: revokeApiKey, onSuccess: () => queryClient.invalidateQueries({ queryKey: ['api-keys'] }) });
}
