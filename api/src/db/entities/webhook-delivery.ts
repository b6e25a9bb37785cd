import { Column, Entity, PrimaryColumn } from 'typeorm';

export interface DeliveryAttempt {
  at: string;
  statusCode: number | null;
  error: string | null;
  durationMs: number;
}

@Entity('webhook_deliveries')
export class WebhookDelivery {
  @PrimaryColumn('uuid') id!: string;
  @Column('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('uuid', { name: 'endpoint_id' }) endpointId!: string;
  @Column('uuid', { name: 'run_id', nullable: true }) runId!: string | null;
  @Column('timestamptz', { name: 'created_at' }) createdAt!: Date;
  @Column('text') event!: string;
  @Column('text', { name: 'message_id' }) messageId!: string;
  @Column('jsonb') payload!: Record<string, unknown>;
  @Column('text') status!: 'pending' | 'succeeded' | 'failed' | 'abandoned';
  @Column('jsonb') attempts!: DeliveryAttempt[];
  @Column('timestamptz', { name: 'delivered_at', nullable: true }) deliveredAt!: Date | null;
  /** When the delivery got its queue job: an endpoint has at most one pending delivery with one. */
  @Column('timestamptz', { name: 'dispatched_at', nullable: true }) dispatchedAt!: Date | null;
}
