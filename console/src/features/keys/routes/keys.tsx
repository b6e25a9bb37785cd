import { useState } from 'react';
import { ConfirmButton } from '@/components/confirm-button';
import { Table, Td, Th } from '@/components/data-table';
import { CheckboxField } from '@/components/field';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { useApiKeys, type ApiKey } from '@/lib/queries/api-keys';
import { usePermission } from '@/lib/session';
import { useRevokeApiKey } from '../api';
import { CreateKeyForm } from '../components/create-key-form';

function keyState(k: ApiKey): string {
  if (k.revokedAt) return 'revoked';
  if (k.expiresAt && new Date(k.expiresAt).getTime() < Date.now()) return 'expired';
  return 'active';
}

export function KeysRoute() {
  const [showRevoked, setShowRevoked] = useState(false);
  const keys = useApiKeys(showRevoked);
  const revoke = useRevokeApiKey();
  const canManage = usePermission('keys.manage');
  return (
    <div>
      <PageHeader title="API keys" subtitle="Keys let scripts and SCADA bridges call the API. Each carries only the scopes it needs." />
      <div className="grid gap-4 xl:grid-cols-[1fr_22rem]">
        <div className="min-w-0 space-y-2">
          <CheckboxField label="Show revoked keys" checked={showRevoked} onChange={(e) => setShowRevoked(e.target.checked)} />
          <ProblemAlert error={revoke.error} />
          {keys.isPending ? (
            <Loading />
          ) : keys.error ? (
            <ProblemAlert error={keys.error} />
          ) : keys.data.items.length === 0 ? (
            <EmptyState title="No API keys yet">{canManage ? 'Create one with the form.' : 'A developer or owner can create one.'}</EmptyState>
          ) : (
            <Table label="API keys">
              <thead>
                <tr>
                  <Th>Name</Th>
                  <Th>Key</Th>
                  <Th>Scopes</Th>
                  <Th>State</Th>
                  <Th>Expires</Th>
                  <Th>Last used</Th>
                  <Th>Created</Th>
                  {canManage && <Th />}
                </tr>
              </thead>
              <tbody>
                {keys.data.items.map((k) => (
                  <tr key={k.id}>
                    <Td className="font-medium">{k.name}</Td>
                    <Td className="font-mono text-xs">{k.prefix}…</Td>
                    <Td>
                      <span className="flex flex-wrap gap-1">
                        {k.scopes.map((s) => (
                          <code key={s} className="rounded bg-ash-100 px-1 font-mono text-[11px]">{s}</code>
                        ))}
                      </span>
                    </Td>
                    <Td className="text-xs">{keyState(k)}</Td>
                    <Td className="text-xs">{k.expiresAt ? formatDateTime(k.expiresAt) : 'never'}</Td>
                    <Td className="text-xs">{k.lastUsedAt ? formatDateTime(k.lastUsedAt) : 'never'}</Td>
                    <Td className="text-xs">{formatDateTime(k.createdAt)}</Td>
                    {canManage && (
                      <Td className="text-right">
                        {!k.revokedAt && (
                          <ConfirmButton confirmLabel={`Revoke ${k.name}`} onConfirm={() => revoke.mutate(k.id)} disabled={revoke.isPending}>
                            Revoke
                          </ConfirmButton>
                        )}
                      </Td>
                    )}
                  </tr>
                ))}
              </tbody>
            </Table>
          )}
        </div>
        {canManage && (
          <Panel title="New key">
            <CreateKeyForm />
          </Panel>
        )}
      </div>
    </div>
  );
}
