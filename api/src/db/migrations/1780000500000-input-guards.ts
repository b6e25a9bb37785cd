import { MAX_POWER, MAX_STEPS, MIN_POWER, STEP_MINUTES } from '@gridwright/shared/site-spec';
import type { MigrationInterface, QueryRunner } from 'typeorm';
import { CSV_DELIMITERS } from '../../lib/csv-delimiters';
import { LIMIT_NAMES, LIMIT_RANGES, type LimitRange } from '../../lib/limit-ranges';
import { SCOPES } from '../../lib/roles-and-scopes';

const text = (value: string) => `'${value.replaceAll("'", "''")}'`;
const textArray = (values: readonly string[]) => `ARRAY[${values.map(text).join(', ')}]::text[]`;

/** One override in its range; the CASE keeps the numeric cast away from a value that is no number. */
function overrideInRange(name: string, range: LimitRange): string {
  const value = `(limit_overrides -> ${text(name)})`;
  const number = `${value}::numeric`;
  const checks = [`${number} ${range.exclusiveMin ? '>' : '>='} ${range.min}`, `${number} <= ${range.max}`, ...(range.integer ? [`${number} % 1 = 0`] : [])];
  return `(NOT limit_overrides ? ${text(name)} OR CASE WHEN jsonb_typeof(${value}) = 'number' THEN ${checks.join(' AND ')} ELSE false END)`;
}

const overridesValid = (ranges: Record<string, LimitRange>) => `CASE WHEN jsonb_typeof(limit_overrides) = 'object'
  THEN (limit_overrides - ${textArray(Object.keys(ranges))}) = '{}'::jsonb AND ${Object.entries(ranges).map(([name, range]) => overrideInRange(name, range)).join(' AND ')}
  ELSE false END`;

/**
 * Replaces the CHECK on `tenants.limit_overrides` with one that admits exactly `ranges`. A database
 * runs a migration once, so a limit added to LIMIT_RANGES needs a new migration that calls this.
 */
export async function replaceLimitOverridesCheck(q: QueryRunner, ranges: Record<string, LimitRange>): Promise<void> {
  await q.query(`ALTER TABLE tenants DROP CONSTRAINT IF EXISTS tenants_limit_overrides_check, ADD CONSTRAINT tenants_limit_overrides_check CHECK (${overridesValid(ranges)})`);
}

const SCOPES_VALID = `scopes <@ ${textArray(SCOPES)} AND (cardinality(scopes) > 0 OR revoked_at IS NOT NULL)`;

// The contract's limits on a power per step (shared/src/site-spec.ts), as the series upload applies them.
const SERIES_VALUES_VALID = `jsonb_typeof(values_kw) = 'array' AND jsonb_array_length(values_kw) = steps
  AND NOT jsonb_path_exists(values_kw, '$[*] ? (@.type() != "number" || @ < 0 || @ > ${MAX_POWER} || (@ > 0 && @ < ${MIN_POWER}))')`;

/**
 * The database refuses what the services are meant to refuse, so a request that slips past them
 * (as requests did under another spelling of a route) stops here instead of landing:
 * - privileges: a key's scopes are known ones; a tenant's limit overrides are known limits, each a
 *   number in its range (the ranges of api/src/lib/limit-ranges.ts, read when this runs: a limit
 *   added later needs a migration that calls `replaceLimitOverridesCheck`);
 * - references stay inside one tenant: a run's series, a delivery's endpoint and run, and an
 *   Idempotency-Key's run all belong to the row's own tenant (composite foreign keys);
 * - content: export profiles, webhook endpoints, series and runs hold only values their services write.
 *
 * Planted privileges are cleaned first: unknown scopes are dropped and their keys revoked; overrides
 * that are unknown or out of range are removed. The other constraints are added NOT VALID — every
 * new or changed row is checked, rows already stored are not; `ALTER TABLE … VALIDATE CONSTRAINT …`
 * checks them once reviewed.
 */
