import type { EntityManager } from 'typeorm';
import { buildPointer } from '@gridwright/shared/json-pointer';
import { assertPlanSetDirectly } from '../billing/direct-plan-guard';
import type { AppContext } from '../context';
import { Plan } from '../db/entities/plan';
import { Tenant, type LimitOverrides } from '../db/entities/tenant';
import { pageNewestFirst, type PageQuery } from '../lib/pagination';
import { HttpProblem, notFound, validationProblem } from '../lib/problem';
import { isLimitName, LIMIT_NAMES, limitValueRefusal, type LimitName } from '../lib/limit-ranges';
import { isUuid } from '../lib/uuid';
import { recordAudit, type AuditActor } from './audit';
import { credentialCacheFor, forgetCredentialChange, type TenantAndPlan } from './credential-cache';
import { inviteMember } from './members';

export type TenantLimits = Record<LimitName, number>;

export async function findTenant(manager: EntityManager, id: string): Promise<Tenant | null> {
  return isUuid(id) ? manager.findOneBy(Tenant, { id }) : null;
}

/** The tenant and its plan, as authentication reads them on every request: from the process's cache when it may. */
export function findTenantAndPlan(ctx: AppContext, id: string): Promise<TenantAndPlan | null> {
  const cache = credentialCacheFor(ctx);
  return cache.read(cache.tenants, id, async () => {
    const tenant = await findTenant(ctx.db.manager, id);
    return tenant && { tenant, plan: await ctx.db.manager.findOneByOrFail(Plan, { id: tenant.planId }) };
  });
}

export async function getTenantOr404(manager: EntityManager, id: string): Promise<Tenant> {
  const t = await findTenant(manager, id);
  if (!t) throw notFound(`Tenant ${id}`);
  return t;
}

export async function getTenantBySlug(manager: EntityManager, slug: string): Promise<Tenant> {
  const t = await manager.findOneBy(Tenant, { slug });
  if (!t) throw notFound(`Tenant "${slug}"`);
  return t;
}

export async function getPlanOrFail(manager: EntityManager, planId: string, pointer = '/planId'): Promise<Plan> {
  const plan = await manager.findOneBy(Plan, { id: planId });
  if (!plan) throw validationProblem([{ pointer, message: `no plan "${planId}"` }]);
  return plan;
}

export function listPlans(ctx: AppContext): Promise<Plan[]> {
  return ctx.db.getRepository(Plan).find({ order: { sortOrder: 'ASC' } });
}

export function effectiveLimits(plan: Plan, overrides: LimitOverrides): TenantLimits {
  const limits = {} as TenantLimits;
  for (const name of LIMIT_NAMES) limits[name] = overrides[name] ?? plan[name];
  return limits;
}

export async function createTenant(
  ctx: AppContext,
  input: { slug: string; name?: string; planId?: string },
  actor: AuditActor = {},
): Promise<Tenant> {
  return ctx.db.transaction(async (m) => {
    const plan = await getPlanOrFail(m, input.planId ?? ctx.config.defaultPlan);
    if (await m.findOneBy(Tenant, { slug: input.slug })) {
      throw new HttpProblem({
        status: 409,
        slug: 'conflict',
        title: 'Already exists',
        detail: `A tenant with slug "${input.slug}" already exists.`,
        errors: [{ pointer: '/slug', message: 'already taken' }],
      });
    }
    const tenant = m.create(Tenant, { slug: input.slug, name: input.name ?? input.slug, planId: plan.id, limitOverrides: {} });
    await m.save(tenant);
    await recordAudit(m, { tenantId: tenant.id, action: 'tenant-created', actor, target: tenant.slug, details: { planId: plan.id } });
    return tenant;
  });
}

/** A new tenant and, when an owner's address is given, the invitation of its first owner. */
export async function createTenantWithOwner(
  ctx: AppContext,
  input: { slug: string; name?: string; planId?: string; ownerEmail?: string },
  actor: AuditActor,
  invitedBy: string | null,
): Promise<Tenant> {
  const tenant = await createTenant(ctx, { slug: input.slug, name: input.name, planId: input.planId }, actor);
  if (input.ownerEmail) await inviteMember(ctx, { tenantId: tenant.id, email: input.ownerEmail, role: 'owner', invitedBy }, actor);
  return tenant;
}

/**
 * Runs `change` in a transaction, then drops this process's cached copy of the tenant before the
 * caller answers: other processes drop theirs on the change notice, which arrives a moment later.
 */
async function afterCommitForgetTenant<T>(ctx: AppContext, id: string, change: (m: EntityManager) => Promise<T>): Promise<T> {
  const result = await ctx.db.transaction(change);
  forgetCredentialChange(ctx, { table: 'tenants', id });
  return result;
}

