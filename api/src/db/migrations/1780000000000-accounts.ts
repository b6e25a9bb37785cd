import type { MigrationInterface, QueryRunner } from 'typeorm';

// Tenants, people, plans, keys, sessions, the e-mail outbox, usage, audit and the rate-limiter store.
export class Accounts1780000000000 implements MigrationInterface {
  name = 'Accounts1780000000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE plans (
        id text PRIMARY KEY CHECK (id ~ '^[a-z][a-z0-9-]{1,30}$'),
        name text NOT NULL,
        description text NOT NULL DEFAULT '',
        monthly_runs integer NOT NULL CHECK (monthly_runs >= 0),
        monthly_solver_seconds integer NOT NULL CHECK (monthly_solver_seconds >= 0),
        max_steps integer NOT NULL CHECK (max_steps >= 1),
        max_units integer NOT NULL CHECK (max_units >= 0),
        requests_per_second integer NOT NULL CHECK (requests_per_second >= 1),
        concurrent_runs integer NOT NULL CHECK (concurrent_runs >= 1),
        sort_order integer NOT NULL DEFAULT 0
      )`);
    // Our own plan ladder; figures chosen so a pilot fits a week of quarter-hours and a fleet a leap year.
    await q.query(`
      INSERT INTO plans (id, name, description, monthly_runs, monthly_solver_seconds, max_steps, max_units, requests_per_second, concurrent_runs, sort_order) VALUES
        ('pilot', 'Pilot', 'Trying Gridwright on one site: a week of quarter-hours, a handful of units.', 300, 3600, 672, 5, 5, 1, 1),
        ('field', 'Field', 'Day-ahead scheduling for a portfolio of sites.', 10000, 72000, 8784, 20, 25, 4, 2),
        ('fleet', 'Fleet', 'Control-room scale: long horizons, many units, many integrations.', 200000, 1440000, 35136, 50, 100, 64, 3)`);

    await q.query(`
      CREATE TABLE tenants (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        slug text NOT NULL UNIQUE CHECK (slug ~ '^[a-z0-9][a-z0-9-]{1,48}[a-z0-9]$'),
        name text NOT NULL,
        plan_id text NOT NULL REFERENCES plans(id),
        limit_overrides jsonb NOT NULL DEFAULT '{}'::jsonb,
        suspended_at timestamptz,
        suspended_reason text,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now()
      )`);
    await q.query(`CREATE INDEX tenants_created_idx ON tenants (created_at, id)`);

    await q.query(`
      CREATE TABLE users (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        email text NOT NULL,
        name text NOT NULL DEFAULT '',
        password_hash text,
        tenant_id uuid REFERENCES tenants(id) ON DELETE CASCADE,
        role text NOT NULL CHECK (role IN ('owner', 'developer', 'viewer', 'operator')),
        created_at timestamptz NOT NULL DEFAULT now(),
        password_changed_at timestamptz,
        last_sign_in_at timestamptz,
        CHECK ((role = 'operator') = (tenant_id IS NULL))
      )`);
    await q.query(`CREATE UNIQUE INDEX users_email_key ON users (lower(email))`);
    await q.query(`CREATE INDEX users_tenant_idx ON users (tenant_id, created_at, id)`);

    await q.query(`
      CREATE TABLE sessions (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        csrf_token text NOT NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz NOT NULL,
        revoked_at timestamptz,
        revoked_reason text,
        ip text,
        user_agent text
      )`);
    await q.query(`CREATE INDEX sessions_user_idx ON sessions (user_id) WHERE revoked_at IS NULL`);

    await q.query(`
      CREATE TABLE api_keys (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        name text NOT NULL,
        prefix text NOT NULL UNIQUE,
        secret_hash text NOT NULL,
        scopes text[] NOT NULL,
        expires_at timestamptz,
        revoked_at timestamptz,
        last_used_at timestamptz,
        created_by uuid REFERENCES users(id) ON DELETE SET NULL,
        created_at timestamptz NOT NULL DEFAULT now()
      )`);
    await q.query(`CREATE INDEX api_keys_tenant_idx ON api_keys (tenant_id, created_at, id)`);

    await q.query(`
      CREATE TABLE invitations (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        email text NOT NULL,
        role text NOT NULL CHECK (role IN ('owner', 'developer', 'viewer')),
        token_hash text NOT NULL UNIQUE,
        invited_by uuid REFERENCES users(id) ON DELETE SET NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz NOT NULL,
        accepted_at timestamptz,
        revoked_at timestamptz
      )`);
    await q.query(`CREATE INDEX invitations_tenant_idx ON invitations (tenant_id, created_at, id)`);

    await q.query(`
      CREATE TABLE password_resets (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
        token_hash text NOT NULL UNIQUE,
        created_at timestamptz NOT NULL DEFAULT now(),
        expires_at timestamptz NOT NULL,
        used_at timestamptz
      )`);

    await q.query(`
      CREATE TABLE audit_events (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        tenant_id uuid REFERENCES tenants(id) ON DELETE CASCADE,
        action text NOT NULL,
        actor_user_id uuid,
        actor_api_key_id uuid,
        actor_email text,
        target text,
        ip text,
        details jsonb NOT NULL DEFAULT '{}'::jsonb,
        created_at timestamptz NOT NULL DEFAULT now()
      )`);
    await q.query(`CREATE INDEX audit_events_tenant_idx ON audit_events (tenant_id, created_at DESC, id DESC)`);
    await q.query(`CREATE INDEX audit_events_created_idx ON audit_events (created_at DESC, id DESC)`);

    await q.query(`
      CREATE TABLE outbox_messages (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        received_at timestamptz NOT NULL DEFAULT now(),
        tenant_id uuid REFERENCES tenants(id) ON DELETE SET NULL,
        kind text NOT NULL,
        mail_from text NOT NULL,
        rcpt_to text[] NOT NULL,
        subject text NOT NULL,
        text_body text,
        html_body text,
        message_id text,
        raw text NOT NULL
      )`);
    await q.query(`CREATE INDEX outbox_received_idx ON outbox_messages (received_at DESC, id DESC)`);

    await q.query(`
      CREATE TABLE run_usage (
        run_id uuid PRIMARY KEY,
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        ended_at timestamptz NOT NULL,
        solver_seconds double precision NOT NULL CHECK (solver_seconds >= 0),
        steps integer NOT NULL,
        units integer NOT NULL
      )`);
    await q.query(`CREATE INDEX run_usage_tenant_idx ON run_usage (tenant_id, ended_at)`);

    await q.query(`
      CREATE TABLE quota_notices (
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        period text NOT NULL,
        metric text NOT NULL,
        threshold integer NOT NULL,
        sent_at timestamptz NOT NULL DEFAULT now(),
        PRIMARY KEY (tenant_id, period, metric, threshold)
      )`);

    // rate-limiter-flexible's PostgreSQL store, in its own layout (see its _getCreateTableStmt).
    await q.query(`
      CREATE TABLE rate_limits (
        key varchar(255) PRIMARY KEY,
        points integer NOT NULL DEFAULT 0,
        expire bigint
      )`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of ['rate_limits', 'quota_notices', 'run_usage', 'outbox_messages', 'audit_events', 'password_resets', 'invitations', 'api_keys', 'sessions', 'users', 'tenants', 'plans']) {
      await q.query(`DROP TABLE IF EXISTS ${table}`);
    }
  }
}
