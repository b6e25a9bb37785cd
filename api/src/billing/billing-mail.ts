// E-mail to a tenant's owners when its billing standing changes.
import type { AppContext } from '../context';
import { composeMail, sendMail, tenantOwnerEmails } from '../services/mail';
import type { BillingNotice } from './entitlement';

const day = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : 'soon');

export interface NoticeContext {
  tenantId: string;
  tenantName: string;
  planName: string;
  freePlanName: string;
  graceEndsAt: Date | null;
}

function message(notice: BillingNotice, c: NoticeContext): { subject: string; paragraphs: string[] } {
  switch (notice) {
    case 'grace-started':
      return {
        subject: `Payment for ${c.tenantName}'s ${c.planName} plan failed`,
        paragraphs: [
          `The payment provider could not collect the renewal of the ${c.planName} plan.`,
          `${c.tenantName} keeps ${c.planName} until ${day(c.graceEndsAt)} (UTC). Pay the open invoice from the billing page, with another card if need be.`,
          `If it is still unpaid then, the tenant moves to the ${c.freePlanName} plan. Runs, series, keys and settings are kept; only the plan's limits change.`,
        ],
      };
    case 'payment-recovered':
      return { subject: `${c.tenantName}'s payment went through`, paragraphs: [`The open invoice is paid; ${c.tenantName} stays on the ${c.planName} plan.`] };
    case 'lapsed-after-grace':
      return {
        subject: `${c.tenantName} is now on the ${c.freePlanName} plan`,
        paragraphs: [
          `The renewal stayed unpaid until the end of the grace period, so the subscription has ended and ${c.tenantName} is on the ${c.freePlanName} plan.`,
          'Nothing was deleted: runs, series, keys and settings are kept. Choose a plan on the billing page to subscribe again.',
        ],
      };
    case 'subscription-ended':
      return {
        subject: `${c.tenantName}'s subscription has ended`,
        paragraphs: [`The subscription has ended and ${c.tenantName} is on the ${c.freePlanName} plan. Nothing was deleted; choose a plan on the billing page to subscribe again.`],
      };
  }
}

/** Sends one message per notice; a failure is logged, not thrown, as the change itself is already made. */
export async function mailBillingNotices(ctx: AppContext, notices: BillingNotice[], c: NoticeContext): Promise<void> {
  if (!notices.length) return;
  const to = await tenantOwnerEmails(ctx, c.tenantId);
  for (const notice of notices) {
    const m = message(notice, c);
    try {
      const body = composeMail(ctx, { tenantName: c.tenantName, heading: m.subject, paragraphs: m.paragraphs, link: { label: 'Open billing in the console', path: '/billing' } });
      await sendMail(ctx, { to, subject: m.subject, ...body, tenantId: c.tenantId, kind: `billing-${notice}` });
    } catch (err) {
      ctx.log.error({ err, tenantId: c.tenantId, notice }, 'billing e-mail failed');
    }
  }
}
