import { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { estimateModelSize } from '../engine/estimate-model-size';
import { specWarnings } from '../engine/spec-warnings';
import { resolveRequestSpec } from '../services/resolve-site-spec';

export function specsRouter(ctx: AppContext): Router {
  const r = Router();

  /** Validation, warnings and a model-size estimate; nothing is stored, solved or charged. */
  r.post('/v1/specs/validate', authenticate(ctx), authorize('runs.create'), async (req, res) => {
    const { resolved } = await resolveRequestSpec(ctx.db.manager, req.principal!.tenantId, req.body);
    res.json({ valid: true, warnings: specWarnings(resolved), modelSize: estimateModelSize(resolved) });
  });

  return r;
}
