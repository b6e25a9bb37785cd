import { Column, Entity, PrimaryColumn } from 'typeorm';

/** What one finished run consumed; written once when the run ends. */
@Entity('run_usage')
export class RunUsage {
  @PrimaryColumn('uuid', { name: 'run_id' }) runId!: string;
  @Column('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('timestamptz', { name: 'ended_at' }) endedAt!: Date;
  @Column('double precision', { name: 'solver_seconds' }) solverSeconds!: number;
  @Column('integer') steps!: number;
  @Column('integer') units!: number;
}
