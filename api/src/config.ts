import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { defaultSolverThreads } from './solver/solver-threads';

/** Every setting Gridwright reads, from the environment (the README's configuration table lists them). */
export interface Config {
  nodeEnv: string;
  production: boolean;
  databaseUrl: string;
  host: string;
  port: number;
  publicUrl: string;
  dataDir: string;
  logLevel: string;
  bodyLimit: string;
  jwtSecret: string;
  sessionMinutes: number;
  cookieSecure: boolean;
  trustProxy: boolean;
  smtpUrl: string | null;
  mailFrom: string;
  workerConcurrency: number;
  /** SOLVER_THREADS: HiGHS threads a worker process shares among its runs (parallel segments and blocks). */
  solverThreads: number;
  webhookAllowLoopback: boolean;
  idempotencyHours: number;
  seedDemo: boolean;
  /** Port of the loopback SMTP server started when SMTP_URL is unset (LOCAL_SMTP_PORT; 0 = any free port). */
  localSmtpPort: number;
  /** RATE_LIMIT_WINDOW_SECONDS: a credential may send `requestsPerSecond × this` requests per window of this many seconds, the tenant three times that. */
  rateLimitWindowSeconds: number;
  /** SIGNIN_MAX_FAILURES: failed sign-ins per account before it is locked; per address the limit is ten times this. */
  signInMaxFailures: number;
  /** How long a locked account or address stays locked (SIGNIN_LOCK_MINUTES). */
  signInLockMinutes: number;
  /** Lifetime of an invitation link (INVITATION_HOURS). */
  invitationHours: number;
  /** Lifetime of a password-reset link (PASSWORD_RESET_MINUTES). */
  passwordResetMinutes: number;
  /** bcrypt cost for stored passwords (BCRYPT_ROUNDS; 12, or 4 under NODE_ENV=test). */
  bcryptRounds: number;
  /** DEFAULT_PLAN: the plan a tenant gets when none is named. */
  defaultPlan: string;
  /** A run's queue job expires (and is retried, as after a crash) this long after its solver time limit. */
  runExpiryGraceSeconds: number;
  /** How often pg-boss looks for expired jobs; bounds how soon a crashed worker's run is picked up again. */
  queueMaintenanceSeconds: number;
  queuePollingSeconds: number;
  runRetryLimit: number;
  runCancelPollMs: number;
  webhookTimeoutMs: number;
  webhookMaxResponseBytes: number;
  webhookRetryLimit: number;
  webhookRetryDelaySeconds: number;
  webhookDisableAfterFailures: number;
  seriesMaxBytes: number;
}

function localSecret(dataDir: string): string {
  const file = path.join(dataDir, 'jwt-secret');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  mkdirSync(dataDir, { recursive: true });
  const secret = randomBytes(32).toString('hex');
  writeFileSync(file, secret + '\n', { mode: 0o600 });
  return secret;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const nodeEnv = env.NODE_ENV ?? 'development';
  const production = nodeEnv === 'production';
  const port = Number(env.PORT ?? 8080);
  const host = env.HOST ?? '127.0.0.1';
  const dataDir = path.resolve(env.GRIDWRIGHT_DATA ?? '.data');
  if (!env.DATABASE_URL) throw new Error('DATABASE_URL is not set (npm start sets it for the local cluster).');
  if (production && !env.JWT_SECRET) throw new Error('JWT_SECRET must be set when NODE_ENV=production.');
  return {
    nodeEnv,
    production,
    databaseUrl: env.DATABASE_URL,
    host,
    port,
    publicUrl: (env.PUBLIC_URL ?? `http://${host}:${port}`).replace(/\/$/, ''),
    dataDir,
    logLevel: env.LOG_LEVEL ?? (nodeEnv === 'test' ? 'silent' : 'info'),
    bodyLimit: env.BODY_LIMIT ?? '8mb',
    jwtSecret: env.JWT_SECRET ?? localSecret(dataDir),
    sessionMinutes: Number(env.SESSION_MINUTES ?? 60),
    cookieSecure: env.COOKIE_SECURE ? env.COOKIE_SECURE === 'true' : production,
    trustProxy: env.TRUST_PROXY === 'true',
    smtpUrl: env.SMTP_URL ?? null,
    mailFrom: env.MAIL_FROM ?? 'Gridwright <no-reply@gridwright.local>',
    workerConcurrency: Number(env.WORKER_CONCURRENCY ?? 1),
    solverThreads: Math.max(1, Math.floor(Number(env.SOLVER_THREADS ?? defaultSolverThreads()))),
    webhookAllowLoopback: env.WEBHOOK_ALLOW_LOOPBACK === 'true',
    idempotencyHours: Number(env.IDEMPOTENCY_HOURS ?? 24),
    seedDemo: env.SEED_DEMO ? env.SEED_DEMO === 'true' : !production,
    localSmtpPort: Number(env.LOCAL_SMTP_PORT ?? 0),
    rateLimitWindowSeconds: Number(env.RATE_LIMIT_WINDOW_SECONDS ?? 10),
    signInMaxFailures: Number(env.SIGNIN_MAX_FAILURES ?? 5),
    signInLockMinutes: Number(env.SIGNIN_LOCK_MINUTES ?? 15),
    invitationHours: Number(env.INVITATION_HOURS ?? 72),
    passwordResetMinutes: Number(env.PASSWORD_RESET_MINUTES ?? 60),
    bcryptRounds: Number(env.BCRYPT_ROUNDS ?? (nodeEnv === 'test' ? 4 : 12)),
    defaultPlan: env.DEFAULT_PLAN ?? 'pilot',
    runExpiryGraceSeconds: Number(env.RUN_EXPIRY_GRACE_SECONDS ?? 120),
    queueMaintenanceSeconds: Number(env.QUEUE_MAINTENANCE_SECONDS ?? 30),
    queuePollingSeconds: Number(env.QUEUE_POLLING_SECONDS ?? 1),
    runRetryLimit: Number(env.RUN_RETRY_LIMIT ?? 3),
    runCancelPollMs: Number(env.RUN_CANCEL_POLL_MS ?? 500),
    webhookTimeoutMs: Number(env.WEBHOOK_TIMEOUT_MS ?? 10_000),
    webhookMaxResponseBytes: Number(env.WEBHOOK_MAX_RESPONSE_BYTES ?? 65_536),
    webhookRetryLimit: Number(env.WEBHOOK_RETRY_LIMIT ?? 8),
    webhookRetryDelaySeconds: Number(env.WEBHOOK_RETRY_DELAY_SECONDS ?? 30),
    webhookDisableAfterFailures: Number(env.WEBHOOK_DISABLE_AFTER_FAILURES ?? 20),
    seriesMaxBytes: Number(env.SERIES_MAX_BYTES ?? 5 * 1024 * 1024),
  };
}
