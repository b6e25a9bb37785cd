import { Fragment, useState } from 'react';
import type { Schemas } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import { Table, Td, Th } from './data-table';

type WebhookDelivery = Schemas['WebhookDelivery'];

/**
 * Webhook deliveries with their attempts (a row opens to show each one). `counterpart` names the column that
 * tells the deliveries apart: the endpoint on a run's screen, the run on an endpoint's log.
 */
export function WebhookDeliveryTable({ deliveries, label, counterpart }: { deliveries: WebhookDelivery[]; label: string; counterpart: 'endpoint' | 'run' }) {
  const [open, setOpen] = useState<string | null>(null);
  return (
    <Table label={label}>
      <thead>
        <tr>
          <Th>Created</Th>
          <Th>Event</Th>
          <Th>{counterpart === 'run' ? 'Run' : 'Endpoint'}</Th>
          <Th>Status</Th>
          <Th className="text-right">Attempts</Th>
          <Th className="text-right">Last response</Th>
          <Th>Delivered</Th>
        </tr>
      </thead>
      <tbody>
        {deliveries.map((d) => {
          const attempts = d.attempts ?? [];
          const last = attempts.at(-1);
          const counterpartId = counterpart === 'run' ? d.runId : d.endpointId;
          return (
            <Fragment key={d.id}>
              <tr className="cursor-pointer hover:bg-ash-50" onClick={() => setOpen(open === d.id ? null : d.id ?? null)}>
                <Td className="whitespace-nowrap text-xs">{formatDateTime(d.createdAt)}</Td>
                <Td className="font-mono text-xs">{d.event}</Td>
                <Td className="font-mono text-[11px] text-ash-500">{counterpartId?.slice(0, 8) ?? '—'}</Td>
                <Td className={`text-xs ${d.status === 'failed' || d.status === 'abandoned' ? 'text-red-700' : ''}`}>{d.status}</Td>
                <Td className="text-right font-mono text-xs">
                  <button type="button" aria-expanded={open === d.id} className="underline decoration-dotted">{attempts.length}</button>
                </Td>
                <Td className="text-right font-mono text-xs">{last ? (last.statusCode ?? 'no answer') : '—'}</Td>
                <Td className="text-xs">{d.deliveredAt ? formatDateTime(d.deliveredAt) : '—'}</Td>
              </tr>
              {open === d.id && (
                <tr>
                  <td colSpan={7} className="bg-ash-50 px-4 py-2">
                    <ol className="space-y-0.5 font-mono text-[11px]">
                      {attempts.map((a, i) => (
                        <li key={i}>
                          #{i + 1} {formatDateTime(a.at)} → {a.statusCode ?? '—'} {a.error ?? ''} ({a.durationMs} ms)
                        </li>
                      ))}
                    </ol>
                    <p className="mt-1 font-mono text-[11px] text-ash-500">webhook-id {d.messageId}</p>
                  </td>
                </tr>
              )}
            </Fragment>
          );
        })}
      </tbody>
    </Table>
  );
}
