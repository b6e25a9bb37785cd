import { resolveDefaults, validateSiteSpec, type SiteSpec } from '@gridwright/shared/site-spec';
import { defaultTimeLimitSeconds } from '@gridwright/shared/site-spec';
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { Run } from '../db/entities/run';
import { estimateModelSize } from '../engine/estimate-model-size';
import { specWarnings } from '../engine/spec-warnings';
import { validationProblem } from '../lib/problem';
import { bindIdempotencyKey, bodyFingerprint, claimIdempotencyKey } from '../services/idempotency';
import { assertRunAllowed } from '../services/quotas';
import { lookupSupplySeries } from '../services/series-lookup';
import { enqueueRun } from './queue';

export interface RunActor {
  tenantId: string;
  userId?: string;
  apiKeyId?: string;
}

/**
 * Validates a body as a site spec against SPEC.md §1 and resolves a named series; 400 with
 * pointers otherwise. The plan's caps are checked by `assertRunAllowed` (422) when a run is submitted.
 */
export async function validateSpecForTenant(ctx: AppContext, tenantId: string, body: unknown) {
  const checked = validateSiteSpec(body);
  if (!checked.ok) throw validationProblem(checked.errors);
  const supply = await lookupSupplySeries(ctx.db.manager, tenantId, checked.spec);
  if (!supply.ok) throw validationProblem(supply.errors);
  return { spec: checked.spec, availableKw: supply.availableKw };
}

/** Validation, warnings and a model-size estimate; nothing is stored, solved or charged. */
export async function checkSpec(ctx: AppContext, tenantId: string, body: unknown) {
  const { spec, availableKw } = await validateSpecForTenant(ctx, tenantId, body);
  const resolved = resolveDefaults(spec, availableKw);
  return { valid: true, warnings: specWarnings(resolved), modelSize: estimateModelSize(resolved) };
}

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
  const { spec } = await validateSpecForTenant(ctx, actor.tenantId, body);
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
    await assertRunAllowed(ctx, manager, actor.tenantId, { steps: spec.horizon.steps, units: spec.units.length });
    const run = await insertRun(manager, actor, spec);
    if (idempotencyKey) await bindIdempotencyKey(manager, { tenantId: actor.tenantId, key: idempotencyKey, runId: run.id });
    await enqueueRun(ctx, manager, run);
    return { run, replayed: false };
  });
}

async function insertRun(manager: EntityManager, actor: RunActor, spec: SiteSpec): Promise<Run> {
  const [row]: { id: string }[] = await manager.query(
    `INSERT INTO runs (tenant_id, name, spec, series_id, steps, units, time_limit_seconds, created_by_user_id, created_by_api_key_id)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9) RETURNING id`,
    [
      actor.tenantId,
      spec.name ?? null,
      JSON.stringify(spec),
      'seriesId' in spec.supply ? spec.supply.seriesId : null,
      spec.horizon.steps,
      spec.units.length,
      spec.solver?.timeLimitSeconds ?? defaultTimeLimitSeconds(spec.horizon.steps),
      actor.userId ?? null,
      actor.apiKeyId ?? null,
    ],
  );
  return manager.findOneByOrFail(Run, { id: row.id });
}
