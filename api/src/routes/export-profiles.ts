import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { delimiterName, delimiterNamed } from '../lib/csv-delimiters';
import {
  createExportProfile,
  deleteExportProfile,
  exportProfileView,
  getExportProfile,
  listExportProfiles,
  updateExportProfile,
  type ExportProfileInput,
} from '../services/export-profiles';

/** The documented fields of a profile body, and nothing else: never an id or a tenant. */
function profileInput(body: Record<string, any>): Partial<ExportProfileInput> {
  const { name, powerUnit, timestamps, delimiter, tagMap } = body;
  return { name, powerUnit, timestamps, delimiter: delimiter === undefined ? undefined : delimiterNamed(delimiter), tagMap };
}
const viewWithDelimiterName = (p: Parameters<typeof exportProfileView>[0]) => {
  const view = exportProfileView(p);
  return { ...view, delimiter: delimiterName(view.delimiter) };
};

export function exportProfilesRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);
  const tenant = (req: { principal?: { tenantId: string } }) => req.principal!.tenantId;

  r.get('/v1/export-profiles', auth, authorize('exportProfiles.read'), async (req, res) => {
    res.json({ items: (await listExportProfiles(ctx, tenant(req))).map(viewWithDelimiterName) });
  });

  r.post('/v1/export-profiles', auth, authorize('exportProfiles.manage'), async (req, res) => {
    const profile = await createExportProfile(ctx, tenant(req), profileInput(req.body) as ExportProfileInput);
    res.status(201).location(`/v1/export-profiles/${profile.id}`).json(viewWithDelimiterName(profile));
  });

  r.get('/v1/export-profiles/:profileId', auth, authorize('exportProfiles.read'), async (req, res) => {
    res.json(viewWithDelimiterName(await getExportProfile(ctx, tenant(req), String(req.params.profileId))));
  });

  r.patch('/v1/export-profiles/:profileId', auth, authorize('exportProfiles.manage'), async (req, res) => {
    res.json(viewWithDelimiterName(await updateExportProfile(ctx, tenant(req), String(req.params.profileId), profileInput(req.body))));
  });

  r.delete('/v1/export-profiles/:profileId', auth, authorize('exportProfiles.manage'), async (req, res) => {
    await deleteExportProfile(ctx, tenant(req), String(req.params.profileId));
    res.status(204).end();
  });

  return r;
}
