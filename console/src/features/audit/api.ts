import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api-client';

export type AuditEvent = Schemas['AuditEvent'];

export interface AuditFilters {
  /** 'tenant': the signed-in tenant's log; 'service': every tenant's (operators). */
  scope: 'tenant' | 'service';
  action?: string;
  tenantId?: string;
  cursor?: string | null;
}

export function listAuditEvents(f: AuditFilters) {
  const query = { action: f.action || undefined, cursor: f.cursor ?? undefined, limit: 100 };
  return f.scope === 'service'
    ? unwrap(api.GET('/v1/admin/audit-events', { params: { query: { ...query, tenantId: f.tenantId || undefined } } }))
    : unwrap(api.GET('/v1/audit-events', { params: { query } }));
}

export function getAuditEventsQueryOptions(f: AuditFilters) {
  return queryOptions({ queryKey: ['audit-events', f], queryFn: () => listAuditEvents(f), placeholderData: keepPreviousData });
}

export const useAuditEvents = (f: AuditFilters) => useQuery(getAuditEventsQueryOptions(f));
