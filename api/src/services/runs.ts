import type { ResolvedSiteSpec, ValidSiteSpec } from '@gridwright/shared/site-spec';
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { Run, type RunStatus } from '../db/entities/run';
import { HttpProblem, notFound, validationProblem } from '../lib/problem';
import { bindIdempotencyKey, bodyFingerprint, claimIdempotencyKey } from './idempotency';
import { assertRunAllowed } from './quotas';
import { enqueueRun } from './run-queue';
import { resolveRequestSpec } from './resolve-site-spec';
import { enqueueRunEvent } from './webhooks';

export interface RunActor {
  tenantId: string;
  userId?: string;
  apiKeyId?: string;
}

export const TERMINAL_STATUSES: readonly RunStatus[] = ['succeeded', 'failed', 'cancelled'];

/**
 * Accepts a spec: one transaction inserts the run, its queue job and (with a key) the
 * Idempotency-Key record, so an accepted run is never lost and never created twice.
 */
export async function submitRun(
  ctx: AppContext,
  actor: RunActor,
  body: unknown,
  idempotencyKey: string | null,
): Promise<{ run: Run; replayed: boolean }> {
  const checked = await resolveRequestSpec(ctx.db.manager, actor.tenantId, body);
  return ctx.db.transaction(async (manager) => {
    if (idempotencyKey) {
      const claim = await claimIdempotencyKey(manager, {
        tenantId: actor.tenantId,
        key: idempotencyKey,
        fingerprint: bodyFingerprint(body),
        hours: ctx.config.idempotencyHours,
      });
      if (!claim.fresh) return { run: await manager.findOneByOrFail(Run, { id: claim.runId }), replayed: true };
    }
    await assertRunAllowed(ctx, manager, actor.tenantId, { steps: checked.resolved.horizon.steps, units: checked.resolved.units.length });
    const run = await insertRun(manager, actor, body, checked);
    if (idempotencyKey) await bindIdempotencyKey(manager, { tenantId: actor.tenantId, key: idempotencyKey, runId: run.id });
    await enqueueRun(ctx, manager, run);
    return { run, replayed: false };
  });
}

/** The run keeps the spec as submitted (what `GET /v1/runs/{id}/spec` returns); the worker resolves it again. */
async function insertRun(
  manager: EntityManager,
  actor: RunActor,
  submitted: unknown,
  { spec, resolved }: { spec: ValidSiteSpec; resolved: ResolvedSiteSpec },
): Promise<Run> {
  const [row]: { id: string }[] = await manager.query(
    `INSERT INTO runs (tenant_id, name, spec, series_id, steps, units, time_limit_seconds, created_by_user_id, created_by_api_key_id)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9) RETURNING id`,
    [
      actor.tenantId,
      resolved.name,
      JSON.stringify(submitted),
      'seriesId' in spec.supply ? spec.supply.seriesId : null,
      resolved.horizon.steps,
      resolved.units.length,
      resolved.solver.timeLimitSeconds,
      actor.userId ?? null,
      actor.apiKeyId ?? null,
    ],
  );
  return manager.findOneByOrFail(Run, { id: row.id });
}

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

/**
 * A queued run is cancelled at once (its job finds it cancelled and never starts). A running run
 * is flagged; the worker holding it sees the flag, terminates the solver and ends it cancelled.
 */
export async function cancelRun(ctx: AppContext, tenantId: string, id: string): Promise<Run> {
  const run = await getRun(ctx, tenantId, id);
  await ctx.db.transaction(async (manager) => {
    const [cancelled] = await manager.query(
      `UPDATE runs SET status = 'cancelled', cancel_requested_at = now(), finished_at = now(),
              error = '{"code":"cancelled","message":"Cancelled before it started."}'
        WHERE id = $1 AND status = 'queued' RETURNING id`,
      [run.id],
    );
    if (cancelled.length) {
      await enqueueRunEvent(ctx, manager, run.id, 'run.cancelled');
      return;
    }
    const [flagged] = await manager.query(
      `UPDATE runs SET cancel_requested_at = coalesce(cancel_requested_at, now()) WHERE id = $1 AND status = 'running' RETURNING id`,
      [run.id],
    );
    if (flagged.length) return;
    const current = await manager.findOneByOrFail(Run, { id: run.id });
    if (current.status === 'cancelled') return;
    throw new HttpProblem({
      status: 409,
      slug: 'run-finished',
      title: 'The run has already finished',
      detail: `Run ${run.id} is ${current.status}; only queued or running runs can be cancelled.`,
    });
  });
  return getRun(ctx, tenantId, id);
}
