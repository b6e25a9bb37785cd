import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { z } from 'zod';
import { defaultSolverThreads } from './solver/solver-threads';

const LOG_LEVELS = ['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'] as const;

function wholeNumber(min: number, max?: number) {
  const accepts = max === undefined ? `must be a whole number, at least ${min}` : `must be a whole number from ${min} to ${max}`;
  return z
    .string()
    .refine((text) => /^\s*[+-]?\d+\s*$/.test(text) && Number(text) >= min && (max === undefined || Number(text) <= max), accepts)
    .transform(Number);
}

function decimalNumber(opts: { min: number } | { above: number }) {
  const accepts = 'min' in opts ? `must be a number, at least ${opts.min}` : `must be a number above ${opts.above}`;
  const inRange = (n: number) => ('min' in opts ? n >= opts.min : n > opts.above);
  return z
    .string()
    .refine((text) => /^\s*[+-]?(\d+\.?\d*|\.\d+)\s*$/.test(text) && inRange(Number(text)), accepts)
    .transform(Number);
}

const BYTE_SIZE = /^(\d+(?:\.\d+)?)\s*(b|kb|mb|gb)?$/i;
const BYTE_UNITS: Record<string, number> = { b: 1, kb: 1024, mb: 1024 ** 2, gb: 1024 ** 3 };

/** `8mb` → 8 388 608: units of 1024, as body-parser reads them. */
function byteSize(text: string): number {
  const [, amount, unit] = BYTE_SIZE.exec(text.trim())!;
  return Math.floor(Number(amount) * BYTE_UNITS[(unit ?? 'b').toLowerCase()]!);
}

const flag = z.enum(['true', 'false'], { error: 'must be true or false' }).transform((value) => value === 'true');

/**
 * Every environment variable Gridwright reads: what it accepts and its default. The README's
 * configuration table lists the same variables and defaults (a test compares them). Defaults that
 * follow from other settings (production, the host and port, the machine's cores) are filled in by
 * `loadConfig`.
 */
