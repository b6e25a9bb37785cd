import { loadConfig, type Config } from './config';
import type { AppContext } from './context';
import { createDataSource } from './db/data-source';
import { createBoss } from './services/job-queue';
import { createLogger } from './lib/logger';
import { createMetrics } from './lib/metrics';
import { createMailer } from './services/mailer';

/** Connects to the database and assembles the context every process entry point shares. */
export async function createContext(config: Config = loadConfig()): Promise<AppContext> {
  const log = createLogger(config.logLevel);
  const db = createDataSource(config.databaseUrl);
  await db.initialize();
  const mailer = await createMailer(config, db, log);
  return { config, db, log, metrics: createMetrics(), boss: createBoss(config, log), mailer };
}
