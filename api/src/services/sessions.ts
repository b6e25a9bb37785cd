import jwt from 'jsonwebtoken';
import type { EntityManager } from 'typeorm';
import { IsNull } from 'typeorm';
import type { AppContext } from '../context';
import { Session } from '../db/entities/session';
import { User } from '../db/entities/user';
import { randomToken } from '../lib/secret-tokens';
import { isUuid } from '../lib/uuid';

export const SESSION_COOKIE = 'gw_session';
export const CSRF_COOKIE = 'gw_csrf';
export const CSRF_HEADER = 'x-csrf-token';

interface SessionClaims {
  sid: string;
  sub: string;
}

export async function createSession(ctx: AppContext, user: User, meta: { ip?: string | null; userAgent?: string | null }) {
  const expiresAt = new Date(Date.now() + ctx.config.sessionMinutes * 60_000);
  const session = await ctx.db.getRepository(Session).save({
    userId: user.id,
    csrfToken: randomToken(),
    expiresAt,
    ip: meta.ip ?? null,
    userAgent: meta.userAgent?.slice(0, 300) ?? null,
    revokedAt: null,
    revokedReason: null,
  });
  const claims: SessionClaims = { sid: session.id, sub: user.id };
  const token = jwt.sign(claims, ctx.config.jwtSecret, { algorithm: 'HS256', expiresIn: ctx.config.sessionMinutes * 60, issuer: 'gridwright' });
  return { session, token };
}

/** The live session and its user for a cookie value, or why there is none. */
export async function resolveSession(
  ctx: AppContext,
  token: string,
): Promise<{ ok: true; session: Session; user: User } | { ok: false; reason: string }> {
  let claims: SessionClaims;
  try {
    // Pinning the algorithm refuses `alg: none` and key-confusion tokens.
    claims = jwt.verify(token, ctx.config.jwtSecret, { algorithms: ['HS256'], issuer: 'gridwright' }) as SessionClaims;
  } catch (err) {
    return { ok: false, reason: err instanceof jwt.TokenExpiredError ? 'The session has expired; sign in again.' : 'The session token is not valid.' };
  }
  if (typeof claims.sid !== 'string' || !isUuid(claims.sid) || typeof claims.sub !== 'string' || !isUuid(claims.sub)) {
    return { ok: false, reason: 'The session token is not valid.' };
  }
  // The token names both rows, so they are read side by side: one round trip of waiting, not two.
  const [session, user] = await Promise.all([
    ctx.db.getRepository(Session).findOneBy({ id: claims.sid }),
    ctx.db.getRepository(User).findOneBy({ id: claims.sub }),
  ]);
  if (!session || session.userId !== claims.sub) return { ok: false, reason: 'The session is not known.' };
  if (session.revokedAt) return { ok: false, reason: `The session was ended (${session.revokedReason ?? 'revoked'}); sign in again.` };
  if (session.expiresAt.getTime() <= Date.now()) return { ok: false, reason: 'The session has expired; sign in again.' };
  if (!user) return { ok: false, reason: 'The session is not known.' };
  return { ok: true, session, user };
}

export async function revokeSession(manager: EntityManager, sessionId: string, reason: string): Promise<void> {
  await manager.update(Session, { id: sessionId, revokedAt: IsNull() }, { revokedAt: new Date(), revokedReason: reason });
}

/** Ends every live session of a user, e.g. after a password or role change; `keep` survives. */
export async function revokeUserSessions(manager: EntityManager, userId: string, reason: string, keep?: string): Promise<void> {
  const qb = manager
    .createQueryBuilder()
    .update(Session)
    .set({ revokedAt: () => 'now()', revokedReason: reason })
    .where('user_id = :userId AND revoked_at IS NULL', { userId });
  if (keep) qb.andWhere('id <> :keep', { keep });
  await qb.execute();
}
