import type { MigrationInterface, QueryRunner } from 'typeorm';

/** The channel every API process listens on to drop the views of runs it keeps (api/src/runs/run-view-cache.ts). */
export const RUN_CHANGES_CHANNEL = 'run_changes';

/**
 * Triggers that announce, on commit, a change to anything `GET /v1/runs/{id}` shows of a run, and
 * a deleted run, whatever made it (a worker's transition, a cancel, plain SQL). The heartbeat that
 * every running attempt writes twice a second changes none of these columns, so it announces nothing.
 */
export class RunChangeNotices1780000780000 implements MigrationInterface {
  name = 'RunChangeNotices1780000780000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE FUNCTION notify_run_change() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        PERFORM pg_notify('${RUN_CHANGES_CHANNEL}', json_build_object('tenantId', OLD.tenant_id, 'id', OLD.id)::text);
        RETURN NULL;
      END $$`);
    await q.query(`
      CREATE TRIGGER runs_view_change AFTER UPDATE ON runs FOR EACH ROW
        WHEN ((OLD.tenant_id, OLD.created_at, OLD.status, OLD.outcome, OLD.name, OLD.steps, OLD.units, OLD.started_at, OLD.finished_at,
               OLD.cancel_requested_at, OLD.windows_done, OLD.windows_total, OLD.attempts, OLD.result, OLD.error, OLD.solver_seconds,
               OLD.parent_run_id, OLD.root_run_id, OLD.replan_from_step, OLD.root_step, OLD.study_id, OLD.study_position)
              IS DISTINCT FROM
              (NEW.tenant_id, NEW.created_at, NEW.status, NEW.outcome, NEW.name, NEW.steps, NEW.units, NEW.started_at, NEW.finished_at,
               NEW.cancel_requested_at, NEW.windows_done, NEW.windows_total, NEW.attempts, NEW.result, NEW.error, NEW.solver_seconds,
               NEW.parent_run_id, NEW.root_run_id, NEW.replan_from_step, NEW.root_step, NEW.study_id, NEW.study_position))
        EXECUTE FUNCTION notify_run_change()`);
    await q.query(`CREATE TRIGGER runs_deleted AFTER DELETE ON runs FOR EACH ROW EXECUTE FUNCTION notify_run_change()`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TRIGGER runs_deleted ON runs');
    await q.query('DROP TRIGGER runs_view_change ON runs');
    await q.query('DROP FUNCTION notify_run_change()');
  }
}
