import { Column, Entity, PrimaryColumn } from 'typeorm';

export type WebhookEvent = 'run.succeeded' | 'run.failed' | 'run.cancelled';

@Entity('webhook_endpoints')
export class WebhookEndpoint {
  @PrimaryColumn('uuid') id!: string;
  @Column('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('timestamptz', { name: 'created_at' }) createdAt!: Date;
  @Column('timestamptz', { name: 'updated_at' }) updatedAt!: Date;
  @Column('text') url!: string;
  @Column('text', { nullable: true }) description!: string | null;
  @Column('text', { array: true }) events!: WebhookEvent[];
  /** Needed in clear to sign; never returned after creation or rotation. */
  @Column('text') secret!: string;
  @Column('timestamptz', { name: 'secret_rotated_at', nullable: true }) secretRotatedAt!: Date | null;
  @Column('boolean') enabled!: boolean;
  @Column('timestamptz', { name: 'disabled_at', nullable: true }) disabledAt!: Date | null;
  @Column('text', { name: 'disabled_reason', nullable: true }) disabledReason!: string | null;
  @Column('integer', { name: 'consecutive_failures' }) consecutiveFailures!: number;
}
