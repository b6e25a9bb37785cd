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
  const idempotency = idempotencyKey ? { key: idempotencyKey, fingerprint: bodyFingerprint(body) } : null;
  return ctx.db.transaction((manager) =>
    acceptOnce(ctx, manager, actor.tenantId, idempotency, async () => {
      const facts = runFacts(checked);
      await assertRunAllowed(ctx, manager, actor.tenantId, facts);
      return queueCheckedRun(ctx, manager, actor, body, facts);
    }),
  );
}

/** What a run's row keeps of its checked spec besides the spec itself; `steps` and `units` are what the plan's caps measure. */
export interface RunFacts {
  name: string | null;
  seriesId: string | null;
  steps: number;
  units: number;
  timeLimitSeconds: number;
}

export const runFacts = ({ spec, resolved }: { spec: ValidSiteSpec; resolved: ResolvedSiteSpec }): RunFacts => ({
  name: resolved.name,
  seriesId: 'seriesId' in spec.supply ? spec.supply.seriesId : null,
  steps: resolved.horizon.steps,
  units: resolved.units.length,
  timeLimitSeconds: resolved.solver.timeLimitSeconds,
});

/**
 * Creates a run once per Idempotency-Key, inside `manager`'s transaction: the first request with a
 * key runs `create` and binds the key to its run; a repeat with the same fingerprint gets that run
 * back (`replayed`), one with another fingerprint a 422.
 */
export async function acceptOnce(
  ctx: AppContext,
  manager: EntityManager,
  tenantId: string,
  idempotency: { key: string; fingerprint: string } | null,
  create: () => Promise<Run>,
): Promise<{ run: Run; replayed: boolean }> {
  if (idempotency) {
    const claim = await claimIdempotencyKey(manager, { tenantId, key: idempotency.key, fingerprint: idempotency.fingerprint, hours: ctx.config.idempotencyHours });
    if (!claim.fresh) return { run: await manager.findOneByOrFail(Run, { id: claim.runId }), replayed: true };
  }
  const run = await create();
  if (idempotency) await bindIdempotencyKey(manager, { tenantId, key: idempotency.key, runId: run.id });
  return { run, replayed: false };
}

/** Where a run comes from besides its submitter: the run it re-plans, or its study and place in the study's grid. */
export interface RunOrigin {
  revision?: { parentRunId: string; rootRunId: string; fromStep: number; rootStep: number };
  study?: { studyId: string; position: number };
}

/**
 * Inserts a checked spec's run and sends its job, on the caller's transaction. Call it after the
 * plan's checks (`assertRunAllowed` / `assertRunsAllowed`), under the lock they take, so two runs
 * never share a round of the tenant-fair queue.
 */
export async function queueCheckedRun(
  ctx: AppContext,
  manager: EntityManager,
  actor: RunActor,
  submitted: unknown,
  facts: RunFacts,
  origin: RunOrigin = {},
): Promise<Run> {
  const place = await placeInQueue(manager, actor.tenantId);
  const run = await insertRun(manager, actor, submitted, facts, place, origin);
  await sendRunJob(ctx, manager, run, place);
  return run;
}

/** The run keeps the spec as submitted (what `GET /v1/runs/{id}/spec` returns); the worker resolves it again. */
async function insertRun(
  manager: EntityManager,
  actor: RunActor,
  submitted: unknown,
  facts: RunFacts,
  place: QueuePlace,
  { revision, study }: RunOrigin,
): Promise<Run> {
  const [row]: { id: string }[] = await manager.query(
    `INSERT INTO runs (tenant_id, name, spec, series_id, steps, units, time_limit_seconds, created_by_user_id, created_by_api_key_id, job_id, queue_round,
                       parent_run_id, root_run_id, replan_from_step, root_step, study_id, study_position)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15, $16, $17) RETURNING id`,
    [
      actor.tenantId,
      facts.name,
      JSON.stringify(submitted),
      facts.seriesId,
      facts.steps,
      facts.units,
      facts.timeLimitSeconds,
      actor.userId ?? null,
      actor.apiKeyId ?? null,
      place.jobId,
      place.round,
      revision?.parentRunId ?? null,
      revision?.rootRunId ?? null,
      revision?.fromStep ?? null,
      revision?.rootStep ?? 0,
      study?.studyId ?? null,
      study?.position ?? null,
    ],
  );
  return manager.findOneByOrFail(Run, { id: row.id });
}
