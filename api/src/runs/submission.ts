import type { ResolvedSiteSpec, ValidSiteSpec } from '@gridwright/shared/site-spec';
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { Run } from '../db/entities/run';
import { estimateModelSize } from '../engine/estimate-model-size';
import { specWarnings } from '../engine/spec-warnings';
import { bindIdempotencyKey, bodyFingerprint, claimIdempotencyKey } from '../services/idempotency';
import { assertRunAllowed } from '../services/quotas';
import { resolveRequestSpec } from '../services/resolve-site-spec';
import { placeInQueue, sendRunJob, type QueuePlace } from './queue';

export interface RunActor {
  tenantId: string;
  userId?: string;
  apiKeyId?: string;
}

/** Validation, warnings and a model-size estimate; nothing is stored, solved or charged. */
export async function checkSpec(ctx: AppContext, tenantId: string, body: unknown) {
  const { resolved } = await resolveRequestSpec(ctx.db.manager, tenantId, body);
  return { valid: true, warnings: specWarnings(resolved), modelSize: estimateModelSize(resolved) };
}

/**
 * Accepts a spec: one transaction inserts the run, its queue job and (with a key) the
 * Idempotency-Key record, so an accepted run is never lost and never created twice. The run's
 * place in the queue is taken under the tenant's submission lock (`assertRunAllowed`).
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
    const place = await placeInQueue(manager, actor.tenantId);
    const run = await insertRun(manager, actor, body, checked, place);
    if (idempotencyKey) await bindIdempotencyKey(manager, { tenantId: actor.tenantId, key: idempotencyKey, runId: run.id });
    await sendRunJob(ctx, manager, run, place);
    return { run, replayed: false };
  });
}

/** The run keeps the spec as submitted (what `GET /v1/runs/{id}/spec` returns); the worker resolves it again. */
async function insertRun(
  manager: EntityManager,
  actor: RunActor,
  submitted: unknown,
  { spec, resolved }: { spec: ValidSiteSpec; resolved: ResolvedSiteSpec },
  place: QueuePlace,
): Promise<Run> {
  const [row]: { id: string }[] = await manager.query(
    `INSERT INTO runs (tenant_id, name, spec, series_id, steps, units, time_limit_seconds, created_by_user_id, created_by_api_key_id, job_id, queue_round)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11) RETURNING id`,
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
      place.jobId,
      place.round,
    ],
  );
  return manager.findOneByOrFail(Run, { id: row.id });
}
