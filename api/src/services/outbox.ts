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

/**
 * Operators read the outbox, but the single-use links in invitations and password resets are for
 * their recipients alone: whoever holds one can set the account's password. The view hides every
 * `token=` value; the message itself went to the SMTP server intact.
 */
const TOKEN_IN_LINK = /(token=)([A-Za-z0-9_-]+)/g;
export const HIDDEN_TOKEN = '[hidden]';

const tokensIn = (...texts: (string | null)[]) => new Set(texts.flatMap((t) => [...(t ?? '').matchAll(TOKEN_IN_LINK)].map((m) => m[2]!)));
const hideTokens = (text: string | null) => text?.replace(TOKEN_IN_LINK, `$1${HIDDEN_TOKEN}`) ?? null;

/**
 * The raw message with each token hidden. Quoted-printable may break a token across lines with
 * soft line breaks (`=` at a line's end), so each is looked for with those allowed between its
 * characters. A token not found that way (a base64 part) withholds the bodies: the headers stay.
 */
function hideTokensInRaw(raw: string, tokens: Set<string>): string {
  let masked = raw;
  for (const token of tokens) {
    const spelled = new RegExp([...token].map((c) => c.replace(/[-]/g, '\\$&')).join('(?:=\\r?\\n)?'), 'g');
    if (!masked.match(spelled)) {
      const headerEnd = raw.search(/\r?\n\r?\n/);
      return `${headerEnd >= 0 ? raw.slice(0, headerEnd) : ''}\n\n(body withheld: it carries a single-use link)\n`;
    }
    masked = masked.replace(spelled, HIDDEN_TOKEN);
  }
  return masked;
}

export const outboxMessageView = (m: OutboxMessage) => ({
  id: m.id,
  receivedAt: m.receivedAt.toISOString(),
  tenantId: m.tenantId,
  kind: m.kind,
  from: m.mailFrom,
  to: m.rcptTo,
  subject: m.subject,
  text: hideTokens(m.textBody),
  html: hideTokens(m.htmlBody),
  messageId: m.messageId,
});

export const outboxMessageDetail = (m: OutboxMessage) => ({ ...outboxMessageView(m), raw: hideTokensInRaw(m.raw, tokensIn(m.textBody, m.htmlBody)) });
