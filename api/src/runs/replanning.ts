import { replanRequestSchema, type ReplanRequest } from '@gridwright/shared/revisions';
import type { Schedule } from '@gridwright/shared/run-result';
import type { ResolvedSiteSpec, SiteSpec } from '@gridwright/shared/site-spec';
import type { AppContext } from '../context';
import type { Run } from '../db/entities/run';
import { readInstant } from '../lib/instants';
import { HttpProblem, validationProblem } from '../lib/problem';
import { zodIssuePointers } from '../lib/zod-issues';
import { bodyFingerprint } from '../services/idempotency';
import { assertRunAllowed } from '../services/quotas';
import { resolveSiteSpecForTenant } from '../services/resolve-site-spec';
import { plannedStateAt } from './planned-state';
import { buildReplanSpec } from './replan-spec';
import { getRunSchedule } from './schedule-export';
import { acceptOnce, queueCheckedRun, runFacts, type RunActor } from './submission';

const MAX_NAME = 200;

/** The step of a schedule's horizon a re-plan starts at, from a step index or the instant a step starts; else a 400 on `pointer`. */
export function replanStep(from: ReplanRequest['from'], schedule: Schedule, stepMinutes: number, pointer = '/from'): number {
  const steps = schedule.timestamps.length;
  const refuse = (message: string) => validationProblem([{ pointer, message }]);
  if (typeof from === 'number') {
    if (from >= steps) throw refuse(`step ${from} is past the parent's last step, ${steps - 1}`);
    return from;
  }
  const read = readInstant(from);
  if (!read.ok) throw refuse(read.reason);
  const wanted = read.at.toMillis();
  const starts = schedule.timestamps.map((ts) => Date.parse(ts));
  const step = starts.indexOf(wanted);
  if (step >= 0) return step;
  const first = schedule.timestamps[0];
  const last = schedule.timestamps[steps - 1];
  if (wanted < starts[0] || wanted > starts[steps - 1]) throw refuse(`${from} lies outside the steps of the parent's horizon, which start from ${first} to ${last}`);
  throw refuse(`${from} is not a step boundary of the parent's horizon: its steps start at ${first} and every ${stepMinutes} minutes after`);
}

/** The parent's spec made the engine's input again (its series may have gone since). */
export async function resolveParent(ctx: AppContext, parent: Run): Promise<ResolvedSiteSpec> {
  const resolution = await resolveSiteSpecForTenant(ctx.db.manager, parent.tenantId, parent.spec);
  if (resolution.ok) return resolution.resolved;
  throw new HttpProblem({
    status: 409,
    slug: 'parent-spec-unresolvable',
    title: "The parent's spec no longer resolves",
    detail: `Run ${parent.id}'s spec cannot be solved again: ${resolution.errors.map((e) => `${e.pointer} ${e.message}`).join('; ')}`,
  });
}

/**
 * A re-plan of a run that has a schedule (SPEC §5's operating loop): the parent's spec from the
 * re-plan time to the end of its horizon, starting from the measured state, with fresh series
 * where given, validated like any spec (errors name the request's fields) and queued in one
 * transaction with its Idempotency-Key, like `submitRun`. The run records its parent, the first
 * run of the chain and where it starts in both horizons; the steps before it stay the parent's.
 */
export async function replanRun(
  ctx: AppContext,
  actor: RunActor,
  parentId: string,
  body: unknown,
  idempotencyKey: string | null,
): Promise<{ run: Run; replayed: boolean }> {
  const { run: parent, schedule } = await getRunSchedule(ctx, actor.tenantId, parentId);
  const parsed = replanRequestSchema.safeParse(body);
  if (!parsed.success) throw validationProblem(zodIssuePointers(parsed.error, () => 'is not a field of a re-plan request'));
  const request = parsed.data;
  const resolvedParent = await resolveParent(ctx, parent);
  const from = replanStep(request.from, schedule, resolvedParent.horizon.stepMinutes);
  const startsAt = schedule.timestamps[from];
  const name = request.name ?? `${parent.name ?? 'Run'} · re-plan from ${startsAt}`.slice(0, MAX_NAME);
  const built = buildReplanSpec(parent.spec as SiteSpec, resolvedParent, plannedStateAt(resolvedParent, schedule, from), request, { from, startsAt, name });

  const resolution = await resolveSiteSpecForTenant(ctx.db.manager, actor.tenantId, built.spec);
  if (!resolution.ok) {
    throw validationProblem(
      resolution.errors.map((e) => {
        const pointer = built.requestPointerOf(e.pointer);
        return pointer === null ? { pointer: '', message: `the re-planned spec's ${e.pointer || 'body'} ${e.message}` } : { pointer, message: e.message };
      }),
    );
  }
  const revision = { parentRunId: parent.id, rootRunId: parent.rootRunId ?? parent.id, fromStep: from, rootStep: parent.rootStep + from };
  // The same body re-plans another run differently, so the key's fingerprint names the parent too.
  const idempotency = idempotencyKey ? { key: idempotencyKey, fingerprint: bodyFingerprint({ replanOf: parent.id, body }) } : null;
  return ctx.db.transaction((manager) =>
    acceptOnce(ctx, manager, actor.tenantId, idempotency, async () => {
      const facts = runFacts(resolution);
      await assertRunAllowed(ctx, manager, actor.tenantId, facts);
      return queueCheckedRun(ctx, manager, actor, built.spec, facts, { revision });
    }),
  );
}
