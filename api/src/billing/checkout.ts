// An owner buys a plan: Gridwright makes the tenant's customer at the provider (once) and a checkout
// session for a subscription to the plan's price and the metered price of solver time; the owner pays
// on the provider's hosted page, and the plan changes when the provider's events say it is paid.
import type { AppContext } from '../context';
import { Tenant } from '../db/entities/tenant';
import { HttpProblem } from '../lib/problem';
import { recordAudit, type AuditActor } from '../services/audit';
import { tenantOwnerEmails } from '../services/mail';
import { getPlanOrFail } from '../services/tenants';
import { lockBillingAccount } from './accounts';
import { loadCatalogue, priceForPlan, usagePriceOrFail } from './catalogue';
import { isPaying } from './entitlement';
import { planGranted } from './problems';
import { atProvider, paymentProvider } from './provider';

export async function startCheckout(ctx: AppContext, input: { tenantId: string; planId: string }, actor: AuditActor): Promise<{ id: string; url: string; expiresAt: string }> {
  const provider = paymentProvider(ctx);
  const catalogue = await loadCatalogue(ctx);
  return ctx.db.transaction(async (m) => {
    const account = await lockBillingAccount(m, input.tenantId);
    await getPlanOrFail(m, input.planId);
    if (account.grantedPlanId) throw planGranted(account.grantedPlanId);
    if (isPaying(account.subscriptionStatus)) {
      throw new HttpProblem({
        status: 409,
        slug: 'already-subscribed',
        title: 'The tenant already has a subscription',
        detail: 'Change the plan of the running subscription with PUT /v1/tenant/plan instead.',
        extensions: { subscriptionPlanId: account.subscriptionPlanId },
      });
    }
    const price = priceForPlan(catalogue, input.planId);
    const usage = usagePriceOrFail(catalogue);
    const tenant = await m.findOneByOrFail(Tenant, { id: input.tenantId });
    if (!account.customerId) {
      const [email] = await tenantOwnerEmails(ctx, tenant.id);
      // One customer per tenant, however often this is retried.
      const customer = await atProvider(() =>
        provider.customers.create({ name: tenant.name, ...(email ? { email } : {}), metadata: { tenant_id: tenant.id, tenant_slug: tenant.slug } }, { idempotencyKey: `gridwright-customer-${tenant.id}` }),
      );
      account.customerId = customer.id;
      await m.save(account);
    }
    const session = await atProvider(() =>
      provider.checkout.sessions.create({
        mode: 'subscription',
        customer: account.customerId!,
        client_reference_id: tenant.id,
        line_items: [{ price: price.priceId, quantity: 1 }, { price: usage.priceId }],
        success_url: `${ctx.config.publicUrl}/billing?checkout=complete`,
        cancel_url: `${ctx.config.publicUrl}/billing?checkout=cancelled`,
        metadata: { tenant_id: tenant.id, plan_id: input.planId },
        subscription_data: { metadata: { tenant_id: tenant.id } },
      }),
    );
    await recordAudit(m, { tenantId: tenant.id, action: 'checkout-started', actor, target: tenant.slug, details: { planId: input.planId, session: session.id } });
    return { id: session.id, url: session.url!, expiresAt: new Date(session.expires_at * 1000).toISOString() };
  });
}