export const environmentSchema = z
  .object({
    NODE_ENV: z.enum(['development', 'test', 'production'], { error: 'must be development, test or production' }).default('development'),
    PORT: wholeNumber(0, 65_535).default(8080),
    HOST: z.string().default('127.0.0.1'),
    DATABASE_URL: z.string({ error: 'is not set (npm start sets it for the local cluster)' }),
    GRIDWRIGHT_DATA: z.string().default('.data'),
    PUBLIC_URL: z.url({ protocol: /^https?$/, error: 'must be an http:// or https:// URL' }).optional(),
    LOG_LEVEL: z.enum(LOG_LEVELS, { error: `must be one of ${LOG_LEVELS.join(', ')}` }).optional(),
    BODY_LIMIT: z
      .string()
      .regex(BYTE_SIZE, 'must be a size in bytes, or with a unit: 64kb, 8mb')
      .default('8mb'),
    JWT_SECRET: z.string().optional(),
    METRICS_TOKEN: z.string().min(16, 'must be at least 16 characters').optional(),
    SESSION_MINUTES: wholeNumber(1).default(60),
    COOKIE_SECURE: flag.optional(),
    TRUST_PROXY: flag.default(false),
    SMTP_URL: z.url({ protocol: /^smtps?$/, error: 'must be an smtp:// or smtps:// URL' }).optional(),
    LOCAL_SMTP_PORT: wholeNumber(0, 65_535).default(0),
    MAIL_FROM: z.string().default('Gridwright <no-reply@gridwright.local>'),
    SEED_DEMO: flag.optional(),
    DEFAULT_PLAN: z.string().default('pilot'),
    // bcrypt's own range of costs.
    BCRYPT_ROUNDS: wholeNumber(4, 31).optional(),
    SIGNIN_MAX_FAILURES: wholeNumber(1).default(5),
    SIGNIN_LOCK_MINUTES: wholeNumber(1).default(15),
    INVITATION_HOURS: decimalNumber({ above: 0 }).default(72),
    PASSWORD_RESET_MINUTES: decimalNumber({ above: 0 }).default(60),
    PASSWORD_RESET_EMAILS_PER_HOUR: wholeNumber(1).default(3),
    RATE_LIMIT_WINDOW_SECONDS: wholeNumber(1).default(10),
    CREDENTIAL_CACHE_SECONDS: wholeNumber(0, 3600).default(10),
    RUN_CACHE_SECONDS: wholeNumber(0, 60).default(2),
    WORKER_CONCURRENCY: wholeNumber(1).default(1),
    SOLVER_THREADS: wholeNumber(1).optional(),
    IDEMPOTENCY_HOURS: decimalNumber({ above: 0 }).default(24),
    RUN_EXPIRY_GRACE_SECONDS: decimalNumber({ min: 0 }).default(120),
    RUN_RETRY_LIMIT: wholeNumber(0).default(3),
    RUN_CANCEL_POLL_MS: wholeNumber(1).default(500),
    RUN_HEARTBEAT_STALE_SECONDS: decimalNumber({ above: 0 }).default(60),
    RUN_ORPHAN_SWEEP_SECONDS: decimalNumber({ above: 0 }).default(2),
    // pg-boss refuses a maintenance interval under one second; polling is only the fallback to wake-ups.
    QUEUE_MAINTENANCE_SECONDS: wholeNumber(1).default(30),
    QUEUE_POLLING_SECONDS: decimalNumber({ min: 0.5 }).default(1),
    WEBHOOK_CONCURRENCY: wholeNumber(1).default(8),
    WEBHOOK_ALLOW_LOOPBACK: flag.default(false),
    WEBHOOK_TIMEOUT_MS: wholeNumber(1).default(10_000),
    WEBHOOK_MAX_RESPONSE_BYTES: wholeNumber(1).default(65_536),
    WEBHOOK_RETRY_LIMIT: wholeNumber(0).default(8),
    WEBHOOK_RETRY_DELAY_SECONDS: wholeNumber(0).default(30),
    WEBHOOK_DISABLE_AFTER_FAILURES: wholeNumber(1).default(20),
    SERIES_MAX_BYTES: wholeNumber(1).default(5 * 1024 * 1024),
    BILLING_SECRET_KEY: z.string().regex(/^(sk|rk)_(test|live)_\w{8,}$/, 'must be a secret key of the payment provider: sk_test_…, sk_live_… or a restricted rk_… key').optional(),
    BILLING_WEBHOOK_SECRET: z.string().regex(/^whsec_\S{8,}$/, "must be the provider's signing secret of Gridwright's event endpoint: whsec_…").optional(),
    BILLING_API_URL: z.url({ protocol: /^https?$/, error: 'must be an http:// or https:// URL' }).optional(),
    BILLING_GRACE_DAYS: decimalNumber({ above: 0 }).default(7),
    BILLING_EVENT_TOLERANCE_SECONDS: wholeNumber(1).default(300),
  })
  .superRefine((env, ctx) => {
    if (env.NODE_ENV === 'production' && env.JWT_SECRET === undefined) {
      ctx.addIssue({ code: 'custom', path: ['JWT_SECRET'], message: 'must be set when NODE_ENV=production' });
    }
    // Half a configuration would take money without hearing back, or hear events it cannot act on.
    if ((env.BILLING_SECRET_KEY === undefined) !== (env.BILLING_WEBHOOK_SECRET === undefined)) {
      const missing = env.BILLING_SECRET_KEY === undefined ? 'BILLING_SECRET_KEY' : 'BILLING_WEBHOOK_SECRET';
      ctx.addIssue({ code: 'custom', path: [missing], message: 'must be set together with the other BILLING_ key (both, or neither to leave billing off)' });
    }
  });

function localSecret(dataDir: string): string {
  const file = path.join(dataDir, 'jwt-secret');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  mkdirSync(dataDir, { recursive: true });
  const secret = randomBytes(32).toString('hex');
  writeFileSync(file, secret + '\n', { mode: 0o600 });
  return secret;
}

