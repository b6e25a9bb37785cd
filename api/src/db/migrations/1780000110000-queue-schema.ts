import PgBoss from 'pg-boss';
import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * pg-boss's own schema, created here so every database (and every test clone) has it before a
 * process starts; pg-boss would otherwise create it on first start, racing between workers.
 */
export class QueueSchema1780000110000 implements MigrationInterface {
  name = 'QueueSchema1780000110000';

  async up(q: QueryRunner): Promise<void> {
    // The plan wraps itself in BEGIN/COMMIT; it runs inside the migration's transaction instead.
    const plan = PgBoss.getConstructionPlans('pgboss').trim().replace(/^BEGIN;/, '').replace(/COMMIT;$/, '');
    await q.query(plan);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP SCHEMA pgboss CASCADE');
  }
}
