import { exampleSites } from '@gridwright/shared/examples';
import type { AppContext } from '../context';
import { submitRun } from '../runs/submission';

/**
 * Submits every shared example site as a run of `tenantId`; the worker solves them like any run.
 * Each carries the Idempotency-Key `demo-<example id>`, so seeding twice within the key's
 * lifetime adds nothing.
 */
export async function seedDemoRuns(ctx: AppContext, tenantId: string): Promise<string[]> {
  const ids: string[] = [];
  for (const example of exampleSites) {
    const { run } = await submitRun(ctx, { tenantId }, example.spec, `demo-${example.id}`);
    ids.push(run.id);
  }
  return ids;
}
