import type PgBoss from 'pg-boss';
import type { DataSource } from 'typeorm';
import type { Config } from './config';
import type { Logger } from './lib/logger';
import type { Metrics } from './lib/metrics';
import type { Mailer } from './services/mailer';

/** What routes and services are given. Built once per process by main.ts, or per test. */
export interface AppContext {
  config: Config;
  db: DataSource;
  log: Logger;
  metrics: Metrics;
  /** Outgoing e-mail (nodemailer), and the loopback SMTP server when SMTP_URL is unset. */
  mailer: Mailer;
  /** The job queue in the same PostgreSQL; started on first use (services/job-queue.ts). */
  boss: PgBoss;
}
