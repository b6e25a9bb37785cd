import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * What the run and delivery queues need to be fair and to recover from crashes in seconds:
 *
 * - `runs.job_id`: the one queue job that may start the run (a stale job finds nothing to claim);
 *   `runs.queue_round`: the tenant-fair round the run is served in (`runs/queue.ts`);
 *   `runs.heartbeat_at`: written by the attempt that holds the run, read by the orphan sweep.
 * - `webhook_deliveries.dispatched_at`: an endpoint's deliveries go out one at a time; this marks
 *   the one that has a queue job (`services/webhook-dispatch.ts`).
 * - `plans.webhook_endpoints`: the plan's cap on webhook endpoints per tenant.
 */
export class FairQueues1780000600000 implements MigrationInterface {
  name = 'FairQueues1780000600000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE runs ADD COLUMN job_id uuid, ADD COLUMN queue_round integer NOT NULL DEFAULT 0, ADD COLUMN heartbeat_at timestamptz`);
    // Runs queued or held before this migration keep the job that was sent for them.
    await q.query(`
      UPDATE runs r SET job_id = j.id
        FROM pgboss.job j
       WHERE j.name = 'run-solve' AND j.state < 'completed' AND j.data->>'runId' = r.id::text AND r.status IN ('queued', 'running')`);
    await q.query(`UPDATE runs SET heartbeat_at = started_at WHERE status = 'running'`);
    await q.query(`CREATE INDEX runs_queued_round ON runs (queue_round) WHERE status = 'queued'`);
    await q.query(`CREATE INDEX runs_tenant_queued_round ON runs (tenant_id, queue_round) WHERE status = 'queued'`);
    await q.query(`CREATE INDEX runs_running ON runs (worker_id) WHERE status = 'running'`);

    await q.query(`ALTER TABLE webhook_deliveries ADD COLUMN dispatched_at timestamptz`);
    // Pending deliveries already have their jobs.
    await q.query(`UPDATE webhook_deliveries SET dispatched_at = created_at WHERE status = 'pending'`);
    await q.query(`CREATE INDEX webhook_deliveries_endpoint_pending ON webhook_deliveries (endpoint_id, created_at, id) WHERE status = 'pending'`);

    await q.query(`ALTER TABLE plans ADD COLUMN webhook_endpoints integer NOT NULL DEFAULT 0 CHECK (webhook_endpoints >= 0)`);
    await q.query(`UPDATE plans SET webhook_endpoints = CASE id WHEN 'pilot' THEN 2 WHEN 'field' THEN 10 WHEN 'fleet' THEN 50 ELSE 10 END`);
    // A plan added later states its cap, like every other limit.
    await q.query(`ALTER TABLE plans ALTER COLUMN webhook_endpoints DROP DEFAULT`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('ALTER TABLE plans DROP COLUMN webhook_endpoints');
    await q.query('DROP INDEX webhook_deliveries_endpoint_pending');
    await q.query('ALTER TABLE webhook_deliveries DROP COLUMN dispatched_at');
    await q.query('DROP INDEX runs_running');
    await q.query('DROP INDEX runs_tenant_queued_round');
    await q.query('DROP INDEX runs_queued_round');
    await q.query('ALTER TABLE runs DROP COLUMN heartbeat_at, DROP COLUMN queue_round, DROP COLUMN job_id');
  }
}
