import type { AppContext } from '../context';
import { OutboxMessage } from '../db/entities/outbox-message';
import { notFound } from '../lib/problem';

const PAGE_COLUMNS = ['m.id', 'm.receivedAt', 'm.tenantId', 'm.kind', 'm.mailFrom', 'm.rcptTo', 'm.subject', 'm.textBody', 'm.htmlBody', 'm.messageId'];

export async function listOutbox(ctx: AppContext, opts: { kind?: string; tenantId?: string; to?: string; cursor?: string; limit?: number }) {
  const limit = Math.min(Math.max(opts.limit ?? 50, 1), 200);
  const qb = ctx.db.getRepository(OutboxMessage).createQueryBuilder('m').select(PAGE_COLUMNS);
  if (opts.kind) qb.andWhere('m.kind = :kind', { kind: opts.kind });
  if (opts.tenantId) qb.andWhere('m.tenant_id = :tenantId', { tenantId: opts.tenantId });
  if (opts.to) qb.andWhere('lower(:to) = ANY(SELECT lower(x) FROM unnest(m.rcpt_to) x)', { to: opts.to });
  if (opts.cursor) {
    const id = Buffer.from(opts.cursor, 'base64url').toString('utf8');
    qb.andWhere('(m.received_at, m.id) < (SELECT c.received_at, c.id FROM outbox_messages c WHERE c.id::text = :cursorId)', { cursorId: id });
  }
  const rows = await qb.orderBy('m.received_at', 'DESC').addOrderBy('m.id', 'DESC').take(limit + 1).getMany();
  const items = rows.slice(0, limit);
  return { items, nextCursor: rows.length > limit ? Buffer.from(items[items.length - 1]!.id).toString('base64url') : null };
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
