import type { AppContext } from '../../api/src/context';
import { OutboxMessage } from '../../api/src/db/entities/outbox-message';

/** Waits until the loopback SMTP server has stored a message matching `where` (mail is delivered asynchronously). */
export async function waitForMail(
  ctx: AppContext,
  where: { to?: string; kind?: string; count?: number },
  timeoutMs = 15_000,
): Promise<OutboxMessage[]> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const qb = ctx.db.getRepository(OutboxMessage).createQueryBuilder('m').orderBy('m.received_at', 'ASC');
    if (where.kind) qb.andWhere('m.kind = :kind', { kind: where.kind });
    if (where.to) qb.andWhere(':to = ANY(m.rcpt_to)', { to: where.to });
    const found = await qb.getMany();
    if (found.length >= (where.count ?? 1)) return found;
    if (Date.now() > deadline) throw new Error(`no e-mail ${JSON.stringify(where)} arrived within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

export function tokenFrom(text: string | null): string {
  const m = /token=([A-Za-z0-9_-]+)/.exec(text ?? '');
  if (!m) throw new Error('no token link in the message');
  return m[1]!;
}
