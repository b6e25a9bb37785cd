import { useDeferredValue, useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '@/components/button';
import { Table, Td, Th } from '@/components/data-table';
import { TextField } from '@/components/field';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { useTenants } from '../api';
import { CreateTenantForm } from '../components/create-tenant-form';

export function TenantsRoute() {
  const [q, setQ] = useState('');
  const query = useDeferredValue(q.trim());
  const [cursors, setCursors] = useState<(string | null)[]>([null]);
  const tenants = useTenants(query, cursors[cursors.length - 1]);
  return (
    <div>
      <PageHeader title="Tenants" subtitle="Every organisation on this Gridwright service." />
      <div className="grid gap-4 xl:grid-cols-[1fr_20rem]">
        <div className="min-w-0 space-y-3">
          <TextField label="Search slug or name" className="w-72" value={q} onChange={(e) => { setQ(e.target.value); setCursors([null]); }} />
          {tenants.isPending ? (
            <Loading />
          ) : tenants.error ? (
            <ProblemAlert error={tenants.error} />
          ) : tenants.data.items.length === 0 ? (
            <EmptyState title="No tenant matches" />
          ) : (
            <>
              <Table label="Tenants">
                <thead>
                  <tr>
                    <Th>Name</Th>
                    <Th>Slug</Th>
                    <Th>Plan</Th>
                    <Th>Overrides</Th>
                    <Th>State</Th>
                    <Th>Created</Th>
                  </tr>
                </thead>
                <tbody>
                  {tenants.data.items.map((t) => (
                    <tr key={t.id} className="hover:bg-ash-50">
                      <Td>
                        <Link to={`/operator/tenants/${t.id}`} className="font-medium hover:text-kiln-700 hover:underline">{t.name}</Link>
                      </Td>
                      <Td className="font-mono text-xs">{t.slug}</Td>
                      <Td className="text-xs">{t.planId}</Td>
                      <Td className="text-xs">{Object.keys(t.limitOverrides ?? {}).length || '—'}</Td>
                      <Td className="text-xs">{t.suspended ? <span className="font-medium text-red-700">suspended</span> : 'active'}</Td>
                      <Td className="text-xs">{formatDateTime(t.createdAt)}</Td>
                    </tr>
                  ))}
                </tbody>
              </Table>
              <div className="flex justify-end gap-2">
                <Button size="sm" disabled={cursors.length <= 1} onClick={() => setCursors((c) => c.slice(0, -1))}>← Newer</Button>
                <Button size="sm" disabled={!tenants.data.nextCursor} onClick={() => setCursors((c) => [...c, tenants.data.nextCursor])}>Older →</Button>
              </div>
            </>
          )}
        </div>
        <Panel title="New tenant">
          <CreateTenantForm />
        </Panel>
      </div>
    </div>
  );
}
