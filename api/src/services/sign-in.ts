// Sign-in with throttling. Every attempt is counted before its password is checked, each count in
// one atomic statement (rate-limiter-flexible's upsert), so attempts sent together are numbered one
// by one and none past a limit is ever evaluated — the right password included. A success hands
// its count back. Three counters, so that locking a victim out takes far more than a few guesses:
// - the account from one client address (the pair) locks after SIGNIN_MAX_FAILURES;
// - one client address, over all accounts, locks after ten times that;
// - the account from every address locks after ten times that, which needs ten addresses, since
//   each pair stops counting at its own limit.
// Failed answers slow down as the pair's or the account's failures grow.
import { setTimeout as sleep } from 'node:timers/promises';
import type { RateLimiterPostgres } from 'rate-limiter-flexible';
import type { AppContext } from '../context';
import { Tenant } from '../db/entities/tenant';
import { User } from '../db/entities/user';
import { HttpProblem } from '../lib/problem';
import { recordAudit } from './audit';
import { verifyPassword } from './passwords';
import { consumePoint, postgresLimiter } from './rate-limits';
import { createSession } from './sessions';
import { tenantSuspended } from '../auth/middleware';

/** The per-address and the per-account (all addresses) limits are this many times the pair's. */
export const SPREAD_FAILURE_FACTOR = 10;

type Counter = 'pair' | 'address' | 'account';

function limitersFor(ctx: AppContext): Record<Counter, RateLimiterPostgres> {
  const seconds = ctx.config.signInLockMinutes * 60;
  const max = ctx.config.signInMaxFailures;
  return {
    pair: postgresLimiter(ctx, 'signin-pair', max, seconds, true),
    address: postgresLimiter(ctx, 'signin-address', max * SPREAD_FAILURE_FACTOR, seconds, true),
    account: postgresLimiter(ctx, 'signin-account', max * SPREAD_FAILURE_FACTOR, seconds, true),
  };
}

const normaliseEmail = (email: string) => email.trim().toLowerCase();

const LOCKED_WHAT: Record<Counter, string> = {
  pair: 'account from this address',
  address: 'address',
  account: 'account',
};

function locked(seconds: number, counter: Counter) {
  return new HttpProblem({
    status: 429,
    slug: 'sign-in-locked',
    title: 'Too many failed sign-ins',
    detail: `Too many failed sign-ins for this ${LOCKED_WHAT[counter]}; try again in ${Math.ceil(seconds / 60)} min or reset the password.`,
    headers: { 'Retry-After': String(Math.max(1, seconds)) },
  });
}

export const invalidCredentials = () =>
  new HttpProblem({ status: 401, slug: 'invalid-credentials', title: 'Sign-in failed', detail: 'The e-mail address or password is wrong.' });

/**
 * How long a failed answer waits: nothing for the first failure, then 250 ms doubling to at most
 * 2 s. `failures` is the larger of the pair's count and the account's count beyond one pair's limit.
 */
export function failureDelayMs(failures: number): number {
  return failures < 2 ? 0 : Math.min(2000, 250 * 2 ** (failures - 2));
}

export async function signIn(ctx: AppContext, input: { email: string; password: string; ip: string | null; userAgent: string | null }) {
  const email = normaliseEmail(input.email);
  const limiters = limitersFor(ctx);
  const keys: Record<Counter, string> = { pair: `${email}|${input.ip ?? 'unknown'}`, address: input.ip ?? 'unknown', account: email };
  const counts = {} as Record<Counter, number>;
  // In order, each counted only once the one before allowed the attempt: a locked pair adds nothing
  // to its address or account, so one address cannot run up an account's count past the pair limit.
  for (const counter of ['pair', 'address', 'account'] as const) {
    const { allowed, res } = await consumePoint(limiters[counter], keys[counter]);
    if (!allowed) throw locked(Math.ceil(res.msBeforeNext / 1000), counter);
    counts[counter] = res.consumedPoints;
  }

  const user = await ctx.db.getRepository(User).createQueryBuilder('u').where('lower(u.email) = :email', { email }).getOne();
  const ok = await verifyPassword(ctx.config, input.password, user?.passwordHash ?? null);
  if (!user || !ok) {
    await recordAudit(ctx.db.manager, {
      tenantId: user?.tenantId ?? null,
      action: counts.pair >= ctx.config.signInMaxFailures ? 'sign-in-locked' : 'sign-in-failed',
      actor: { userId: user?.id ?? null, email },
      target: email,
      ip: input.ip,
      details: { failures: counts.pair, accountFailures: counts.account },
    });
    await sleep(failureDelayMs(Math.max(counts.pair, counts.account - ctx.config.signInMaxFailures + 1)));
    throw invalidCredentials();
  }

  // The attempt was no failure: the pair starts afresh, the address and the account get their point back.
  await Promise.all([limiters.pair.delete(keys.pair), limiters.address.reward(keys.address, 1), limiters.account.reward(keys.account, 1)]);
  if (user.tenantId) {
    const tenant = await ctx.db.getRepository(Tenant).findOneByOrFail({ id: user.tenantId });
    if (tenant.suspendedAt) throw tenantSuspended(tenant);
  }
  const { session, token } = await createSession(ctx, user, input);
  await ctx.db.getRepository(User).update({ id: user.id }, { lastSignInAt: new Date() });
  await recordAudit(ctx.db.manager, { tenantId: user.tenantId, action: 'sign-in', actor: { userId: user.id, email: user.email }, target: user.email, ip: input.ip });
  return { user, session, token };
}
