import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api-client';

export type Tenant = Schemas['TenantInfo'];
export type Limits = Schemas['Limits'];
export type LimitOverrides = { [K in keyof Limits]?: number | null };

export const listTenants = (q: string, cursor: string | null) =>
  unwrap(api.GET('/v1/admin/tenants', { params: { query: { q: q || undefined, cursor: cursor ?? undefined, limit: 100 } } }));
export const getTenantsQueryOptions = (q: string, cursor: string | null) =>
  queryOptions({ queryKey: ['admin', 'tenants', 'list', { q, cursor }], queryFn: () => listTenants(q, cursor), placeholderData: keepPreviousData });
export const useTenants = (q: string, cursor: string | null) => useQuery(getTenantsQueryOptions(q, cursor));

export const getTenant = (id: string) => unwrap(api.GET('/v1/admin/tenants/{id}', { params: { path: { id } } }));
export const getTenantQueryOptions = (id: string) => queryOptions({ queryKey: ['admin', 'tenants', 'detail', id], queryFn: () => getTenant(id) });
export const useTenant = (id: string) => useQuery(getTenantQueryOptions(id));

export const getTenantUsage = (id: string) => unwrap(api.GET('/v1/admin/tenants/{id}/usage', { params: { path: { id } } }));
export const getTenantUsageQueryOptions = (id: string) => queryOptions({ queryKey: ['admin', 'tenants', 'usage', id], queryFn: () => getTenantUsage(id) });
export const useTenantUsage = (id: string) => useQuery(getTenantUsageQueryOptions(id));

function useTenantsMutation<I, O>(fn: (input: I) => Promise<O>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => queryClient.invalidateQueries({ queryKey: ['admin'] }) });
}

export interface CreateTenantInput {
  slug: string;
  name?: string;
  planId?: string;
  ownerEmail?: string;
}

export const useCreateTenant = () => useTenantsMutation((body: CreateTenantInput) => unwrap(api.POST('/v1/admin/tenants', { body })));

export const useUpdateTenant = (id: string) =>
  useTenantsMutation((body: { name?: string; planId?: string; limitOverrides?: LimitOverrides }) =>
    unwrap(api.PATCH('/v1/admin/tenants/{id}', { params: { path: { id } }, body })),
  );

export const useSuspendTenant = (id: string) =>
  useTenantsMutation((reason: string) => unwrap(api.POST('/v1/admin/tenants/{id}/suspend', { params: { path: { id } }, body: reason ? { reason } : {} })));

export const useResumeTenant = (id: string) => useTenantsMutation(() => unwrap(api.POST('/v1/admin/tenants/{id}/resume', { params: { path: { id } } })));

export interface OutboxFilters {
  kind?: string;
  to?: string;
  cursor?: string | null;
}

export const listOutbox = (f: OutboxFilters) =>
  unwrap(api.GET('/v1/admin/outbox', { params: { query: { kind: f.kind || undefined, to: f.to || undefined, cursor: f.cursor ?? undefined, limit: 100 } } }));
export const getOutboxQueryOptions = (f: OutboxFilters) =>
  queryOptions({ queryKey: ['admin', 'outbox', f], queryFn: () => listOutbox(f), placeholderData: keepPreviousData, refetchInterval: 5000 });
export const useOutbox = (f: OutboxFilters) => useQuery(getOutboxQueryOptions(f));

export type TenantBilling = Schemas['BillingStanding'];

export const getTenantBilling = (id: string) => unwrap(api.GET('/v1/admin/tenants/{id}/billing', { params: { path: { id } } }));
export const getTenantBillingQueryOptions = (id: string) => queryOptions({ queryKey: ['admin', 'tenants', 'billing', id], queryFn: () => getTenantBilling(id) });
export const useTenantBilling = (id: string) => useQuery(getTenantBillingQueryOptions(id));

export const useGrantPlan = (id: string) =>
  useTenantsMutation((body: { planId: string; reason: string }) => unwrap(api.PUT('/v1/admin/tenants/{id}/plan-grant', { params: { path: { id } }, body })));

export const useEndPlanGrant = (id: string) => useTenantsMutation(() => unwrap(api.DELETE('/v1/admin/tenants/{id}/plan-grant', { params: { path: { id } } })));
