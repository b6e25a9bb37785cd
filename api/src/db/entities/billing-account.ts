import { Column, Entity, PrimaryColumn, UpdateDateColumn } from 'typeorm';
import type { SubscriptionStatus } from '../../billing/subscription-statuses';

/** A tenant's standing with the payment provider (see the billing migration). Never anything about a card. */
@Entity('billing_accounts')
export class BillingAccount {
  @PrimaryColumn('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('text', { name: 'customer_id', nullable: true }) customerId!: string | null;
  @Column('text', { name: 'subscription_id', nullable: true }) subscriptionId!: string | null;
  @Column('text', { name: 'subscription_status', nullable: true }) subscriptionStatus!: SubscriptionStatus | null;
  /** The plan the subscription's price is for now (after a downgrade: the lower plan, billed from the next period). */
  @Column('text', { name: 'subscription_plan_id', nullable: true }) subscriptionPlanId!: string | null;
  @Column('timestamptz', { name: 'current_period_start', nullable: true }) currentPeriodStart!: Date | null;
  @Column('timestamptz', { name: 'current_period_end', nullable: true }) currentPeriodEnd!: Date | null;
  @Column('boolean', { name: 'cancel_at_period_end' }) cancelAtPeriodEnd!: boolean;
  /** The plan paid for this period and kept until `heldUntil`, when a downgrade takes effect. */
  @Column('text', { name: 'held_plan_id', nullable: true }) heldPlanId!: string | null;
  @Column('timestamptz', { name: 'held_until', nullable: true }) heldUntil!: Date | null;
  @Column('timestamptz', { name: 'grace_ends_at', nullable: true }) graceEndsAt!: Date | null;
  @Column('text', { name: 'granted_plan_id', nullable: true }) grantedPlanId!: string | null;
  @Column('text', { name: 'grant_reason', nullable: true }) grantReason!: string | null;
  @Column('timestamptz', { name: 'granted_at', nullable: true }) grantedAt!: Date | null;
  @Column('text', { name: 'granted_by', nullable: true }) grantedBy!: string | null;
  @UpdateDateColumn({ type: 'timestamptz', name: 'updated_at' }) updatedAt!: Date;
}
