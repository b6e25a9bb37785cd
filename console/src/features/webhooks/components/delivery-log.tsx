import { ProblemAlert } from '@/components/problem-alert';
import { EmptyState, Loading } from '@/components/states';
import { WebhookDeliveryTable } from '@/components/webhook-delivery-table';
import { useDeliveries } from '../api';

export function DeliveryLog({ endpointId }: { endpointId: string }) {
  const deliveries = useDeliveries(endpointId);
  if (deliveries.isPending) return <Loading />;
  if (deliveries.error) return <ProblemAlert error={deliveries.error} />;
  if (deliveries.data.items.length === 0) return <EmptyState title="Nothing delivered yet">Send a test event, or finish a run.</EmptyState>;
  return <WebhookDeliveryTable deliveries={deliveries.data.items} label="Delivery log" counterpart="run" />;
}
