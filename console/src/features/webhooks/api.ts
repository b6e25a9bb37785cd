import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api-client';

export type Endpoint = Schemas['WebhookEndpoint'];
export type WebhookEvent = Schemas['WebhookEvent'];
export const allEvents: WebhookEvent[] = ['run.succeeded', 'run.failed', 'run.cancelled'];

export const listEndpoints = () => unwrap(api.GET('/v1/webhook-endpoints'));
export const getEndpointsQueryOptions = () => queryOptions({ queryKey: ['webhooks', 'endpoints'], queryFn: listEndpoints });
export const useEndpoints = () => useQuery(getEndpointsQueryOptions());

export const listDeliveries = (endpointId: string) =>
  unwrap(api.GET('/v1/webhook-endpoints/{endpointId}/deliveries', { params: { path: { endpointId } } }));
export const getDeliveriesQueryOptions = (endpointId: string) =>
  queryOptions({
    queryKey: ['webhooks', 'deliveries', endpointId],
    queryFn: () => listDeliveries(endpointId),
    // Pending deliveries are retried in the background; keep the log moving while any are.
    refetchInterval: (q) => (q.state.data?.items.some((d) => d.status === 'pending') ? 2000 : false),
  });
export const useDeliveries = (endpointId: string | null) => useQuery({ ...getDeliveriesQueryOptions(endpointId ?? ''), enabled: !!endpointId });

function useWebhooksMutation<I, O>(fn: (input: I) => Promise<O>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => queryClient.invalidateQueries({ queryKey: ['webhooks'] }) });
}

export const useCreateEndpoint = () =>
  useWebhooksMutation((body: Schemas['WebhookEndpointInput']) => unwrap(api.POST('/v1/webhook-endpoints', { body })));

export const useUpdateEndpoint = () =>
  useWebhooksMutation(({ id, ...body }: { id: string; enabled?: boolean; events?: WebhookEvent[]; description?: string | null }) =>
    unwrap(api.PATCH('/v1/webhook-endpoints/{endpointId}', { params: { path: { endpointId: id } }, body })),
  );

export const useDeleteEndpoint = () =>
  useWebhooksMutation((id: string) => unwrap(api.DELETE('/v1/webhook-endpoints/{endpointId}', { params: { path: { endpointId: id } } })));

export const useRotateSecret = () =>
  useWebhooksMutation((id: string) => unwrap(api.POST('/v1/webhook-endpoints/{endpointId}/rotate-secret', { params: { path: { endpointId: id } } })));

export const useSendTest = () =>
  useWebhooksMutation((id: string) => unwrap(api.POST('/v1/webhook-endpoints/{endpointId}/test', { params: { path: { endpointId: id } } })));
