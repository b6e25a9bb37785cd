import { Column, Entity, PrimaryColumn } from 'typeorm';

/** A base spec and a grid of changes; its runs (one per combination) name it in `runs.study_id`. */
@Entity('studies')
export class Study {
  @PrimaryColumn('uuid') id!: string;
  @Column('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('timestamptz', { name: 'created_at' }) createdAt!: Date;
  @Column('text', { nullable: true }) name!: string | null;
  /** The base spec as submitted. */
  @Column('jsonb', { name: 'base_spec' }) baseSpec!: Record<string, unknown>;
  /** `[{ pointer, label, values }]`, labels filled in. */
  @Column('jsonb') changes!: { pointer: string; label: string; values: unknown[] }[];
  @Column('integer', { name: 'runs_total' }) runsTotal!: number;
  @Column('uuid', { name: 'created_by_user_id', nullable: true }) createdByUserId!: string | null;
  @Column('uuid', { name: 'created_by_api_key_id', nullable: true }) createdByApiKeyId!: string | null;
  @Column('timestamptz', { name: 'cancel_requested_at', nullable: true }) cancelRequestedAt!: Date | null;
}
