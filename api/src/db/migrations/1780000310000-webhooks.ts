import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Webhook endpoints per tenant and the log of every delivery (with its attempts). */
export class Webhooks1780000310000 implements MigrationInterface {
  name = 'Webhooks1780000310000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE webhook_endpoints (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now(),
        url text NOT NULL,
        description text,
        events text[] NOT NULL,
        secret text NOT NULL,
        secret_rotated_at timestamptz,
        enabled boolean NOT NULL DEFAULT true,
        disabled_at timestamptz,
        disabled_reason text,
        consecutive_failures integer NOT NULL DEFAULT 0
      )`);
    await q.query(`CREATE INDEX webhook_endpoints_tenant ON webhook_endpoints (tenant_id, created_at DESC)`);
    await q.query(`
      CREATE TABLE webhook_deliveries (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        endpoint_id uuid NOT NULL REFERENCES webhook_endpoints(id) ON DELETE CASCADE,
        run_id uuid REFERENCES runs(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        event text NOT NULL,
        message_id text NOT NULL UNIQUE,
        payload jsonb NOT NULL,
        status text NOT NULL DEFAULT 'pending' CHECK (status IN ('pending', 'succeeded', 'failed', 'abandoned')),
        attempts jsonb NOT NULL DEFAULT '[]',
        delivered_at timestamptz
      )`);
    await q.query(`CREATE INDEX webhook_deliveries_endpoint ON webhook_deliveries (endpoint_id, created_at DESC, id DESC)`);
    await q.query(`CREATE INDEX webhook_deliveries_run ON webhook_deliveries (run_id, created_at DESC)`);
    await q.query(`CREATE UNIQUE INDEX webhook_deliveries_once_per_run_event ON webhook_deliveries (endpoint_id, run_id, event) WHERE run_id IS NOT NULL`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE webhook_deliveries');
    await q.query('DROP TABLE webhook_endpoints');
  }
}
