import { Fragment, useState } from 'react';
import { Table, Td, Th } from '@/components/data-table';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { useDeliveries } from '../api';

export function DeliveryLog({ endpointId }: { endpointId: string }) {
  const deliveries = useDeliveries(endpointId);
  const [open, setOpen] = useState<string | null>(null);
  if (deliveries.isPending) return <Loading />;
  if (deliveries.error) return <ProblemAlert error={deliveries.error} />;
  if (deliveries.data.items.length === 0) return <EmptyState title="Nothing delivered yet">Send a test event, or finish a run.</EmptyState>;
  return (
    <Table label="Delivery log">
      <thead>
        <tr>
          <Th>Created</Th>
          <Th>Event</Th>
          <Th>Run</Th>
          <Th>Status</Th>
          <Th className="text-right">Attempts</Th>
          <Th className="text-right">Last response</Th>
          <Th>Delivered</Th>
        </tr>
      </thead>
      <tbody>
        {deliveries.data.items.map((d) => {
          const attempts = d.attempts ?? [];
          const last = attempts.at(-1);
          return (
            <Fragment key={d.id}>
              <tr className="cursor-pointer hover:bg-ash-50" onClick={() => setOpen(open === d.id ? null : d.id ?? null)}>
                <Td className="whitespace-nowrap text-xs">{formatDateTime(d.createdAt)}</Td>
                <Td className="font-mono text-xs">{d.event}</Td>
                <Td className="font-mono text-[11px] text-ash-500">{d.runId?.slice(0, 8) ?? '—'}</Td>
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