export interface TenantChanges {
  name?: string;
  planId?: string;
  limitOverrides?: Partial<Record<LimitName, number | null>>;
}

/**
 * The overrides after `changes` (null removes one). Each must be a known limit and a number in its
 * range: an override is what a quota is checked against, so anything else would switch it off.
 */
function nextOverrides(current: LimitOverrides, changes: unknown): LimitOverrides {
  if (!changes || typeof changes !== 'object' || Array.isArray(changes)) {
    throw validationProblem([{ pointer: '/limitOverrides', message: 'must be an object of limit names and numbers' }]);
  }
  const errors: { pointer: string; message: string }[] = [];
  const next: LimitOverrides = { ...current };
  for (const [name, value] of Object.entries(changes)) {
    const pointer = buildPointer(['limitOverrides', name]);
    if (!isLimitName(name)) {
      errors.push({ pointer, message: `not a limit; one of ${LIMIT_NAMES.join(', ')}` });
      continue;
    }
    if (value === null) {
      delete next[name];
      continue;
    }
    const refusal = limitValueRefusal(name, value);
    if (refusal) errors.push({ pointer, message: refusal });
    else next[name] = value as number;
  }
  if (errors.length) throw validationProblem(errors);
  return next;
}

export async function updateTenant(ctx: AppContext, id: string, changes: TenantChanges, actor: AuditActor): Promise<Tenant> {
  return afterCommitForgetTenant(ctx, id, async (m) => {
    const tenant = await getTenantOr404(m, id);
    await m.query('SELECT 1 FROM tenants WHERE id = $1 FOR UPDATE', [id]);
    if (changes.name !== undefined && changes.name !== tenant.name) {
      await recordAudit(m, { tenantId: id, action: 'tenant-renamed', actor, target: tenant.slug, details: { from: tenant.name, to: changes.name } });
      tenant.name = changes.name;
    }
    if (changes.planId !== undefined && changes.planId !== tenant.planId) {
      await getPlanOrFail(m, changes.planId);
      await assertPlanSetDirectly(m, id);
      await recordAudit(m, { tenantId: id, action: 'plan-changed', actor, target: tenant.slug, details: { from: tenant.planId, to: changes.planId } });
      tenant.planId = changes.planId;
    }
    if (changes.limitOverrides !== undefined) {
      const next = nextOverrides(tenant.limitOverrides, changes.limitOverrides);
      await recordAudit(m, { tenantId: id, action: 'limits-changed', actor, target: tenant.slug, details: { from: tenant.limitOverrides, to: next } });
      tenant.limitOverrides = next;
    }
    return m.save(tenant);
  });
}

export async function setTenantSuspended(ctx: AppContext, id: string, suspend: boolean, reason: string | null, actor: AuditActor): Promise<Tenant> {
  return afterCommitForgetTenant(ctx, id, async (m) => {
    const tenant = await getTenantOr404(m, id);
    if (suspend === (tenant.suspendedAt !== null)) return tenant;
    tenant.suspendedAt = suspend ? new Date() : null;
    tenant.suspendedReason = suspend ? reason : null;
    await recordAudit(m, { tenantId: id, action: suspend ? 'tenant-suspended' : 'tenant-resumed', actor, target: tenant.slug, details: reason ? { reason } : {} });
    return m.save(tenant);
  });
}

export function listTenants(ctx: AppContext, opts: PageQuery & { q?: string }) {
  const qb = ctx.db.getRepository(Tenant).createQueryBuilder('t');
  if (opts.q) qb.andWhere('(t.slug ILIKE :q OR t.name ILIKE :q)', { q: `%${opts.q.replace(/[\\%_]/g, (c) => '\\' + c)}%` });
  return pageNewestFirst(qb, opts);
}

export async function tenantView(manager: EntityManager, tenant: Tenant) {
  const plan = await manager.findOneByOrFail(Plan, { id: tenant.planId });
  return {
    id: tenant.id,
    slug: tenant.slug,
    name: tenant.name,
    planId: tenant.planId,
    limitOverrides: tenant.limitOverrides,
    limits: effectiveLimits(plan, tenant.limitOverrides),
    suspended: tenant.suspendedAt !== null,
    suspendedAt: tenant.suspendedAt?.toISOString() ?? null,
    suspendedReason: tenant.suspendedReason,
    createdAt: tenant.createdAt.toISOString(),
  };
}

export const planView = (p: Plan) => ({
  id: p.id,
  name: p.name,
  description: p.description,
  limits: effectiveLimits(p, {}),
});
