import { Router } from 'express';
import { resolveDefaults } from '@gridwright/shared/site-spec';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { estimateModelSize } from '../engine/estimate-model-size';
import { specWarnings } from '../engine/spec-warnings';
import { validateSpecForTenant } from '../services/runs';

export function specsRouter(ctx: AppContext): Router {
  const r = Router();

  /** Validation, warnings and a model-size estimate; nothing is stored, solved or charged. */
  r.post('/v1/specs/validate', authenticate(ctx), authorize('runs.create'), async (req, res) => {
    const { spec, availableKw } = await validateSpecForTenant(ctx, req.principal!.tenantId, req.body);
    const resolved = resolveDefaults(spec, availableKw);
    res.json({ valid: true, warnings: specWarnings(resolved), modelSize: estimateModelSize(resolved) });
  });

  return r;
}
