import { Table, Td, Th } from '@/components/data-table';
import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { formatDateTime } from '@/lib/format';
import { usePermission } from '@/lib/session';
import { useRunDeliveries } from '../api';

export function RunDeliveries({ runId }: { runId: string }) {
  const allowed = usePermission('webhooks.read');
  const deliveries = useRunDeliveries(runId, allowed);
  if (!allowed) return <p className="text-sm text-ash-500">Your role cannot see webhook deliveries.</p>;
  if (deliveries.isPending) return <Loading />;
  if (deliveries.error) return <ProblemAlert error={deliveries.error} />;
  if (deliveries.data.items.length === 0) return <EmptyState title="No webhook deliveries for this run">Add an endpoint under Webhooks to be told when runs finish.</EmptyState>;
  return (
    <Table label="Webhook deliveries of this run">
      <thead>
        <tr>
          <Th>Event</Th>
          <Th>Endpoint</Th>
          <Th>Status</Th>
          <Th className="text-right">Last response</Th>
          <Th className="text-right">Attempts</Th>
          <Th>Last attempt</Th>
        </tr>
      </thead>
      <tbody>
        {deliveries.data.items.map((d) => {
          const last = d.attempts?.at(-1);
          return (
            <tr key={d.id}>
              <Td className="font-mono text-xs">{d.event}</Td>
              <Td className="font-mono text-[11px] text-ash-500">{d.endpointId?.slice(0, 8)}</Td>
              <Td className="text-xs">{d.status}</Td>
              <Td className="text-right font-mono text-xs" >{last ? (last.statusCode ?? last.error ?? '—') : '—'}</Td>
              <Td className="text-right font-mono text-xs">{d.attempts?.length ?? 0}</Td>
              <Td className="text-xs">{formatDateTime(last?.at ?? d.createdAt)}</Td>
            </tr>
          );
        })}
      </tbody>
    </Table>
  );
}
