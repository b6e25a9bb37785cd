// Request rate limits per credential (API key or signed-in user) and per tenant, counted in
// PostgreSQL so every API process shares the same counters. Each process takes points from a
// counter in batches (one round trip for a batch, `reserve_rate_points`) and hands them out from
// memory; the sign-in throttle counts each attempt through rate-limiter-flexible.
import type { Response } from 'express';
import { LRUCache } from 'lru-cache';
import { RateLimiterPostgres, type RateLimiterRes } from 'rate-limiter-flexible';
import type { DataSource } from 'typeorm';
import type { AppContext } from '../context';
import { pgPoolOf } from '../db/pg-pool';
import { HttpProblem } from '../lib/problem';

export const RATE_LIMIT_TABLE = 'rate_limits';

/** The tenant as a whole (all its keys and people together) may use this many times one credential's rate. */
export const TENANT_RATE_FACTOR = 3;

const limiters = new WeakMap<object, Map<string, RateLimiterPostgres>>();

export function postgresLimiter(ctx: AppContext, keyPrefix: string, points: number, durationSeconds: number, clearExpired = false): RateLimiterPostgres {
  let cache = limiters.get(ctx.db);
  if (!cache) limiters.set(ctx.db, (cache = new Map()));
  const id = `${keyPrefix}:${points}:${durationSeconds}`;
  let limiter = cache.get(id);
  if (!limiter) {
    limiter = new RateLimiterPostgres({
      storeClient: pgPoolOf(ctx.db),
      storeType: 'pool',
      tableName: RATE_LIMIT_TABLE,
      tableCreated: true,
      clearExpiredByTimeout: clearExpired,
      // Points and window are part of the prefix, so a plan change starts a fresh count instead of inheriting one.
      keyPrefix: id,
      points,
      duration: durationSeconds,
    });
    cache.set(id, limiter);
  }
  return limiter;
}

/** A limiter result, or the Error a database failure rejects with. */
export async function consumePoint(limiter: RateLimiterPostgres, key: string): Promise<{ allowed: boolean; res: RateLimiterRes }> {
  try {
    return { allowed: true, res: await limiter.consume(key) };
  } catch (rejection) {
    if (rejection instanceof Error) throw rejection;
    return { allowed: false, res: rejection as RateLimiterRes };
  }
}

/**
 * A process takes this share of a counter's quota in one batch. With N processes serving one
 * credential, at most the quota is admitted per window, and a request may be refused while up to
 * (N − 1) × batch points sit unused in the other processes (5 % of the quota with two processes).
 */
const BATCH_SHARE = 1 / 20;
/** `rate_limits.points` is a PostgreSQL integer. */
const MAX_QUOTA = 2 ** 31 - 1;
const MAX_COUNTERS = 100_000;

/** One counter's points held by this process for the current window. */
interface Reserve {
  quota: number;
  /** Points this process may still hand out. */
  available: number;
  /** Points taken from the counter by every process this window, at the last reservation. */
  counted: number;
  /** `performance.now()` by which the window has ended (measured from before the reservation was asked for). */
  endsAt: number;
}

interface Counter {
  name: 'credential' | 'tenant';
  key: string;
  quota: number;
}

interface ProcessReserves {
  reserves: LRUCache<string, Reserve>;
  /** Reservations on their way, one per counter at a time. */
  pending: Map<string, Promise<void>>;
}

const reservesByDb = new WeakMap<DataSource, ProcessReserves>();

function reservesFor(db: DataSource): ProcessReserves {
  let r = reservesByDb.get(db);
  if (!r) reservesByDb.set(db, (r = { reserves: new LRUCache({ max: MAX_COUNTERS }), pending: new Map() }));
  return r;
}

/** No points left here, and more may be had from the counter. */
const needsReservation = (r: Reserve | undefined, now: number) => !r || r.endsAt <= now || (r.available === 0 && r.counted < r.quota);

