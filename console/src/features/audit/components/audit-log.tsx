import { useState } from 'react';
import { Button } from '@/components/button';
import { Table, Td, Th } from '@/components/data-table';
import { TextField } from '@/components/field';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { useAuditEvents, type AuditFilters } from '../api';

export function AuditLog({ scope }: { scope: AuditFilters['scope'] }) {
  const [action, setAction] = useState('');
  const [tenantId, setTenantId] = useState('');
  const [cursors, setCursors] = useState<(string | null)[]>([null]);
  const events = useAuditEvents({ scope, action: action.trim(), tenantId: tenantId.trim(), cursor: cursors[cursors.length - 1] });
  return (
    <div className="space-y-3">
      <form className="flex flex-wrap items-end gap-3" role="search" onSubmit={(e) => e.preventDefault()}>
        <TextField label="Action" className="w-56" placeholder="e.g. sign-in-failed" value={action} onChange={(e) => { setAction(e.target.value); setCursors([null]); }} />
        {scope === 'service' && (
          <TextField label="Tenant id" className="w-80" placeholder="any tenant" value={tenantId} onChange={(e) => { setTenantId(e.target.value); setCursors([null]); }} />
        )}
      </form>
      {events.isPending ? (
        <Loading />
      ) : events.error ? (
        <ProblemAlert error={events.error} />
      ) : events.data.items.length === 0 ? (
        <EmptyState title="No events match" />
      ) : (
        <>
          <Table label="Audit events">
            <thead>
              <tr>
                <Th>When</Th>
                <Th>Action</Th>
                <Th>Actor</Th>
                <Th>Target</Th>
                {scope === 'service' && <Th>Tenant</Th>}
                <Th>Address</Th>
                <Th>Details</Th>
              </tr>
            </thead>
            <tbody>
              {events.data.items.map((e) => (
                <tr key={e.id}>
                  <Td className="whitespace-nowrap text-xs">{formatDateTime(e.createdAt)}</Td>
                  <Td className="font-mono text-xs">{e.action}</Td>
                  <Td className="text-xs">{e.actor.email ?? (e.actor.apiKeyId ? `key ${e.actor.apiKeyId.slice(0, 8)}` : 'service')}</Td>
                  <Td className="max-w-xs truncate text-xs">{e.target ?? '—'}</Td>
                  {scope === 'service' && <Td className="font-mono text-[11px] text-ash-500">{e.tenantId?.slice(0, 8) ?? '—'}</Td>}
                  <Td className="font-mono text-xs">{e.ip ?? '—'}</Td>
                  <Td className="max-w-xs truncate font-mono text-[11px] text-ash-500">{e.details && Object.keys(e.details).length ? JSON.stringify(e.details) : ''}</Td>
                </tr>
              ))}
            </tbody>
          </Table>
          <div className="flex justify-end gap-2">
            <Button size="sm" disabled={cursors.length <= 1} onClick={() => setCursors((c) => c.slice(0, -1))}>← Newer</Button>
            <Button size="sm" disabled={!events.data.nextCursor} onClick={() => setCursors((c) => [...c, events.data.nextCursor])}>Older →</Button>
          </div>
        </>
      )}
    </div>
  );
}