/** Reads and checks the environment; an invalid or missing value stops start-up with a message naming each variable at fault and what it accepts. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env) {
  // An empty value counts as unset, as a shell's `PORT=` means.
  const given = Object.fromEntries(Object.entries(env).filter(([, value]) => value !== undefined && value !== ''));
  const parsed = environmentSchema.safeParse(given);
  if (!parsed.success) {
    // Values are not repeated: some carry credentials.
    throw new Error(`Invalid configuration:\n${parsed.error.issues.map((issue) => `  ${String(issue.path[0])} ${issue.message}`).join('\n')}`);
  }
  const e = parsed.data;
  const production = e.NODE_ENV === 'production';
  const test = e.NODE_ENV === 'test';
  const dataDir = path.resolve(e.GRIDWRIGHT_DATA);
  return {
    nodeEnv: e.NODE_ENV,
    production,
    databaseUrl: e.DATABASE_URL,
    host: e.HOST,
    port: e.PORT,
    publicUrl: (e.PUBLIC_URL ?? `http://${e.HOST}:${e.PORT}`).replace(/\/$/, ''),
    dataDir,
    logLevel: e.LOG_LEVEL ?? (test ? 'silent' : 'info'),
    /** Bytes of JSON body an authenticated caller may send. */
    bodyLimitBytes: byteSize(e.BODY_LIMIT),
    jwtSecret: e.JWT_SECRET ?? localSecret(dataDir),
    /** Bearer token /metrics asks for; null: only loopback clients are answered. */
    metricsToken: e.METRICS_TOKEN ?? null,
    sessionMinutes: e.SESSION_MINUTES,
    cookieSecure: e.COOKIE_SECURE ?? production,
    trustProxy: e.TRUST_PROXY,
    smtpUrl: e.SMTP_URL ?? null,
    mailFrom: e.MAIL_FROM,
    workerConcurrency: e.WORKER_CONCURRENCY,
    /** HiGHS threads a worker process shares among its runs (parallel segments and blocks). */
    solverThreads: e.SOLVER_THREADS ?? defaultSolverThreads(),
    webhookAllowLoopback: e.WEBHOOK_ALLOW_LOOPBACK,
    idempotencyHours: e.IDEMPOTENCY_HOURS,
    seedDemo: e.SEED_DEMO ?? !production,
    /** Port of the loopback SMTP server started when SMTP_URL is unset (0 = any free port). */
    localSmtpPort: e.LOCAL_SMTP_PORT,
    /** A credential may send `requestsPerSecond × this` requests per window of this many seconds, the tenant three times that. */
    rateLimitWindowSeconds: e.RATE_LIMIT_WINDOW_SECONDS,
    /** How long an API process may keep a key or tenant it looked up, should a change notice be missed (0: never keep one). */
    credentialCacheSeconds: e.CREDENTIAL_CACHE_SECONDS,
    /** How long an API process may keep the view of a queued or running run, should a change notice be missed (0: never keep one). */
    runCacheSeconds: e.RUN_CACHE_SECONDS,
    /** Failed sign-ins per account before it is locked; per address the limit is ten times this. */
    signInMaxFailures: e.SIGNIN_MAX_FAILURES,
    signInLockMinutes: e.SIGNIN_LOCK_MINUTES,
    invitationHours: e.INVITATION_HOURS,
    passwordResetMinutes: e.PASSWORD_RESET_MINUTES,
    /** Reset e-mails one address receives per hour at most; one client address may ask ten times as often. */
    passwordResetEmailsPerHour: e.PASSWORD_RESET_EMAILS_PER_HOUR,
    bcryptRounds: e.BCRYPT_ROUNDS ?? (test ? 4 : 12),
    defaultPlan: e.DEFAULT_PLAN,
    /** How far past its time limit a run may go: its worker stops it after half of this, pg-boss gives up its job after all of it. */
    runExpiryGraceSeconds: e.RUN_EXPIRY_GRACE_SECONDS,
    /** How often pg-boss expires and archives jobs (a backstop; orphaned runs are found by the sweep). */
    queueMaintenanceSeconds: e.QUEUE_MAINTENANCE_SECONDS,
    /** How often an idle queue consumer looks for due jobs it was not woken for (retries after a delay). */
    queuePollingSeconds: e.QUEUE_POLLING_SECONDS,
    /** Times a run is queued again after its worker was lost, before it ends failed (`worker-lost`). */
    runRetryLimit: e.RUN_RETRY_LIMIT,
    /** How often the attempt holding a run writes its heartbeat and reads the cancel flag. */
    runCancelPollMs: e.RUN_CANCEL_POLL_MS,
    /** A run whose attempt wrote no heartbeat for this long is queued again, even if its worker still holds its presence lock. */
    runHeartbeatStaleSeconds: e.RUN_HEARTBEAT_STALE_SECONDS,
    /** How often each worker process looks for runs whose worker is gone. */
    runOrphanSweepSeconds: e.RUN_ORPHAN_SWEEP_SECONDS,
    /** Webhook deliveries attempted at once per worker process. */
    webhookConcurrency: e.WEBHOOK_CONCURRENCY,
    webhookTimeoutMs: e.WEBHOOK_TIMEOUT_MS,
    webhookMaxResponseBytes: e.WEBHOOK_MAX_RESPONSE_BYTES,
    webhookRetryLimit: e.WEBHOOK_RETRY_LIMIT,
    webhookRetryDelaySeconds: e.WEBHOOK_RETRY_DELAY_SECONDS,
    webhookDisableAfterFailures: e.WEBHOOK_DISABLE_AFTER_FAILURES,
    seriesMaxBytes: e.SERIES_MAX_BYTES,
    /** The payment provider: its secret key, the signing secret of its events and where its API is (null: the provider's own). Null: billing is off. */
    billing: e.BILLING_SECRET_KEY && e.BILLING_WEBHOOK_SECRET ? { secretKey: e.BILLING_SECRET_KEY, webhookSecret: e.BILLING_WEBHOOK_SECRET, apiUrl: e.BILLING_API_URL ?? null } : null,
    /** Days a tenant keeps its paid plan after a renewal payment fails, before it falls back to the free plan. */
    billingGraceDays: e.BILLING_GRACE_DAYS,
    /** Oldest signature timestamp accepted on a provider event, in seconds. */
    billingEventToleranceSeconds: e.BILLING_EVENT_TOLERANCE_SECONDS,
  };
}

/** Every setting Gridwright reads, from the environment. */
export type Config = ReturnType<typeof loadConfig>;
