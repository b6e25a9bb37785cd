import type { StudyView } from '@gridwright/shared/studies';
import type { AppContext } from '../context';
import { stopRun } from '../runs/cancellation';
import { getStudy, getStudyRow } from './reading';

/**
 * Cancels a study in one transaction: its queued runs are cancelled at once (their jobs leave the
 * queue) and its running runs are flagged for their workers to stop; runs that have ended keep
 * their results. Cancelling again changes nothing.
 */
export async function cancelStudy(ctx: AppContext, tenantId: string, id: string): Promise<StudyView> {
  const study = await getStudyRow(ctx, tenantId, id);
  await ctx.db.transaction(async (manager) => {
    await manager.query('UPDATE studies SET cancel_requested_at = coalesce(cancel_requested_at, now()) WHERE id = $1', [study.id]);
    const active: { id: string }[] = await manager.query(
      `SELECT id FROM runs WHERE tenant_id = $1 AND study_id = $2 AND status IN ('queued', 'running') ORDER BY study_position`,
      [tenantId, study.id],
    );
    for (const run of active) await stopRun(ctx, manager, run.id);
  });
  return getStudy(ctx, tenantId, id);
}
