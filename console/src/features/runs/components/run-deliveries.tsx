import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { WebhookDeliveryTable } from '@/components/webhook-delivery-table';
import { usePermission } from '@/lib/session';
import { useRunDeliveries } from '../api';

export function RunDeliveries({ runId }: { runId: string }) {
  const allowed = usePermission('webhooks.read');
  const deliveries = useRunDeliveries(runId, allowed);
  if (!allowed) return <p className="text-sm text-ash-500">Your role cannot see webhook deliveries.</p>;
  if (deliveries.isPending) return <Loading />;
  if (deliveries.error) return <ProblemAlert error={deliveries.error} />;
  if (deliveries.data.items.length === 0) return <EmptyState title="No webhook deliveries for this run">Add an endpoint under Webhooks to be told when runs finish.</EmptyState>;
  return <WebhookDeliveryTable deliveries={deliveries.data.items} label="Webhook deliveries of this run" counterpart="endpoint" />;
}
