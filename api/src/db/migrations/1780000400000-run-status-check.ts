import { RUN_STATUSES } from '@gridwright/shared/run-result';
import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Replaces the CHECK constraint on `runs.status` with one that admits exactly `statuses`. */
export async function replaceRunStatusCheck(q: QueryRunner, statuses: readonly string[]): Promise<void> {
  const list = statuses.map((s) => `'${s.replaceAll("'", "''")}'`).join(', ');
  await q.query(`ALTER TABLE runs DROP CONSTRAINT runs_status_check, ADD CONSTRAINT runs_status_check CHECK (status IN (${list}))`);
}

/**
 * Makes the `runs.status` constraint from RUN_STATUSES (shared/src/run-result.ts), the list the
 * entity, the transitions, OpenAPI and the console go by. The list is read when the migration
 * runs, and a database runs it once: a change to the list needs a new migration that calls
 * `replaceRunStatusCheck` again.
 */
export class RunStatusCheck1780000400000 implements MigrationInterface {
  name = 'RunStatusCheck1780000400000';

  async up(q: QueryRunner): Promise<void> {
    await replaceRunStatusCheck(q, RUN_STATUSES);
  }

  async down(q: QueryRunner): Promise<void> {
    // The states as 1780000100000-runs wrote them.
    await replaceRunStatusCheck(q, ['queued', 'running', 'succeeded', 'failed', 'cancelled']);
  }
}
