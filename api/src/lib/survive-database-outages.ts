import { isDatabaseUnavailable } from './error-handler';
import type { Logger } from './logger';

/**
 * A dropped PostgreSQL connection can surface outside any request or job (an idle pool client's
 * 'error' event, a poll whose promise nobody awaits). The state lives in the database and the
 * pools reconnect by themselves, so those errors are logged and the process keeps serving; any
 * other stray error still ends the process, as Node would.
 */
export function surviveDatabaseOutages(log: Logger): void {
  const onStray = (kind: string) => (err: unknown) => {
    if (isDatabaseUnavailable(err)) {
      log.warn({ err }, `database connection lost (${kind}); carrying on`);
      return;
    }
    log.fatal({ err }, `${kind}; exiting`);
    process.exit(1);
  };
  process.on('unhandledRejection', onStray('unhandled rejection'));
  process.on('uncaughtException', onStray('uncaught exception'));
}
