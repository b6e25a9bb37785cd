import { isDatabaseUnavailable } from './error-handler';
import type { Logger } from './logger';

const FIRST_WAIT_MS = 250;
const MAX_WAIT_MS = 5_000;

/**
 * Runs `write` again, backing off from a quarter second to five seconds, for as long as PostgreSQL
 * cannot be reached and `giveUp()` is false; any other error, or giving up, throws the last error.
 * For writes a process must not lose to a brief outage: a solved run's ending, a job's settlement.
 */
export async function retryWhileDatabaseUnavailable<T>(write: () => Promise<T>, opts: { log: Logger; what: string; giveUp: () => boolean }): Promise<T> {
  for (let waitMs = FIRST_WAIT_MS; ; waitMs = Math.min(MAX_WAIT_MS, waitMs * 2)) {
    try {
      return await write();
    } catch (err) {
      if (!isDatabaseUnavailable(err) || opts.giveUp()) throw err;
      opts.log.warn({ err }, `database unreachable while ${opts.what}; trying again`);
      await new Promise((resolve) => setTimeout(resolve, waitMs));
    }
  }
}
