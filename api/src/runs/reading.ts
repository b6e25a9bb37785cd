import { RUN_STATUSES, type RunStatus } from '@gridwright/shared/run-result';
import { LRUCache } from 'lru-cache';
import type { DataSource } from 'typeorm';
import type { AppContext } from '../context';
import { Run } from '../db/entities/run';
import { pgPoolOf } from '../db/pg-pool';
import { pageNewestFirst } from '../lib/pagination';
import { notFound } from '../lib/problem';
import { isUuid } from '../lib/uuid';
import { listDeliveries } from '../services/webhooks';
import { RUN_TRANSITIONS } from './states';
import { runDetail, type RunForView } from './view';

/** A run of another tenant is "not found", never "forbidden": ids leak nothing. */
export async function getRun(ctx: AppContext, tenantId: string, id: string): Promise<Run> {
  const run = isUuid(id) ? await ctx.db.manager.findOneBy(Run, { id, tenantId }) : null;
  if (!run) throw notFound(`Run ${id}`);
  return run;
}

/**
 * `getRun` for `GET /v1/runs/{id}`, the route clients poll: one prepared statement for the columns
 * the view shows, without the spec and the solver log and without the ORM's mapping.
 */
async function getRunForView(ctx: AppContext, tenantId: string, id: string): Promise<RunForView> {
  const { rows } = isUuid(id)
    ? await pgPoolOf(ctx.db).query<RunForView>({
        name: 'run-for-view',
        text: `SELECT id, tenant_id AS "tenantId", created_at AS "createdAt", status, outcome, name, steps, units,
                      started_at AS "startedAt", finished_at AS "finishedAt", cancel_requested_at AS "cancelRequestedAt",
                      windows_done AS "windowsDone", windows_total AS "windowsTotal", attempts, result, error, solver_seconds AS "solverSeconds"
                 FROM runs WHERE id = $1 AND tenant_id = $2`,
        values: [id, tenantId],
      })
    : { rows: [] };
  if (!rows[0]) throw notFound(`Run ${id}`);
  return rows[0];
}

/** The states no transition leaves: a run in one has its final row, so its view never changes. */
const FINAL_STATUSES: ReadonlySet<RunStatus> = new Set(RUN_STATUSES.filter((s) => !Object.values(RUN_TRANSITIONS).some((move) => (move.from as readonly RunStatus[]).includes(s))));

/** Bytes of finished runs' views one process keeps; a view larger than a sixteenth of it is not kept. */
const FINISHED_VIEWS_BYTES = 64 * 2 ** 20;

const finishedViews = new WeakMap<DataSource, LRUCache<string, string>>();

function finishedViewsOf(db: DataSource): LRUCache<string, string> {
  let views = finishedViews.get(db);
  if (!views) {
    views = new LRUCache({ maxSize: FINISHED_VIEWS_BYTES, maxEntrySize: FINISHED_VIEWS_BYTES / 16, sizeCalculation: (json) => json.length });
    finishedViews.set(db, views);
  }
  return views;
}

/**
 * The run's view (`runDetail`) as JSON text. A finished run's row is final, so its text is made
 * once and kept by this process: polling clients read results again and again, and a large
 * schedule is neither read from PostgreSQL nor serialised again. Another process makes its own
 * copy from the same final row, so nothing kept here can differ between processes.
 */
export async function getRunDetailJson(ctx: AppContext, tenantId: string, id: string): Promise<string> {
  const views = finishedViewsOf(ctx.db);
  const key = `${tenantId}/${id}`;
  const kept = views.get(key);
  if (kept !== undefined) return kept;
  const run = await getRunForView(ctx, tenantId, id);
  const json = JSON.stringify(runDetail(run));
  if (FINAL_STATUSES.has(run.status)) views.set(key, json);
  return json;
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
