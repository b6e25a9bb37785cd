import { STUDY_MAX_CHANGES, STUDY_MAX_RUNS } from '@gridwright/shared/studies';
import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Re-plans and studies, both made of ordinary runs:
 *
 * - a re-plan names its parent run, the first run of its chain (`root_run_id`), the step of the
 *   parent's horizon it starts at and the same step in the root's horizon; they are set together
 *   or not at all, and parent and root belong to the run's own tenant;
 * - a study holds its base spec and its grid of changes; each of its runs names it and its place
 *   in the grid, once per place, inside the run's own tenant. The limits are the service's
 *   (shared/src/studies.ts), read when this runs: changing them needs a new migration.
 */
export class RevisionsAndStudies1780000770000 implements MigrationInterface {
  name = 'RevisionsAndStudies1780000770000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      ALTER TABLE runs
        ADD COLUMN parent_run_id uuid,
        ADD COLUMN root_run_id uuid,
        ADD COLUMN replan_from_step integer CHECK (replan_from_step >= 0),
        ADD COLUMN root_step integer NOT NULL DEFAULT 0 CHECK (root_step >= 0),
        ADD CONSTRAINT runs_revision_complete CHECK (
          (parent_run_id IS NULL AND root_run_id IS NULL AND replan_from_step IS NULL AND root_step = 0)
          OR (parent_run_id IS NOT NULL AND root_run_id IS NOT NULL AND replan_from_step IS NOT NULL)),
        ADD CONSTRAINT runs_parent_same_tenant_fk FOREIGN KEY (parent_run_id, tenant_id) REFERENCES runs (id, tenant_id) ON DELETE CASCADE,
        ADD CONSTRAINT runs_root_same_tenant_fk FOREIGN KEY (root_run_id, tenant_id) REFERENCES runs (id, tenant_id) ON DELETE CASCADE`);
    await q.query(`CREATE INDEX runs_root ON runs (root_run_id) WHERE root_run_id IS NOT NULL`);

    await q.query(`
      CREATE TABLE studies (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        tenant_id uuid NOT NULL REFERENCES tenants(id) ON DELETE CASCADE,
        created_at timestamptz NOT NULL DEFAULT now(),
        name text CHECK (char_length(name) <= 200),
        base_spec jsonb NOT NULL,
        changes jsonb NOT NULL CHECK (jsonb_typeof(changes) = 'array' AND jsonb_array_length(changes) BETWEEN 1 AND ${STUDY_MAX_CHANGES}),
        runs_total integer NOT NULL CHECK (runs_total BETWEEN 1 AND ${STUDY_MAX_RUNS}),
        created_by_user_id uuid,
        created_by_api_key_id uuid,
        cancel_requested_at timestamptz,
        UNIQUE (id, tenant_id)
      )`);
    await q.query(`CREATE INDEX studies_tenant_created ON studies (tenant_id, created_at DESC, id DESC)`);
    await q.query(`
      ALTER TABLE runs
        ADD COLUMN study_id uuid,
        ADD COLUMN study_position integer CHECK (study_position >= 0),
        ADD CONSTRAINT runs_study_complete CHECK ((study_id IS NULL) = (study_position IS NULL)),
        ADD CONSTRAINT runs_study_same_tenant_fk FOREIGN KEY (study_id, tenant_id) REFERENCES studies (id, tenant_id) ON DELETE CASCADE,
        ADD CONSTRAINT runs_study_position_key UNIQUE (study_id, study_position)`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query(`
      ALTER TABLE runs
        DROP CONSTRAINT runs_study_position_key, DROP CONSTRAINT runs_study_same_tenant_fk, DROP CONSTRAINT runs_study_complete,
        DROP COLUMN study_position, DROP COLUMN study_id`);
    await q.query('DROP TABLE studies');
    await q.query('DROP INDEX runs_root');
    await q.query(`
      ALTER TABLE runs
        DROP CONSTRAINT runs_root_same_tenant_fk, DROP CONSTRAINT runs_parent_same_tenant_fk, DROP CONSTRAINT runs_revision_complete,
        DROP COLUMN root_step, DROP COLUMN replan_from_step, DROP COLUMN root_run_id, DROP COLUMN parent_run_id`);
  }
}
