import type { RunStatus } from '@gridwright/shared/run-result';
import type { AppContext } from '../context';
import { Run } from '../db/entities/run';
import { notFound, validationProblem } from '../lib/problem';
import { listDeliveries } from '../services/webhooks';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** A run of another tenant is "not found", never "forbidden": ids leak nothing. */
export async function getRun(ctx: AppContext, tenantId: string, id: string): Promise<Run> {
  const run = UUID.test(id) ? await ctx.db.manager.findOneBy(Run, { id, tenantId }) : null;
  if (!run) throw notFound(`Run ${id}`);
  return run;
}

export interface RunListQuery {
  limit: number;
  cursor?: string;
  status?: RunStatus[];
  createdAfter?: string;
  createdBefore?: string;
}

interface Cursor {
  createdAt: string;
  id: string;
}

function decodeCursor(cursor: string): Cursor {
  try {
    const c = JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8'));
    if (typeof c.createdAt === 'string' && typeof c.id === 'string' && UUID.test(c.id) && !Number.isNaN(Date.parse(c.createdAt))) return c;
  } catch {
    // fall through to the problem below
  }
  throw validationProblem([{ pointer: '', message: 'query parameter cursor: not a cursor this API issued' }]);
}

const encodeCursor = (c: Cursor) => Buffer.from(JSON.stringify(c)).toString('base64url');

/** Newest first; keyset pagination on (created_at, id) so pages stay stable while runs arrive. */
export async function listRuns(ctx: AppContext, tenantId: string, q: RunListQuery): Promise<{ runs: Run[]; nextCursor: string | null }> {
  const where = ['r.tenant_id = :tenantId'];
  const params: Record<string, unknown> = { tenantId };
  if (q.status?.length) {
    where.push('r.status IN (:...status)');
    params.status = q.status;
  }
  if (q.createdAfter) {
    where.push('r.created_at >= :createdAfter');
    params.createdAfter = q.createdAfter;
  }
  if (q.createdBefore) {
    where.push('r.created_at < :createdBefore');
    params.createdBefore = q.createdBefore;
  }
  if (q.cursor) {
    const c = decodeCursor(q.cursor);
    where.push('(r.created_at, r.id) < (:cursorAt::timestamptz, :cursorId::uuid)');
    params.cursorAt = c.createdAt;
    params.cursorId = c.id;
  }
  const rows = await ctx.db.manager
    .createQueryBuilder(Run, 'r')
    .addSelect('r.created_at::text', 'created_exact')
    .where(where.join(' AND '), params)
    .orderBy('r.created_at', 'DESC')
    .addOrderBy('r.id', 'DESC')
    .limit(q.limit + 1)
    .getRawAndEntities();
  const runs = rows.entities.slice(0, q.limit);
  const last = runs.at(-1);
  const lastRaw = rows.raw[runs.length - 1];
  const nextCursor = rows.entities.length > q.limit && last ? encodeCursor({ createdAt: lastRaw.created_exact, id: last.id }) : null;
  return { runs, nextCursor };
}

/** The webhook deliveries of a run the tenant can see. */
export async function listRunDeliveries(ctx: AppContext, tenantId: string, id: string) {
  const run = await getRun(ctx, tenantId, id);
  return listDeliveries(ctx, { tenantId: run.tenantId, runId: run.id });
}
