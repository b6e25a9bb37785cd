import { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { delimiterName, delimiterNamed } from '../lib/csv-delimiters';
import {
  createExportProfile,
  deleteExportProfile,
  exportProfileView,
  getExportProfile,
  listExportProfiles,
  updateExportProfile,
} from '../services/export-profiles';

const withDelimiter = <T extends { delimiter?: string }>(body: T): T => (body.delimiter ? { ...body, delimiter: delimiterNamed(body.delimiter) } : body);
const viewWithDelimiterName = (p: Parameters<typeof exportProfileView>[0]) => {
  const view = exportProfileView(p);
  return { ...view, delimiter: delimiterName(view.delimiter) };
};

export function exportProfilesRouter(ctx: AppContext): Router {
  const r = Router();
  const auth = authenticate(ctx);
  const tenant = (req: { principal?: { tenantId: string } }) => req.principal!.tenantId;

  r.get('/v1/export-profiles', auth, authorize('exportProfiles.read'), async (req, res) => {
    res.json({ items: (await listExportProfiles(ctx, tenant(req))).map(viewWithDelimiterName) });
  });

  r.post('/v1/export-profiles', auth, authorize('exportProfiles.manage'), async (req, res) => {
    const profile = await createExportProfile(ctx, tenant(req), withDelimiter(req.body));
    res.status(201).location(`/v1/export-profiles/${profile.id}`).json(viewWithDelimiterName(profile));
  });

  r.get('/v1/export-profiles/:profileId', auth, authorize('exportProfiles.read'), async (req, res) => {
    res.json(viewWithDelimiterName(await getExportProfile(ctx, tenant(req), String(req.params.profileId))));
  });

  r.patch('/v1/export-profiles/:profileId', auth, authorize('exportProfiles.manage'), async (req, res) => {
    res.json(viewWithDelimiterName(await updateExportProfile(ctx, tenant(req), String(req.params.profileId), withDelimiter(req.body))));
  });

  r.delete('/v1/export-profiles/:profileId', auth, authorize('exportProfiles.manage'), async (req, res) => {
    await deleteExportProfile(ctx, tenant(req), String(req.params.profileId));
    res.status(204).end();
  });

  return r;
}
