import type { AppContext } from '../context';
import { PasswordReset } from '../db/entities/password-reset';
import { Tenant } from '../db/entities/tenant';
import { User } from '../db/entities/user';
import { randomToken, sha256Hex } from '../lib/secret-tokens';
import { consumePoint, postgresLimiter } from './rate-limits';
import { recordAudit } from './audit';
import { composeMail, sendMail } from './mail';
import { invalidToken } from './members';
import { assertPasswordAcceptable, hashPassword } from './passwords';
import { revokeUserSessions } from './sessions';

/** One client address may ask for this many times as many reset e-mails per hour as one address may receive. */
export const RESET_CLIENT_FACTOR = 10;
const HOUR_SECONDS = 3600;

/**
 * Whether a reset request may go on: per client address and per requested address (known or
 * not, so the count reveals nothing), each counted in one atomic statement. A refused request is
 * answered like any other; it only sends no e-mail.
 */
async function resetAllowed(ctx: AppContext, email: string, clientIp: string | null): Promise<boolean> {
  const perHour = ctx.config.passwordResetEmailsPerHour;
  const client = await consumePoint(postgresLimiter(ctx, 'reset-client', perHour * RESET_CLIENT_FACTOR, HOUR_SECONDS, true), clientIp ?? 'unknown');
  if (!client.allowed) return false;
  const address = await consumePoint(postgresLimiter(ctx, 'reset-address', perHour, HOUR_SECONDS, true), email);
  return address.allowed;
}

/** Sends a reset link when the address has an account and no limit is reached; the caller answers the same either way. */
export async function requestPasswordReset(ctx: AppContext, input: { email: string; ip: string | null }): Promise<void> {
  const email = input.email.trim().toLowerCase();
  if (!(await resetAllowed(ctx, email, input.ip))) {
    ctx.log.info({ ip: input.ip }, 'password reset throttled; no e-mail sent');
    return;
  }
  const user = await ctx.db.getRepository(User).createQueryBuilder('u').where('lower(u.email) = :email', { email }).getOne();
  if (!user) return;
  const token = randomToken();
  const expiresAt = new Date(Date.now() + ctx.config.passwordResetMinutes * 60_000);
  await ctx.db.transaction(async (m) => {
    // Only the newest link works.
    await m.query('UPDATE password_resets SET used_at = now() WHERE user_id = $1 AND used_at IS NULL', [user.id]);
    await m.insert(PasswordReset, { userId: user.id, tokenHash: sha256Hex(token), expiresAt, usedAt: null });
  });
  const tenant = user.tenantId ? await ctx.db.getRepository(Tenant).findOneBy({ id: user.tenantId }) : null;
  const mail = composeMail(ctx, {
    tenantName: tenant?.name ?? null,
    heading: 'Reset your Gridwright password',
    paragraphs: [
      `Someone asked to reset the password of ${user.email}. If it was not you, ignore this message; nothing changes.`,
      `The link works once and expires in ${ctx.config.passwordResetMinutes} minutes.`,
    ],
    link: { label: 'Choose a new password', path: `/reset-password?token=${token}` },
  });
  await sendMail(ctx, { to: [user.email], subject: 'Reset your Gridwright password', ...mail, tenantId: tenant?.id, kind: 'password-reset' });
}

export async function completePasswordReset(ctx: AppContext, input: { token: string; password: string; ip: string | null }): Promise<void> {
  assertPasswordAcceptable(input.password);
  const passwordHash = await hashPassword(ctx.config, input.password);
  await ctx.db.transaction(async (m) => {
    const [rows] = (await m.query(
      `UPDATE password_resets SET used_at = now()
       WHERE token_hash = $1 AND used_at IS NULL AND expires_at > now()
       RETURNING user_id AS "userId"`,
      [sha256Hex(input.token)],
    )) as [{ userId: string }[], number];
    const claimed = rows[0];
    if (!claimed) throw invalidToken('password reset');
    await m.update(User, { id: claimed.userId }, { passwordHash, passwordChangedAt: new Date() });
    await revokeUserSessions(m, claimed.userId, 'password reset');
    const user = await m.findOneByOrFail(User, { id: claimed.userId });
    await recordAudit(m, { tenantId: user.tenantId, action: 'password-reset', actor: { userId: user.id, email: user.email }, target: user.email, ip: input.ip });
  });
}
