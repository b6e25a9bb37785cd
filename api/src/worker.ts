// `npm run worker`: a standalone solver worker. Start as many as the load needs, on any host that
// reaches the database; each run is claimed by exactly one of them.
import { createContext } from './bootstrap';
import { stopQueue } from './services/job-queue';
import { startWorkers } from './services/workers';
import { surviveDatabaseOutages } from './lib/survive-database-outages';

const ctx = await createContext();
surviveDatabaseOutages(ctx.log);
const workers = await startWorkers(ctx, { concurrency: ctx.config.workerConcurrency });
ctx.log.info({ workerId: workers.workerId, concurrency: ctx.config.workerConcurrency }, 'worker ready');
process.stdout.write(`worker ready ${workers.workerId}\n`);

// Runs still solving when the grace is over are queued again by the other workers as soon as this
// process's presence ends with it.
const SHUTDOWN_GRACE_MS = 5_000;

let stopping = false;
async function shutdown() {
  if (stopping) return;
  stopping = true;
  await workers.stop(SHUTDOWN_GRACE_MS);
  await stopQueue(ctx);
  await ctx.db.destroy();
  process.exit(0);
}
process.on('SIGINT', shutdown);
process.on('SIGTERM', shutdown);
