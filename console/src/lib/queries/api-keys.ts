import { queryOptions, useQuery } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api-client';

export type ApiKey = Schemas['ApiKey'];

export const apiKeysQueryKey = ['api-keys'] as const;

export function listApiKeys(includeRevoked: boolean) {
  return unwrap(api.GET('/v1/api-keys', { params: { query: { includeRevoked, limit: 200 } } }));
}

export function getApiKeysQueryOptions(includeRevoked: boolean) {
  return queryOptions({ queryKey: [...apiKeysQueryKey, 'list', { includeRevoked }], queryFn: () => listApiKeys(includeRevoked) });
}

export function useApiKeys(includeRevoked: boolean, enabled = true) {
  return useQuery({ ...getApiKeysQueryOptions(includeRevoked), enabled });
}
