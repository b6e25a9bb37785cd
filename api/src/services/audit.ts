import type { EntityManager } from 'typeorm';
import type { Principal } from '../auth/principal';
import type { AppContext } from '../context';
import { AuditEvent } from '../db/entities/audit-event';
import { User } from '../db/entities/user';
import { pageNewestFirst, type PageQuery } from '../lib/pagination';

export type AuditAction =
  | 'sign-in'
  | 'sign-in-failed'
  | 'sign-in-locked'
  | 'sign-out'
  | 'password-changed'
  | 'password-reset'
  | 'key-created'
  | 'key-revoked'
  | 'member-invited'
  | 'member-joined'
  | 'role-changed'
  | 'member-removed'
  | 'tenant-created'
  | 'tenant-renamed'
  | 'tenant-suspended'
  | 'tenant-resumed'
  | 'plan-changed'
  | 'limits-changed'
  | 'checkout-started'
  | 'plan-change-requested'
  | 'subscription-resumed'
  | 'plan-granted'
  | 'plan-grant-ended';

export interface AuditActor {
  userId?: string | null;
  apiKeyId?: string | null;
  email?: string | null;
}

export const actorOf = (p: Principal | undefined, email?: string | null): AuditActor => ({
  userId: p?.userId ?? null,
  apiKeyId: p?.apiKeyId ?? null,
  email: email ?? null,
});

/** The audit actor behind a request: its person (with their e-mail address) or its API key. */
export async function auditActorOf(ctx: AppContext, principal: Principal | undefined): Promise<AuditActor> {
  const email = principal?.userId ? (await ctx.db.getRepository(User).findOneBy({ id: principal.userId }))?.email : null;
  return actorOf(principal, email);
}

export async function recordAudit(
  manager: EntityManager,
  event: { tenantId: string | null; action: AuditAction; actor?: AuditActor; target?: string | null; ip?: string | null; details?: Record<string, unknown> },
): Promise<void> {
  const row: Partial<AuditEvent> = {
    tenantId: event.tenantId,
    action: event.action,
    actorUserId: event.actor?.userId ?? null,
    actorApiKeyId: event.actor?.apiKeyId ?? null,
    actorEmail: event.actor?.email ?? null,
    target: event.target ?? null,
    ip: event.ip ?? null,
    details: event.details ?? {},
  };
  await manager.save(manager.create(AuditEvent, row));
}

/** `tenantId` null lists every tenant's events (operators). */
export function listAuditEvents(ctx: AppContext, opts: PageQuery & { tenantId: string | null; action?: string }) {
  const qb = ctx.db.getRepository(AuditEvent).createQueryBuilder('e');
  if (opts.tenantId) qb.andWhere('e.tenant_id = :tenantId', { tenantId: opts.tenantId });
  if (opts.action) qb.andWhere('e.action = :action', { action: opts.action });
  return pageNewestFirst(qb, opts);
}

export const auditEventView = (e: AuditEvent) => ({
  id: e.id,
  tenantId: e.tenantId,
  action: e.action,
  actor: { userId: e.actorUserId, apiKeyId: e.actorApiKeyId, email: e.actorEmail },
  target: e.target,
  ip: e.ip,
  details: e.details,
  createdAt: e.createdAt.toISOString(),
});
