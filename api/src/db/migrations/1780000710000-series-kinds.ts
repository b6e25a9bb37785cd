import type { MigrationInterface, QueryRunner } from 'typeorm';
import { MAX_POWER, MAX_PRICE, MIN_POWER, MIN_PRICE } from '@gridwright/shared/site-spec';
import { PRICE_UNIT, SERIES_KINDS, SERIES_ROLES } from '@gridwright/shared/series-roles';

const list = (values: readonly string[]) => values.map((v) => `'${v}'`).join(', ');

// The contract's limits on each kind of per-step figure (shared/src/site-spec.ts): powers and rates
// are 0 or in [MIN_POWER, MAX_POWER]; prices 0 or of a size in [MIN_PRICE, MAX_PRICE], either sign.
const NON_NEGATIVE = `$[*] ? (@.type() != "number" || @ < 0 || @ > ${MAX_POWER} || (@ > 0 && @ < ${MIN_POWER}))`;
const PRICE = `$[*] ? (@.type() != "number" || @ < -${MAX_PRICE} || @ > ${MAX_PRICE} || (@ != 0 && @ > -${MIN_PRICE.toFixed(9)} && @ < ${MIN_PRICE.toFixed(9)}))`;

/**
 * A series is a power, a price or a product rate (shared/src/series-roles.ts), so its values are
 * no longer only kW: `values_kw` becomes `step_values`, in the series' `unit`. A series also keeps
 * the IANA zone its file was read in (offered as `horizon.timeZone`), the upload it came from and its
 * place in the file (the columns of one file belong together, in order) and the role its header suggests. Rows stored before were
 * all powers in kW, each its own upload.
 */
export class SeriesKinds1780000710000 implements MigrationInterface {
  name = 'SeriesKinds1780000710000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE series RENAME COLUMN values_kw TO step_values`);
    await q.query(`
      ALTER TABLE series
        ADD COLUMN kind text NOT NULL DEFAULT 'power',
        ADD COLUMN unit text NOT NULL DEFAULT 'kW',
        ADD COLUMN time_zone text,
        ADD COLUMN upload_id uuid,
        ADD COLUMN column_index integer CHECK (column_index >= 0),
        ADD COLUMN suggested_role text`);
    await q.query(`ALTER TABLE series DROP CONSTRAINT series_values_check`);
    await q.query(`
      ALTER TABLE series
        ADD CONSTRAINT series_kind_check CHECK (
          kind IN (${list(SERIES_KINDS)})
          AND (kind <> 'power' OR unit = 'kW') AND (kind <> 'price' OR unit = '${PRICE_UNIT}')
          AND char_length(unit) BETWEEN 1 AND 32),
        ADD CONSTRAINT series_suggested_role_check CHECK (suggested_role IS NULL OR suggested_role IN (${list(SERIES_ROLES)})),
        ADD CONSTRAINT series_time_zone_check CHECK (time_zone IS NULL OR char_length(time_zone) BETWEEN 1 AND 64),
        ADD CONSTRAINT series_values_check CHECK (
          jsonb_typeof(step_values) = 'array' AND jsonb_array_length(step_values) = steps
          AND NOT jsonb_path_exists(step_values, CASE WHEN kind = 'price' THEN '${PRICE}' ELSE '${NON_NEGATIVE}' END::jsonpath)) NOT VALID`);
    await q.query(`CREATE INDEX series_tenant_upload ON series (tenant_id, upload_id)`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`DELETE FROM series WHERE kind <> 'power'`);
    await q.query(`DROP INDEX series_tenant_upload`);
    await q.query(`
      ALTER TABLE series
        DROP CONSTRAINT series_values_check, DROP CONSTRAINT series_time_zone_check,
        DROP CONSTRAINT series_suggested_role_check, DROP CONSTRAINT series_kind_check`);
    await q.query(`ALTER TABLE series DROP COLUMN suggested_role, DROP COLUMN column_index, DROP COLUMN upload_id, DROP COLUMN time_zone, DROP COLUMN unit, DROP COLUMN kind`);
    await q.query(`ALTER TABLE series RENAME COLUMN step_values TO values_kw`);
    await q.query(`
      ALTER TABLE series ADD CONSTRAINT series_values_check CHECK (
        jsonb_typeof(values_kw) = 'array' AND jsonb_array_length(values_kw) = steps
        AND NOT jsonb_path_exists(values_kw, '${NON_NEGATIVE}')) NOT VALID`);
  }
}
