import { RUN_STATUSES, type RunStatus } from '@gridwright/shared/run-result';
import type { AppContext } from '../context';
import { Run } from '../db/entities/run';
import { pgPoolOf } from '../db/pg-pool';
import { pageNewestFirst } from '../lib/pagination';
import { notFound } from '../lib/problem';
import { isUuid } from '../lib/uuid';
import { listDeliveries } from '../services/webhooks';
import { runViewCacheFor, type RunViewText } from './run-view-cache';
import { RUN_TRANSITIONS } from './states';
import { runDetail, type RunForView } from './view';

/** A run of another tenant is "not found", never "forbidden": ids leak nothing. */
export async function getRun(ctx: AppContext, tenantId: string, id: string): Promise<Run> {
  const run = isUuid(id) ? await ctx.db.manager.findOneBy(Run, { id, tenantId }) : null;
  if (!run) throw notFound(`Run ${id}`);
  return run;
}

/**
 * What `GET /v1/runs/{id}` reads of a run: the columns the view shows, without the spec and the
 * solver log. The change notices of migration 1780000780000 watch the same columns.
 */
export const RUN_FOR_VIEW_SQL = `SELECT id, tenant_id AS "tenantId", created_at AS "createdAt", status, outcome, name, steps, units,
       started_at AS "startedAt", finished_at AS "finishedAt", cancel_requested_at AS "cancelRequestedAt",
       windows_done AS "windowsDone", windows_total AS "windowsTotal", attempts, result, error, solver_seconds AS "solverSeconds",
       parent_run_id AS "parentRunId", root_run_id AS "rootRunId", replan_from_step AS "replanFromStep", root_step AS "rootStep",
       study_id AS "studyId", study_position AS "studyPosition"
  FROM runs WHERE id = $1 AND tenant_id = $2`;

/** `getRun` for the route clients poll: one prepared statement, without the ORM's mapping. */
async function getRunForView(ctx: AppContext, tenantId: string, id: string): Promise<RunForView> {
  const { rows } = isUuid(id) ? await pgPoolOf(ctx.db).query<RunForView>({ name: 'run-for-view', text: RUN_FOR_VIEW_SQL, values: [id, tenantId] }) : { rows: [] };
  if (!rows[0]) throw notFound(`Run ${id}`);
  return rows[0];
}

/** The states no transition leaves: a run in one has its final row, so its view never changes. */
const FINAL_STATUSES: ReadonlySet<RunStatus> = new Set(RUN_STATUSES.filter((s) => !Object.values(RUN_TRANSITIONS).some((move) => (move.from as readonly RunStatus[]).includes(s))));

/**
 * The run's view (`runDetail`) as JSON text, with its ETag made by `etagOf` (the app's own ETag
 * function, so an answer is the same whether it was kept or not). Polling clients read a run again
 * and again, so the process keeps what it made (run-view-cache.ts): a finished run's large schedule
 * is neither read from PostgreSQL nor serialised again, and a queued or running run is read once
 * per change (and at least every RUN_CACHE_SECONDS), not once per poll.
 */
export async function getRunDetailText(
  ctx: AppContext,
  tenantId: string,
  id: string,
  etagOf?: (json: string, encoding: 'utf8') => string,
): Promise<RunViewText> {
  const views = runViewCacheFor(ctx);
  const kept = views.get(tenantId, id);
  if (kept) return kept;
  const readStarted = views.readStarted();
  const run = await getRunForView(ctx, tenantId, id);
  const json = JSON.stringify(runDetail(run));
  const view: RunViewText = { json, final: FINAL_STATUSES.has(run.status), ...(etagOf ? { etag: etagOf(json, 'utf8') } : {}) };
  views.keep(tenantId, id, view, readStarted);
  return view;
}

export interface RunListQuery {
  limit: number;
  cursor?: string;
  status?: RunStatus[];
  createdAfter?: Date;
  createdBefore?: Date;
}

/** Newest first; keyset pagination on (created_at, id) so pages stay stable while runs arrive. */
export async function listRuns(ctx: AppContext, tenantId: string, q: RunListQuery): Promise<{ runs: Run[]; nextCursor: string | null }> {
  const qb = ctx.db.manager.createQueryBuilder(Run, 'r').where('r.tenant_id = :tenantId', { tenantId });
  if (q.status?.length) qb.andWhere('r.status IN (:...status)', { status: q.status });
  if (q.createdAfter) qb.andWhere('r.created_at >= :createdAfter', { createdAfter: q.createdAfter });
  if (q.createdBefore) qb.andWhere('r.created_at < :createdBefore', { createdBefore: q.createdBefore });
  const { items, nextCursor } = await pageNewestFirst(qb, { cursor: q.cursor, limit: q.limit });
  return { runs: items, nextCursor };
}

/** The webhook deliveries of a run the tenant can see. */
export async function listRunDeliveries(ctx: AppContext, tenantId: string, id: string) {
  const run = await getRun(ctx, tenantId, id);
  return listDeliveries(ctx, { tenantId: run.tenantId, runId: run.id });
}
