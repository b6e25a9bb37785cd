// An operator gives a tenant a plan without payment (a partner, a trial, a settlement). The grant
// decides the plan whatever the provider says until the operator ends it; both are audited. Ending
// it returns the tenant to what it pays for: its subscription's plan, or the free plan.
import type { AppContext } from '../context';
import { Tenant } from '../db/entities/tenant';
import { HttpProblem } from '../lib/problem';
import { recordAudit, type AuditActor } from '../services/audit';
import { forgetCredentialChange } from '../services/credential-cache';
import { getPlanOrFail, getTenantOr404 } from '../services/tenants';
import { lockBillingAccount } from './accounts';
import { freePlanId } from './catalogue';
import { isPaying } from './entitlement';

export async function grantPlan(ctx: AppContext, tenantId: string, input: { planId: string; reason: string }, actor: AuditActor): Promise<void> {
  await ctx.db.transaction(async (m) => {
    const tenant = await getTenantOr404(m, tenantId);
    const plan = await getPlanOrFail(m, input.planId);
    const account = await lockBillingAccount(m, tenant.id);
    account.grantedPlanId = plan.id;
    account.grantReason = input.reason;
    account.grantedAt = new Date();
    account.grantedBy = actor.email ?? null;
    await m.save(account);
    await recordAudit(m, { tenantId: tenant.id, action: 'plan-granted', actor, target: tenant.slug, details: { from: tenant.planId, to: plan.id, reason: input.reason } });
    await m.update(Tenant, { id: tenant.id }, { planId: plan.id });
  });
  forgetCredentialChange(ctx, { table: 'tenants', id: tenantId });
}

export async function endPlanGrant(ctx: AppContext, tenantId: string, actor: AuditActor): Promise<void> {
  await ctx.db.transaction(async (m) => {
    const tenant = await getTenantOr404(m, tenantId);
    const account = await lockBillingAccount(m, tenant.id);
    if (!account.grantedPlanId) {
      throw new HttpProblem({ status: 409, slug: 'no-plan-grant', title: 'No plan grant', detail: 'This tenant has no plan granted by an operator.' });
    }
    const paid = isPaying(account.subscriptionStatus) ? (account.heldPlanId ?? account.subscriptionPlanId!) : await freePlanId(m);
    await recordAudit(m, { tenantId: tenant.id, action: 'plan-grant-ended', actor, target: tenant.slug, details: { from: account.grantedPlanId, to: paid } });
    account.grantedPlanId = null;
    account.grantReason = null;
    account.grantedAt = null;
    account.grantedBy = null;
    await m.save(account);
    await m.update(Tenant, { id: tenant.id }, { planId: paid });
  });
  forgetCredentialChange(ctx, { table: 'tenants', id: tenantId });
}
