import type { DataSource } from 'typeorm';
import type { Config } from './config';
import type { Logger } from './lib/logger';
import type { Metrics } from './lib/metrics';

/** What routes and services are given. Built once per process by main.ts, or per test. */
export interface AppContext {
  config: Config;
  db: DataSource;
  log: Logger;
  metrics: Metrics;
}
