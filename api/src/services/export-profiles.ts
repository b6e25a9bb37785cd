import type { AppContext } from '../context';
import { ExportProfile } from '../db/entities/export-profile';
import { HttpProblem, notFound } from '../lib/problem';
import { isUuid } from '../lib/uuid';

export interface ExportProfileInput {
  name: string;
  powerUnit?: 'kW' | 'MW';
  timestamps?: 'utc' | 'offset';
  delimiter?: string;
  tagMap?: Record<string, string>;
}

export function exportProfileView(p: ExportProfile) {
  return {
    id: p.id,
    name: p.name,
    powerUnit: p.powerUnit,
    timestamps: p.timestamps,
    delimiter: p.delimiter,
    tagMap: p.tagMap,
    createdAt: p.createdAt.toISOString(),
    updatedAt: p.updatedAt.toISOString(),
  };
}

const nameTaken = (name: string) =>
  new HttpProblem({
    status: 409,
    slug: 'export-profile-name-taken',
    title: 'Name already used',
    detail: `An export profile named "${name}" already exists in this tenant.`,
    errors: [{ pointer: '/name', message: 'already used by another export profile' }],
  });

const isUniqueViolation = (err: any) => (err?.code ?? err?.driverError?.code) === '23505';

export async function createExportProfile(ctx: AppContext, tenantId: string, input: ExportProfileInput) {
  try {
    const [row] = await ctx.db.query(
      `INSERT INTO export_profiles (tenant_id, name, power_unit, timestamps, delimiter, tag_map) VALUES ($1, $2, $3, $4, $5, $6) RETURNING id`,
      [tenantId, input.name, input.powerUnit ?? 'kW', input.timestamps ?? 'utc', input.delimiter ?? ',', JSON.stringify(input.tagMap ?? {})],
    );
    return ctx.db.manager.findOneByOrFail(ExportProfile, { id: row.id });
  } catch (err) {
    if (isUniqueViolation(err)) throw nameTaken(input.name);
    throw err;
  }
}

/** By id, or by name (what a SCADA pipeline configures: `?profile=plant-north`). */
export async function getExportProfile(ctx: AppContext, tenantId: string, idOrName: string): Promise<ExportProfile> {
  const profile = isUuid(idOrName)
    ? await ctx.db.manager.findOneBy(ExportProfile, { id: idOrName, tenantId })
    : await ctx.db.manager.findOneBy(ExportProfile, { name: idOrName, tenantId });
  if (!profile) throw notFound(`Export profile ${idOrName}`);
  return profile;
}

export function listExportProfiles(ctx: AppContext, tenantId: string) {
  return ctx.db.manager.find(ExportProfile, { where: { tenantId }, order: { name: 'ASC' } });
}

export async function updateExportProfile(ctx: AppContext, tenantId: string, id: string, patch: Partial<ExportProfileInput>) {
  const profile = await getExportProfile(ctx, tenantId, id);
  // Field by field: a patch never reaches the id, the tenant or the timestamps.
  if (patch.name !== undefined) profile.name = patch.name;
  if (patch.powerUnit !== undefined) profile.powerUnit = patch.powerUnit;
  if (patch.timestamps !== undefined) profile.timestamps = patch.timestamps;
  if (patch.delimiter !== undefined) profile.delimiter = patch.delimiter;
  if (patch.tagMap !== undefined) profile.tagMap = patch.tagMap;
  profile.updatedAt = new Date();
  try {
    return await ctx.db.manager.save(profile);
  } catch (err) {
    if (isUniqueViolation(err)) throw nameTaken(patch.name ?? profile.name);
    throw err;
  }
}

export async function deleteExportProfile(ctx: AppContext, tenantId: string, id: string) {
  const profile = await getExportProfile(ctx, tenantId, id);
  await ctx.db.manager.delete(ExportProfile, { id: profile.id });
}
