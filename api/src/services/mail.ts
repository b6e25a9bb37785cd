import type { AppContext } from '../context';
import { User } from '../db/entities/user';
import { KIND_HEADER, TENANT_HEADER } from './mail-server';

export interface OutgoingMail {
  to: string[];
  subject: string;
  text: string;
  html: string;
  tenantId?: string;
  /** What the message is about, e.g. `invitation`, `password-reset`, `quota-warning`, `webhook-disabled`. */
  kind: string;
}

export async function sendMail(ctx: AppContext, mail: OutgoingMail): Promise<void> {
  if (mail.to.length === 0) return;
  await ctx.mailer.transport.sendMail({
    from: ctx.config.mailFrom,
    to: mail.to,
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
    headers: { [KIND_HEADER]: mail.kind, ...(mail.tenantId ? { [TENANT_HEADER]: mail.tenantId } : {}) },
  });
}

export async function tenantOwnerEmails(ctx: AppContext, tenantId: string): Promise<string[]> {
  const owners = await ctx.db.getRepository(User).find({ where: { tenantId, role: 'owner' }, order: { createdAt: 'ASC' } });
  return owners.map((u) => u.email);
}

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/**
 * Plain text and HTML for one message in the house layout: who it is for (the tenant), what happened,
 * and a link back to the console. `linkPath` is relative to PUBLIC_URL.
 */
export function composeMail(
  ctx: AppContext,
  m: { tenantName: string | null; heading: string; paragraphs: string[]; link: { label: string; path: string } },
): { text: string; html: string } {
  const url = `${ctx.config.publicUrl}${m.link.path}`;
  const tenantLine = m.tenantName ? `Tenant: ${m.tenantName}` : 'Gridwright service';
  const text = [m.heading, '', tenantLine, '', ...m.paragraphs.flatMap((p) => [p, '']), `${m.link.label}: ${url}`, '', '— Gridwright'].join('\n');
  const html = [
    '<!doctype html><html><body style="font-family:sans-serif;color:#1d2430">',
    `<p style="color:#5b6472;font-size:12px">${escapeHtml(tenantLine)}</p>`,
    `<h1 style="font-size:18px">${escapeHtml(m.heading)}</h1>`,
    ...m.paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`),
    `<p><a href="${escapeHtml(url)}">${escapeHtml(m.link.label)}</a></p>`,
    '<p style="color:#5b6472;font-size:12px">— Gridwright</p>',
    '</body></html>',
  ].join('\n');
  return { text, html };
}
