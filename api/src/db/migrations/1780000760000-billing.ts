import type { MigrationInterface, QueryRunner } from 'typeorm';
import { SUBSCRIPTION_STATUSES } from '../../billing/subscription-statuses';

/**
 * Billing through the payment provider:
 *
 * - `plans.price_lookup_key`: the provider's price a plan is sold at (looked up by this key); a plan
 *   without one is not for sale, and the first such plan is the free plan a lapsed tenant returns to.
 * - `billing_accounts`: a tenant's customer and subscription at the provider as last read from it, a
 *   downgrade waiting for the period's end (the plan kept until then), the grace period after a failed
 *   renewal, and an operator's grant of a plan without payment. Nothing about cards: the provider
 *   keeps them, and the billing page reads the brand and last digits from it.
 * - `billing_events`: every provider event processed, by its id, so a retried or repeated event is
 *   processed once.
 * - `billing_usage_reports`: solver-seconds above the plan reported as metered usage, written before
 *   they are sent (the row id is the provider's identifier of the report), sent again until accepted.
 */
export class Billing1780000760000 implements MigrationInterface {
  name = 'Billing1780000760000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE plans ADD COLUMN price_lookup_key text UNIQUE CHECK (price_lookup_key ~ '^[A-Za-z0-9_.-]{1,200}$')`);
    await q.query(`UPDATE plans SET price_lookup_key = 'gridwright-' || id || '-monthly' WHERE id IN ('field', 'fleet')`);

    const statuses = SUBSCRIPTION_STATUSES.map((s) => `'${s}'`).join(', ');
    await q.query(`
      CREATE TABLE billing_accounts (
        tenant_id uuid PRIMARY KEY REFERENCES tenants(id) ON DELETE CASCADE,
        customer_id text UNIQUE CHECK (length(customer_id) BETWEEN 1 AND 255),
        subscription_id text UNIQUE CHECK (length(subscription_id) BETWEEN 1 AND 255),
        subscription_status text CHECK (subscription_status IN (${statuses})),
        subscription_plan_id text REFERENCES plans(id),
        current_period_start timestamptz,
        current_period_end timestamptz,
        cancel_at_period_end boolean NOT NULL DEFAULT false,
        held_plan_id text REFERENCES plans(id),
        held_until timestamptz,
        grace_ends_at timestamptz,
        granted_plan_id text REFERENCES plans(id),
        grant_reason text CHECK (length(grant_reason) <= 500),
        granted_at timestamptz,
        granted_by text,
        updated_at timestamptz NOT NULL DEFAULT now(),
        CHECK (subscription_id IS NULL OR customer_id IS NOT NULL),
        CHECK ((subscription_id IS NULL) = (subscription_status IS NULL)),
        CHECK ((held_plan_id IS NULL) = (held_until IS NULL)),
        CHECK ((granted_plan_id IS NULL) = (granted_at IS NULL)),
        CHECK (grace_ends_at IS NULL OR subscription_id IS NOT NULL)
      )`);
    await q.query(`CREATE INDEX billing_accounts_grace_idx ON billing_accounts (grace_ends_at) WHERE grace_ends_at IS NOT NULL`);

    await q.query(`
      CREATE TABLE billing_events (
        event_id text PRIMARY KEY CHECK (length(event_id) BETWEEN 1 AND 255),
        type text NOT NULL CHECK (length(type) <= 255),
        tenant_id uuid REFERENCES tenants(id) ON DELETE SET NULL,
        created_at timestamptz NOT NULL,
        processed_at timestamptz NOT NULL DEFAULT now()
      )`);

    await q.query(`
      CREATE TABLE billing_usage_reports (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        customer_id text NOT NULL,
        period text NOT NULL CHECK (period ~ '^[0-9]{4}-[0-9]{2}$'),
        solver_seconds integer NOT NULL CHECK (solver_seconds > 0),
        created_at timestamptz NOT NULL DEFAULT now(),
        reported_at timestamptz
      )`);
    await q.query(`CREATE INDEX billing_usage_reports_tenant_period_idx ON billing_usage_reports (tenant_id, period)`);
    await q.query(`CREATE INDEX billing_usage_reports_unsent_idx ON billing_usage_reports (created_at) WHERE reported_at IS NULL`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE billing_usage_reports`);
    await q.query(`DROP TABLE billing_events`);
    await q.query(`DROP TABLE billing_accounts`);
    await q.query(`ALTER TABLE plans DROP COLUMN price_lookup_key`);
  }
}
