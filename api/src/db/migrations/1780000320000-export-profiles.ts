import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Named CSV export settings per tenant (unit, timestamp style, delimiter, SCADA tag map). */
export class ExportProfiles1780000320000 implements MigrationInterface {
  name = 'ExportProfiles1780000320000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE export_profiles (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now(),
        name text NOT NULL,
        power_unit text NOT NULL DEFAULT 'kW' CHECK (power_unit IN ('kW', 'MW')),
        timestamps text NOT NULL DEFAULT 'utc' CHECK (timestamps IN ('utc', 'offset')),
        delimiter text NOT NULL DEFAULT ',',
        tag_map jsonb NOT NULL DEFAULT '{}',
        UNIQUE (tenant_id, name)
      )`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE export_profiles');
  }
}
