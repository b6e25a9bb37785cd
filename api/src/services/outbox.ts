import type { AppContext } from '../context';
import { OutboxMessage } from '../db/entities/outbox-message';
import { pageNewestFirst, type PageQuery } from '../lib/pagination';
import { notFound } from '../lib/problem';

const PAGE_COLUMNS = ['m.id', 'm.receivedAt', 'm.tenantId', 'm.kind', 'm.mailFrom', 'm.rcptTo', 'm.subject', 'm.textBody', 'm.htmlBody', 'm.messageId'];

export function listOutbox(ctx: AppContext, opts: PageQuery & { kind?: string; tenantId?: string; to?: string }) {
  const qb = ctx.db.getRepository(OutboxMessage).createQueryBuilder('m').select(PAGE_COLUMNS);
  if (opts.kind) qb.andWhere('m.kind = :kind', { kind: opts.kind });
  if (opts.tenantId) qb.andWhere('m.tenant_id = :tenantId', { tenantId: opts.tenantId });
  if (opts.to) qb.andWhere('lower(:to) = ANY(SELECT lower(x) FROM unnest(m.rcpt_to) x)', { to: opts.to });
  return pageNewestFirst(qb, opts, 'received_at');
}

export async function getOutboxMessage(ctx: AppContext, id: string): Promise<OutboxMessage> {
  const m = await ctx.db.getRepository(OutboxMessage).findOneBy({ id });
  if (!m) throw notFound(`Message ${id}`);
  return m;
}

export const outboxMessageView = (m: OutboxMessage) => ({
  id: m.id,
  receivedAt: m.receivedAt.toISOString(),
  tenantId: m.tenantId,
  kind: m.kind,
  from: m.mailFrom,
  to: m.rcptTo,
  subject: m.subject,
  text: m.textBody,
  html: m.htmlBody,
  messageId: m.messageId,
});
