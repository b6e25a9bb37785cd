import type { RunStatus } from '@gridwright/shared/run-result';
import type { AppContext } from '../context';
import { Run } from '../db/entities/run';
import { pageNewestFirst } from '../lib/pagination';
import { notFound } from '../lib/problem';
import { isUuid } from '../lib/uuid';
import { listDeliveries } from '../services/webhooks';

/** A run of another tenant is "not found", never "forbidden": ids leak nothing. */
export async function getRun(ctx: AppContext, tenantId: string, id: string): Promise<Run> {
  const run = isUuid(id) ? await ctx.db.manager.findOneBy(Run, { id, tenantId }) : null;
  if (!run) throw notFound(`Run ${id}`);
  return run;
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
