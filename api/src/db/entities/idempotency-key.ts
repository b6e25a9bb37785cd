import { Column, Entity, PrimaryColumn } from 'typeorm';

/** An Idempotency-Key a tenant sent with POST /v1/runs, the body's fingerprint and the run it created. */
@Entity('idempotency_keys')
export class IdempotencyKey {
  @PrimaryColumn('uuid', { name: 'tenant_id' }) tenantId!: string;
  @PrimaryColumn('text') key!: string;
  @Column('text') fingerprint!: string;
  @Column('uuid', { name: 'run_id', nullable: true }) runId!: string | null;
  @Column('timestamptz', { name: 'created_at' }) createdAt!: Date;
  @Column('timestamptz', { name: 'expires_at' }) expiresAt!: Date;
}
