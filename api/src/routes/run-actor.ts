import type { Request } from 'express';
import type { RunActor } from '../runs/submission';

/** Who submits runs (a run, a re-plan, a study's runs): the tenant, and the person or key acting for it. */
export function runActorOf(req: Request): RunActor {
  const p = req.principal!;
  return { tenantId: p.tenantId, userId: p.userId, apiKeyId: p.apiKeyId };
}
