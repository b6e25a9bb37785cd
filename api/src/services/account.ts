import { unauthenticated } from '../auth/middleware';
import type { Principal } from '../auth/principal';
import type { AppContext } from '../context';
import { Session } from '../db/entities/session';
import { User } from '../db/entities/user';
import { HttpProblem } from '../lib/problem';
import { recordAudit } from './audit';
import { assertPasswordAcceptable, hashPassword, verifyPassword } from './passwords';
import { createSession, revokeSession, revokeUserSessions } from './sessions';

// What a signed-in person does with their own account: read their session, end it, change their password.

/** Where a request came from, for the audit log and the session record. */
export interface ClientInfo {
  ip: string | null;
  userAgent: string | null;
}

export async function signedInAccount(ctx: AppContext, principal: Principal) {
  const user = await ctx.db.getRepository(User).findOneBy({ id: principal.userId! });
  const session = await ctx.db.getRepository(Session).findOneBy({ id: principal.sessionId! });
  if (!user || !session) throw unauthenticated('The session is not known.');
  return { user, session };
}

export async function signOut(ctx: AppContext, principal: Principal, client: ClientInfo): Promise<void> {
  const { user } = await signedInAccount(ctx, principal);
  await revokeSession(ctx.db.manager, principal.sessionId!, 'signed out');
  await recordAudit(ctx.db.manager, { tenantId: user.tenantId, action: 'sign-out', actor: { userId: user.id, email: user.email }, target: user.email, ip: client.ip });
}

/**
 * Checks the current password, sets the new one and ends every session of the person, this one
 * included; the answer is a fresh session for the caller to continue with.
 */
export async function changePassword(
  ctx: AppContext,
  principal: Principal,
  input: { currentPassword: string; newPassword: string },
  client: ClientInfo,
) {
  const { user } = await signedInAccount(ctx, principal);
  if (!(await verifyPassword(ctx.config, input.currentPassword, user.passwordHash))) {
    throw new HttpProblem({
      status: 400,
      slug: 'wrong-password',
      title: 'Current password is wrong',
      detail: 'The current password does not match.',
      errors: [{ pointer: '/currentPassword', message: 'does not match' }],
    });
  }
  assertPasswordAcceptable(input.newPassword, '/newPassword');
  const passwordHash = await hashPassword(ctx.config, input.newPassword);
  await ctx.db.transaction(async (m) => {
    await m.update(User, { id: user.id }, { passwordHash, passwordChangedAt: new Date() });
    await revokeUserSessions(m, user.id, 'password changed');
    await recordAudit(m, { tenantId: user.tenantId, action: 'password-changed', actor: { userId: user.id, email: user.email }, target: user.email, ip: client.ip });
  });
  const { session, token } = await createSession(ctx, user, client);
  return { user, session, token };
}
