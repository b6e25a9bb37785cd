import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Runs (the state machine the API reads) and the Idempotency-Key records that point at them. */
export class Runs1780000100000 implements MigrationInterface {
  name = 'Runs1780000100000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE runs (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        status text NOT NULL DEFAULT 'queued' CHECK (status IN ('queued', 'running', 'succeeded', 'failed', 'cancelled')),
        outcome text CHECK (outcome IN ('optimal', 'feasible', 'infeasible', 'no-solution')),
        name text,
        spec jsonb NOT NULL,
        series_id text,
        steps integer NOT NULL,
        units integer NOT NULL,
        time_limit_seconds double precision NOT NULL,
        created_by_user_id uuid,
        created_by_api_key_id uuid,
        started_at timestamptz,
        finished_at timestamptz,
        cancel_requested_at timestamptz,
        windows_done integer NOT NULL DEFAULT 0,
        windows_total integer,
        attempts integer NOT NULL DEFAULT 0,
        worker_id text,
        result jsonb,
        error jsonb,
        solver_log text NOT NULL DEFAULT '',
        solver_seconds double precision
      )`);
    await q.query(`CREATE INDEX runs_tenant_created ON runs (tenant_id, created_at DESC, id DESC)`);
    await q.query(`CREATE INDEX runs_tenant_status_created ON runs (tenant_id, status, created_at DESC, id DESC)`);
    await q.query(`
      CREATE TABLE idempotency_keys (
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        key text NOT NULL,
        fingerprint text NOT NULL,
        run_id uuid REFERENCES runs(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz NOT NULL,
        PRIMARY KEY (tenant_id, key)
      )`);
    await q.query(`CREATE INDEX idempotency_keys_expires ON idempotency_keys (expires_at)`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE idempotency_keys');
    await q.query('DROP TABLE runs');
  }
}
