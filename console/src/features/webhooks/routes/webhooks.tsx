import { useState } from 'react';
import { Button } from '@/components/button';
import { ConfirmButton } from '@/components/confirm-button';
import { Table, Td, Th } from '@/components/data-table';
import { PageHeader, Panel } from '@/components/page-header';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { usePermission } from '@/lib/session';
import { useDeleteEndpoint, useEndpoints, useRotateSecret, useSendTest, useUpdateEndpoint } from '../api';
import { CreateEndpointForm } from '../components/create-endpoint-form';
import { DeliveryLog } from '../components/delivery-log';
import { SecretNotice } from '../components/secret-notice';

export function WebhooksRoute() {
  const endpoints = useEndpoints();
  const canManage = usePermission('webhooks.manage');
  const update = useUpdateEndpoint();
  const remove = useDeleteEndpoint();
  const rotate = useRotateSecret();
  const test = useSendTest();
  const [selected, setSelected] = useState<string | null>(null);
  const current = endpoints.data?.items.find((e) => e.id === selected) ?? endpoints.data?.items[0];
  const actionError = update.error ?? remove.error ?? rotate.error ?? test.error;
  return (
    <div>
      <PageHeader title="Webhooks" subtitle="Gridwright calls these URLs when runs finish, signed so the receiver can tell the call is genuine." />
      <div className="grid gap-4 xl:grid-cols-[1fr_22rem]">
        <div className="min-w-0 space-y-3">
          {rotate.data && <SecretNotice secret={rotate.data.secret} url={rotate.data.url ?? ''} onDone={() => rotate.reset()} />}
          <ProblemAlert error={actionError} />
          {endpoints.isPending ? (
            <Loading />
          ) : endpoints.error ? (
            <ProblemAlert error={endpoints.error} />
          ) : endpoints.data.items.length === 0 ? (
            <EmptyState title="No endpoints yet">{canManage ? 'Add one with the form to hear about finished runs.' : 'A developer or owner can add one.'}</EmptyState>
          ) : (
            <Table label="Webhook endpoints">
              <thead>
                <tr>
                  <Th>URL</Th>
                  <Th>Events</Th>
                  <Th>State</Th>
                  <Th className="text-right">Failures</Th>
                  <Th>Secret rotated</Th>
                  {canManage && <Th />}
                </tr>
              </thead>
              <tbody>
                {endpoints.data.items.map((e) => (
                  <tr key={e.id} className={e.id === current?.id ? 'bg-kiln-50/60' : ''}>
                    <Td className="max-w-xs">
                      <button type="button" className="truncate text-left font-mono text-xs hover:underline" onClick={() => setSelected(e.id ?? null)} title={e.url}>
                        {e.url}
                      </button>
                      {e.description && <p className="truncate text-[11px] text-ash-500">{e.description}</p>}
                    </Td>
                    <Td className="font-mono text-[11px]">{e.events?.join(' ')}</Td>
                    <Td className="text-xs">{e.enabled ? 'enabled' : <span className="text-red-700" title={e.disabledReason ?? undefined}>disabled</span>}</Td>
                    <Td className="text-right font-mono text-xs">{e.consecutiveFailures ?? 0}</Td>
                    <Td className="text-xs">{e.secretRotatedAt ? formatDateTime(e.secretRotatedAt) : '—'}</Td>
                    {canManage && e.id && (
                      <Td className="whitespace-nowrap text-right">
                        <span className="inline-flex gap-1">
                          <Button size="sm" onClick={() => test.mutate(e.id!, { onSuccess: () => setSelected(e.id ?? null) })}>Send test</Button>
                          <Button size="sm" onClick={() => update.mutate({ id: e.id!, enabled: !e.enabled })}>{e.enabled ? 'Disable' : 'Enable'}</Button>
                          <ConfirmButton confirmLabel="Rotate now" onConfirm={() => rotate.mutate(e.id!)}>Rotate secret</ConfirmButton>
                          <ConfirmButton confirmLabel="Delete it" onConfirm={() => remove.mutate(e.id!)}>Delete</ConfirmButton>
                        </span>
                      </Td>
                    )}
                  </tr>
                ))}
              </tbody>
            </Table>
          )}
          {current?.id && (
            <Panel title={`Delivery log · ${current.url}`}>
              <DeliveryLog endpointId={current.id} />
            </Panel>
          )}
        </div>
        {canManage && (
          <Panel title="New endpoint">
            <CreateEndpointForm />
          </Panel>
        )}
      </div>
    </div>
  );
}
