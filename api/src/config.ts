import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';

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
  webhookAllowLoopback: boolean;
  idempotencyHours: number;
  seedDemo: boolean;
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
    webhookAllowLoopback: env.WEBHOOK_ALLOW_LOOPBACK === 'true',
    idempotencyHours: Number(env.IDEMPOTENCY_HOURS ?? 24),
    seedDemo: env.SEED_DEMO ? env.SEED_DEMO === 'true' : !production,
  };
}
