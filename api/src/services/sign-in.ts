// Sign-in with throttling: failures are counted per account (e-mail) and per client address in
// PostgreSQL; after the second failure answers slow down, at the limit the account (or address) is locked.
import { setTimeout as sleep } from 'node:timers/promises';
import type { AppContext } from '../context';
import { Tenant } from '../db/entities/tenant';
import { User } from '../db/entities/user';
import { HttpProblem } from '../lib/problem';
import { recordAudit } from './audit';
import { verifyPassword } from './passwords';
import { postgresLimiter } from './rate-limits';
import { createSession } from './sessions';
import { tenantSuspended } from '../auth/middleware';

/** Per address the limit is this many times the per-account one (offices share addresses). */
export const ADDRESS_FAILURE_FACTOR = 10;

function limitersFor(ctx: AppContext) {
  const seconds = ctx.config.signInLockMinutes * 60;
  return {
    account: postgresLimiter(ctx, 'signin-account', ctx.config.signInMaxFailures, seconds, true),
    address: postgresLimiter(ctx, 'signin-address', ctx.config.signInMaxFailures * ADDRESS_FAILURE_FACTOR, seconds),
  };
}

const normaliseEmail = (email: string) => email.trim().toLowerCase();

function locked(seconds: number, what: string) {
  return new HttpProblem({
    status: 429,
    slug: 'sign-in-locked',
    title: 'Too many failed sign-ins',
    detail: `Too many failed sign-ins for this ${what}; try again in ${Math.ceil(seconds / 60)} min or reset the password.`,
    headers: { 'Retry-After': String(seconds) },
  });
}

export const invalidCredentials = () =>
  new HttpProblem({ status: 401, slug: 'invalid-credentials', title: 'Sign-in failed', detail: 'The e-mail address or password is wrong.' });

export async function signIn(ctx: AppContext, input: { email: string; password: string; ip: string | null; userAgent: string | null }) {
  const email = normaliseEmail(input.email);
  const { account, address } = limitersFor(ctx);
  const ipKey = input.ip ?? 'unknown';
  const [accountState, addressState] = await Promise.all([account.get(email), address.get(ipKey)]);
  const accountFailures = accountState?.consumedPoints ?? 0;
  if (accountFailures >= ctx.config.signInMaxFailures) throw locked(Math.ceil(accountState!.msBeforeNext / 1000), 'account');
  if ((addressState?.consumedPoints ?? 0) >= ctx.config.signInMaxFailures * ADDRESS_FAILURE_FACTOR) {
    throw locked(Math.ceil(addressState!.msBeforeNext / 1000), 'address');
  }

  const user = await ctx.db.getRepository(User).createQueryBuilder('u').where('lower(u.email) = :email', { email }).getOne();
  const ok = await verifyPassword(input.password, user?.passwordHash ?? null);
  if (!user || !ok) {
    const failures = accountFailures + 1;
    await Promise.all([account.penalty(email), address.penalty(ipKey)]);
    await recordAudit(ctx.db.manager, {
      tenantId: user?.tenantId ?? null,
      action: failures >= ctx.config.signInMaxFailures ? 'sign-in-locked' : 'sign-in-failed',
      actor: { userId: user?.id ?? null, email },
      target: email,
      ip: input.ip,
      details: { failures },
    });
    // Slowed before locked: 250 ms after the second failure, doubling, at most 2 s.
    if (failures >= 2) await sleep(Math.min(2000, 250 * 2 ** (failures - 2)));
    throw invalidCredentials();
  }

  if (user.tenantId) {
    const tenant = await ctx.db.getRepository(Tenant).findOneByOrFail({ id: user.tenantId });
    if (tenant.suspendedAt) throw tenantSuspended(tenant);
  }
  await account.delete(email);
  const { session, token } = await createSession(ctx, user, input);
  await ctx.db.getRepository(User).update({ id: user.id }, { lastSignInAt: new Date() });
  await recordAudit(ctx.db.manager, { tenantId: user.tenantId, action: 'sign-in', actor: { userId: user.id, email: user.email }, target: user.email, ip: input.ip });
  return { user, session, token };
}
