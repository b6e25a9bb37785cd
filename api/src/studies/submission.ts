import { studyRequestSchema, type StudyView } from '@gridwright/shared/studies';
import type { SpecIssue } from '@gridwright/shared/site-spec';
import type { AppContext } from '../context';
import { validationProblem } from '../lib/problem';
import { zodIssuePointers } from '../lib/zod-issues';
import { queueCheckedRun, runFacts, type RunActor, type RunFacts } from '../runs/submission';
import { assertRunsAllowed } from '../services/quotas';
import { resolveSiteSpecForTenant } from '../services/resolve-site-spec';
import { changeBehind, combinationAt, combinationCount, combinationSpec, combinationText, gridIssues, labelled, type GridChange } from './grid';
import { getStudy } from './reading';

/** Most field errors one refusal lists, as for a spec. */
const MAX_REPORTED = 100;

/**
 * The errors of the combinations' specs, each once: at the value of the change it is about (else at
 * the grid), naming the first combination it occurs in and how many others share it.
 */
class CombinationIssues {
  private readonly found = new Map<string, { pointer: string; first: string; error: SpecIssue; others: number }>();

  constructor(private readonly changes: GridChange[]) {}

  add(position: number, picks: number[], error: SpecIssue) {
    const change = changeBehind(this.changes, error.pointer);
    const pointer = change === null ? '/changes' : `/changes/${change}/values/${picks[change]}`;
    const key = `${pointer} ${error.pointer} ${error.message}`;
    const seen = this.found.get(key);
    if (seen) seen.others++;
    else this.found.set(key, { pointer, first: `combination ${position} (${combinationText(this.changes, picks)})`, error, others: 0 });
  }

  get size() {
    return this.found.size;
  }

  list(): SpecIssue[] {
    return [...this.found.values()].map(({ pointer, first, error, others }) => ({
      pointer,
      message: `${first}${others ? ` and ${others} other${others === 1 ? '' : 's'}` : ''}: ${error.pointer || 'the spec'} ${error.message}`,
    }));
  }
}

/**
 * Checks every combination before anything is created: the base spec as any spec (errors under
 * `/baseSpec`), the grid's pointers and size, then each combination applied to the base spec and
 * resolved in the tenant. Answers each combination's spec and the facts its run row keeps.
 */
async function checkStudy(ctx: AppContext, tenantId: string, body: unknown) {
  const parsed = studyRequestSchema.safeParse(body);
  if (!parsed.success) {
    throw validationProblem(zodIssuePointers(parsed.error, (path) => (path[0] === 'baseSpec' ? 'is not a field of the site spec' : 'is not a field of a study request')));
  }
  const base = (body as { baseSpec: Record<string, unknown> }).baseSpec;
  const baseResolution = await resolveSiteSpecForTenant(ctx.db.manager, tenantId, base);
  if (!baseResolution.ok) throw validationProblem(baseResolution.errors.map((e) => ({ pointer: `/baseSpec${e.pointer}`, message: e.message })));
  const changes = labelled(parsed.data.changes);
  const gridProblems = gridIssues(base, changes);
  if (gridProblems.length) throw validationProblem(gridProblems);

  const name = parsed.data.name ?? baseResolution.resolved.name ?? 'Study';
  // Only the facts are kept: a year-long spec times 64 is rebuilt at insert rather than held twice.
  const combinations: RunFacts[] = [];
  const issues = new CombinationIssues(changes);
  for (let position = 0; position < combinationCount(changes); position++) {
    const picks = combinationAt(changes, position);
    const spec = combinationSpec(base, changes, picks, name);
    const resolution = await resolveSiteSpecForTenant(ctx.db.manager, tenantId, spec);
    if (resolution.ok) combinations.push(runFacts(resolution));
    else for (const e of resolution.errors) issues.add(position, picks, e);
  }
  if (issues.size) throw validationProblem(issues.list().slice(0, MAX_REPORTED));
  return { name: parsed.data.name ?? null, runName: name, base, changes, combinations };
}

/**
 * Creates a study: every combination is checked first, then one transaction holds the plan's checks
 * for all its runs (each run counts against the monthly quota and the runs queued or running at
 * once), the study row and one queued run per combination in the tenant-fair queue. Nothing is
 * half-created: a refusal or a failure leaves no study and no run.
 */
export async function createStudy(ctx: AppContext, actor: RunActor, body: unknown): Promise<StudyView> {
  const { name, runName, base, changes, combinations } = await checkStudy(ctx, actor.tenantId, body);
  const studyId = await ctx.db.transaction(async (manager) => {
    await assertRunsAllowed(
      ctx,
      manager,
      actor.tenantId,
      combinations,
      { pointerPrefix: '/baseSpec', describe: (i) => `Combination ${i} (${combinationText(changes, combinationAt(changes, i))})` },
    );
    const [row]: { id: string }[] = await manager.query(
      `INSERT INTO studies (tenant_id, name, base_spec, changes, runs_total, created_by_user_id, created_by_api_key_id)
       VALUES ($1, $2, $3, $4, $5, $6, $7) RETURNING id`,
      [actor.tenantId, name, JSON.stringify(base), JSON.stringify(changes), combinations.length, actor.userId ?? null, actor.apiKeyId ?? null],
    );
    for (const [position, facts] of combinations.entries()) {
      const spec = combinationSpec(base, changes, combinationAt(changes, position), runName);
      await queueCheckedRun(ctx, manager, actor, spec, facts, { study: { studyId: row.id, position } });
    }
    return row.id;
  });
  return getStudy(ctx, actor.tenantId, studyId);
}
