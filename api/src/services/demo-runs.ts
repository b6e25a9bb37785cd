import { setTimeout as sleep } from 'node:timers/promises';
import { exampleSites } from '@gridwright/shared/examples';
import type { AppContext } from '../context';
import { submitRun } from '../runs/submission';

/** How often the seeder looks whether its last demo run has ended. */
const POLL_MS = 500;

/**
 * Submits every shared example site as a run of `tenantId`, each once the one before it has
 * ended; the worker solves them like any run. One at a time, the seeded runs take one of the
 * plan's concurrent places, so a newcomer's first runs are not refused for them. Each carries the
 * Idempotency-Key `demo-<example id>`, so seeding twice within the key's lifetime adds nothing.
 */
export async function seedDemoRuns(ctx: AppContext, tenantId: string, signal?: AbortSignal): Promise<string[]> {
  const ids: string[] = [];
  for (const example of exampleSites) {
    const { run } = await submitRun(ctx, { tenantId }, example.spec, `demo-${example.id}`);
    ids.push(run.id);
    await untilEnded(ctx, run.id, signal);
  }
  return ids;
}

async function untilEnded(ctx: AppContext, runId: string, signal?: AbortSignal): Promise<void> {
  for (;;) {
    const [row] = await ctx.db.query("SELECT status IN ('queued', 'running') AS active FROM runs WHERE id = $1", [runId]);
    if (!row?.active) return;
    await sleep(POLL_MS, undefined, { signal });
  }
}
