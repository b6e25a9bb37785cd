import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Uploaded time series (availability exported from a SCADA or historian), resampled to a fixed step. */
export class Series1780000300000 implements MigrationInterface {
  name = 'Series1780000300000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE series (
        id text PRIMARY KEY DEFAULT 'ser_' || replace(gen_random_uuid()::text, '-', ''),
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        name text NOT NULL,
        source_filename text,
        source_column text NOT NULL,
        source_unit text NOT NULL,
        start timestamptz NOT NULL,
        start_offset text NOT NULL,
        step_minutes integer NOT NULL,
        steps integer NOT NULL,
        values_kw jsonb NOT NULL,
        source_rows integer NOT NULL,
        filled jsonb NOT NULL DEFAULT '[]',
        fill_policy text NOT NULL
      )`);
    await q.query(`CREATE INDEX series_tenant_created ON series (tenant_id, created_at DESC, id DESC)`);
    await q.query(`ALTER TABLE runs ADD CONSTRAINT runs_series_fk FOREIGN KEY (series_id) REFERENCES series(id) ON DELETE SET NULL`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('ALTER TABLE runs DROP CONSTRAINT runs_series_fk');
    await q.query('DROP TABLE series');
  }
}