async function reserve(ctx: AppContext, p: ProcessReserves, counters: Counter[], windowMs: number): Promise<void> {
  const askedAt = performance.now();
  const { rows } = await pgPoolOf(ctx.db).query<{ counter_key: string; granted: number; counted: number; ms_left: string }>({
    name: 'reserve-rate-points',
    text: 'SELECT counter_key, granted, counted, ms_left FROM reserve_rate_points($1::text[], $2::integer[], $3::integer[], $4::bigint)',
    values: [counters.map((c) => c.key), counters.map((c) => Math.max(1, Math.ceil(c.quota * BATCH_SHARE))), counters.map((c) => c.quota), windowMs],
  });
  for (const row of rows) {
    const counter = counters.find((c) => c.key === row.counter_key)!;
    const endsAt = askedAt + Number(row.ms_left);
    p.reserves.set(counter.key, { quota: counter.quota, available: row.granted, counted: row.counted, endsAt }, { ttl: Math.max(1, endsAt - performance.now()) });
  }
}

/** Takes one point from every counter, or none when any has none left this window. */
async function takePoint(ctx: AppContext, counters: Counter[], windowMs: number): Promise<{ allowed: boolean; reserves: Reserve[] }> {
  const p = reservesFor(ctx.db);
  for (;;) {
    const now = performance.now();
    const reserves = counters.map((c) => p.reserves.get(c.key));
    const short = counters.filter((c, i) => needsReservation(reserves[i], now));
    if (short.length === 0) {
      const held = reserves as Reserve[];
      const allowed = held.every((r) => r.available > 0);
      if (allowed) for (const r of held) r.available--;
      return { allowed, reserves: held };
    }
    const waiting = short.map((c) => p.pending.get(c.key)).filter((w) => w !== undefined);
    const ask = short.filter((c) => !p.pending.has(c.key));
    if (ask.length) {
      const asked = reserve(ctx, p, ask, windowMs).finally(() => {
        for (const c of ask) p.pending.delete(c.key);
      });
      for (const c of ask) p.pending.set(c.key, asked);
      waiting.push(asked);
    }
    await Promise.all(waiting);
  }
}

/** Points left to everyone this window as far as this process knows, and seconds to the window's end. */
const remaining = (r: Reserve) => Math.max(0, r.quota - r.counted + r.available);
const resetSeconds = (r: Reserve) => Math.max(0, Math.ceil((r.endsAt - performance.now()) / 1000));

export async function enforceRequestRate(
  ctx: AppContext,
  res: Response,
  who: { tenantId: string; credential: string; requestsPerSecond: number },
): Promise<void> {
  const window = ctx.config.rateLimitWindowSeconds;
  // Overrides may be fractional (one request every ten seconds is 0.1); a window always allows one.
  const perCredential = Math.min(MAX_QUOTA, Math.max(1, Math.floor(who.requestsPerSecond * window)));
  const perTenant = Math.min(MAX_QUOTA, perCredential * TENANT_RATE_FACTOR);
  // Quota and window are part of the key, so a plan change starts a fresh count instead of inheriting one.
  const counters: Counter[] = [
    { name: 'credential', key: `rate-credential:${perCredential}:${window}:${who.credential}`, quota: perCredential },
    { name: 'tenant', key: `rate-tenant:${perTenant}:${window}:${who.tenantId}`, quota: perTenant },
  ];
  const { allowed, reserves } = await takePoint(ctx, counters, window * 1000);
  // The RateLimit-Policy and RateLimit fields of draft-ietf-httpapi-ratelimit-headers (structured-field lists).
  res.setHeader('RateLimit-Policy', counters.map((c) => `"${c.name}";q=${c.quota};w=${window}`).join(', '));
  res.setHeader('RateLimit', counters.map((c, i) => `"${c.name}";r=${remaining(reserves[i]!)};t=${resetSeconds(reserves[i]!)}`).join(', '));
  if (allowed) return;
  const refused = counters.filter((_, i) => reserves[i]!.available === 0);
  const wait = Math.max(1, ...refused.map((c) => resetSeconds(reserves[counters.indexOf(c)]!)));
  throw new HttpProblem({
    status: 429,
    slug: 'rate-limited',
    title: 'Too many requests',
    detail: `Rate limit reached (${refused.map((c) => `${c.name}: ${c.quota} requests per ${window} s`).join('; ')}). Retry in ${wait} s.`,
    extensions: { policies: refused.map((c) => c.name) },
    headers: { 'Retry-After': String(wait) },
  });
}
