import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { RunError, RunStatus, SolveOutcome } from '@gridwright/shared/run-result';

export type { RunStatus };

/** One submitted site spec and its way through the queue; the row is the truth the API reads. */
@Entity('runs')
export class Run {
  @PrimaryColumn('uuid') id!: string;
  @Column('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('timestamptz', { name: 'created_at' }) createdAt!: Date;
  /** One of RUN_STATUSES; the database's CHECK constraint is made from the same list. */
  @Column('text') status!: RunStatus;
  @Column('text', { nullable: true }) outcome!: SolveOutcome | null;
  @Column('text', { nullable: true }) name!: string | null;
  @Column('jsonb') spec!: Record<string, unknown>;
  @Column('text', { name: 'series_id', nullable: true }) seriesId!: string | null;
  @Column('integer') steps!: number;
  @Column('integer') units!: number;
  @Column('double precision', { name: 'time_limit_seconds' }) timeLimitSeconds!: number;
  @Column('uuid', { name: 'created_by_user_id', nullable: true }) createdByUserId!: string | null;
  @Column('uuid', { name: 'created_by_api_key_id', nullable: true }) createdByApiKeyId!: string | null;
  @Column('timestamptz', { name: 'started_at', nullable: true }) startedAt!: Date | null;
  @Column('timestamptz', { name: 'finished_at', nullable: true }) finishedAt!: Date | null;
  @Column('timestamptz', { name: 'cancel_requested_at', nullable: true }) cancelRequestedAt!: Date | null;
  @Column('integer', { name: 'windows_done' }) windowsDone!: number;
  @Column('integer', { name: 'windows_total', nullable: true }) windowsTotal!: number | null;
  @Column('integer') attempts!: number;
  @Column('text', { name: 'worker_id', nullable: true }) workerId!: string | null;
  /** The queue job that may start the run; any other job for it finds nothing to claim. */
  @Column('uuid', { name: 'job_id', nullable: true }) jobId!: string | null;
  /** The tenant-fair round the run is queued in (runs/queue.ts). */
  @Column('integer', { name: 'queue_round' }) queueRound!: number;
  /** Last sign of life of the attempt holding the run. */
  @Column('timestamptz', { name: 'heartbeat_at', nullable: true }) heartbeatAt!: Date | null;
  @Column('jsonb', { nullable: true }) result!: Record<string, unknown> | null;
  @Column('jsonb', { nullable: true }) error!: RunError | null;
  @Column('text', { name: 'solver_log' }) solverLog!: string;
  @Column('double precision', { name: 'solver_seconds', nullable: true }) solverSeconds!: number | null;
  /** A re-plan's parent, the first run of its chain, and the step it starts at in each one's horizon (runs/replanning.ts). */
  @Column('uuid', { name: 'parent_run_id', nullable: true }) parentRunId!: string | null;
  @Column('uuid', { name: 'root_run_id', nullable: true }) rootRunId!: string | null;
  @Column('integer', { name: 'replan_from_step', nullable: true }) replanFromStep!: number | null;
  @Column('integer', { name: 'root_step' }) rootStep!: number;
  /** The study that created the run and the run's place in its grid (studies/). */
  @Column('uuid', { name: 'study_id', nullable: true }) studyId!: string | null;
  @Column('integer', { name: 'study_position', nullable: true }) studyPosition!: number | null;
}