export class InputGuards1780000500000 implements MigrationInterface {
  name = 'InputGuards1780000500000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      UPDATE api_keys SET scopes = ARRAY(SELECT s FROM unnest(scopes) s WHERE s = ANY(${textArray(SCOPES)})), revoked_at = coalesce(revoked_at, now())
      WHERE NOT (scopes <@ ${textArray(SCOPES)})`);
    await q.query(`UPDATE api_keys SET revoked_at = now() WHERE cardinality(scopes) = 0 AND revoked_at IS NULL`);
    await q.query(`ALTER TABLE api_keys ADD CONSTRAINT api_keys_scopes_check CHECK (${SCOPES_VALID})`);

    await q.query(`UPDATE tenants SET limit_overrides = '{}'::jsonb WHERE jsonb_typeof(limit_overrides) <> 'object'`);
    await q.query(`UPDATE tenants SET limit_overrides = jsonb_strip_nulls(jsonb_build_object(${LIMIT_NAMES.map(
      (name) => `${text(name)}, CASE WHEN ${overrideInRange(name, LIMIT_RANGES[name])} THEN limit_overrides -> ${text(name)} END`,
    ).join(', ')})) WHERE NOT (${overridesValid(LIMIT_RANGES)})`);
    await replaceLimitOverridesCheck(q, LIMIT_RANGES);

    await q.query(`ALTER TABLE series ADD CONSTRAINT series_id_tenant_key UNIQUE (id, tenant_id)`);
    await q.query(`ALTER TABLE runs ADD CONSTRAINT runs_id_tenant_key UNIQUE (id, tenant_id)`);
    await q.query(`ALTER TABLE webhook_endpoints ADD CONSTRAINT webhook_endpoints_id_tenant_key UNIQUE (id, tenant_id)`);
    await q.query(`ALTER TABLE runs ADD CONSTRAINT runs_series_same_tenant_fk FOREIGN KEY (series_id, tenant_id) REFERENCES series (id, tenant_id) NOT VALID`);
    await q.query(`
      ALTER TABLE webhook_deliveries
        ADD CONSTRAINT webhook_deliveries_endpoint_same_tenant_fk FOREIGN KEY (endpoint_id, tenant_id) REFERENCES webhook_endpoints (id, tenant_id) ON DELETE CASCADE NOT VALID,
        ADD CONSTRAINT webhook_deliveries_run_same_tenant_fk FOREIGN KEY (run_id, tenant_id) REFERENCES runs (id, tenant_id) ON DELETE CASCADE NOT VALID`);
    await q.query(`ALTER TABLE idempotency_keys ADD CONSTRAINT idempotency_keys_run_same_tenant_fk FOREIGN KEY (run_id, tenant_id) REFERENCES runs (id, tenant_id) ON DELETE CASCADE NOT VALID`);

    await q.query(`
      ALTER TABLE export_profiles
        ADD CONSTRAINT export_profiles_delimiter_check CHECK (delimiter IN (${CSV_DELIMITERS.map(text).join(', ')})) NOT VALID,
        ADD CONSTRAINT export_profiles_tag_map_check CHECK (jsonb_typeof(tag_map) = 'object' AND NOT jsonb_path_exists(tag_map, '$.* ? (@.type() != "string")')) NOT VALID,
        ADD CONSTRAINT export_profiles_name_check CHECK (length(name) BETWEEN 1 AND 100) NOT VALID`);
    await q.query(`
      ALTER TABLE webhook_endpoints
        ADD CONSTRAINT webhook_endpoints_events_check CHECK (cardinality(events) > 0 AND events <@ ${textArray(['run.succeeded', 'run.failed', 'run.cancelled'])}) NOT VALID,
        ADD CONSTRAINT webhook_endpoints_url_check CHECK (url ~ '^https?://') NOT VALID,
        ADD CONSTRAINT webhook_endpoints_failures_check CHECK (consecutive_failures >= 0) NOT VALID`);
    await q.query(`
      ALTER TABLE series
        ADD CONSTRAINT series_step_minutes_check CHECK (step_minutes IN (${STEP_MINUTES.join(', ')})) NOT VALID,
        ADD CONSTRAINT series_steps_check CHECK (steps BETWEEN 1 AND ${MAX_STEPS}) NOT VALID,
        ADD CONSTRAINT series_values_check CHECK (${SERIES_VALUES_VALID}) NOT VALID`);
    await q.query(`
      ALTER TABLE runs
        ADD CONSTRAINT runs_size_check CHECK (steps BETWEEN 1 AND ${MAX_STEPS} AND units >= 0 AND time_limit_seconds > 0) NOT VALID,
        ADD CONSTRAINT runs_counters_check CHECK (attempts >= 0 AND windows_done >= 0) NOT VALID`);
  }

  async down(q: QueryRunner): Promise<void> {
    // Cleaned scopes and overrides stay cleaned: they were never the service's to store.
    await q.query(`ALTER TABLE runs DROP CONSTRAINT runs_counters_check, DROP CONSTRAINT runs_size_check`);
    await q.query(`ALTER TABLE series DROP CONSTRAINT series_values_check, DROP CONSTRAINT series_steps_check, DROP CONSTRAINT series_step_minutes_check`);
    await q.query(`ALTER TABLE webhook_endpoints DROP CONSTRAINT webhook_endpoints_failures_check, DROP CONSTRAINT webhook_endpoints_url_check, DROP CONSTRAINT webhook_endpoints_events_check`);
    await q.query(`ALTER TABLE export_profiles DROP CONSTRAINT export_profiles_name_check, DROP CONSTRAINT export_profiles_tag_map_check, DROP CONSTRAINT export_profiles_delimiter_check`);
    await q.query(`ALTER TABLE idempotency_keys DROP CONSTRAINT idempotency_keys_run_same_tenant_fk`);
    await q.query(`ALTER TABLE webhook_deliveries DROP CONSTRAINT webhook_deliveries_run_same_tenant_fk, DROP CONSTRAINT webhook_deliveries_endpoint_same_tenant_fk`);
    await q.query(`ALTER TABLE runs DROP CONSTRAINT runs_series_same_tenant_fk`);
    await q.query(`ALTER TABLE webhook_endpoints DROP CONSTRAINT webhook_endpoints_id_tenant_key`);
    await q.query(`ALTER TABLE runs DROP CONSTRAINT runs_id_tenant_key`);
    await q.query(`ALTER TABLE series DROP CONSTRAINT series_id_tenant_key`);
    await q.query(`ALTER TABLE tenants DROP CONSTRAINT tenants_limit_overrides_check`);
    await q.query(`ALTER TABLE api_keys DROP CONSTRAINT api_keys_scopes_check`);
  }
}
