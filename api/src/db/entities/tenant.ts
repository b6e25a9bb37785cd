import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

export type LimitOverrides = Partial<
  Record<'monthlyRuns' | 'monthlySolverSeconds' | 'maxSteps' | 'maxUnits' | 'requestsPerSecond' | 'concurrentRuns' | 'webhookEndpoints', number>
>;

@Entity('tenants')
export class Tenant {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('text') slug!: string;
  @Column('text') name!: string;
  @Column('text', { name: 'plan_id' }) planId!: string;
  @Column('jsonb', { name: 'limit_overrides' }) limitOverrides!: LimitOverrides;
  @Column('timestamptz', { name: 'suspended_at', nullable: true }) suspendedAt!: Date | null;
  @Column('text', { name: 'suspended_reason', nullable: true }) suspendedReason!: string | null;
  @CreateDateColumn({ type: 'timestamptz', name: 'created_at' }) createdAt!: Date;
  @UpdateDateColumn({ type: 'timestamptz', name: 'updated_at' }) updatedAt!: Date;
}
