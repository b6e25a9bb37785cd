// `npm start`: migrate, seed the demo, then serve the API + console and run a worker in this process.
import { createContext } from './bootstrap';
import { startServer } from './server';
import { seedDemoRuns } from './services/demo-runs';
import { describeDemoSeed, seedDemo } from './services/demo-seed';
import { stopQueue } from './services/job-queue';
import { startWorkers } from './services/workers';
import { surviveDatabaseOutages } from './lib/survive-database-outages';

const ctx = await createContext();
surviveDatabaseOutages(ctx.log);
await ctx.db.runMigrations({ transaction: 'each' });
const demo = ctx.config.seedDemo && !ctx.config.production ? await seedDemo(ctx) : null;

const server = await startServer(ctx);
const workers = await startWorkers(ctx, { concurrency: ctx.config.workerConcurrency });
// In the background: each demo run waits for the one before it to end.
const demoRuns = new AbortController();
if (demo) {
  seedDemoRuns(ctx, demo.tenantId, demoRuns.signal).catch((err) => {
    if (!demoRuns.signal.aborted) ctx.log.error({ err }, 'Seeding the demo runs failed');
  });
}
const url = `http://${ctx.config.host}:${ctx.config.port}`;
ctx.log.info({ url }, 'Gridwright is serving');
process.stderr.write(`\n  Gridwright  ${url}\n  API docs    ${url}/docs\n  Readiness   ${url}/readyz\n\n`);
if (ctx.mailer.localServer) process.stderr.write(`  E-mail      loopback SMTP on 127.0.0.1:${ctx.mailer.localServer.port}; messages in the console's outbox\n\n`);
if (ctx.config.billing) process.stderr.write(`  Billing     payment provider at ${ctx.config.billing.apiUrl ?? 'its own API'}; events at ${url}/hooks/payments\n\n`);
else process.stderr.write('  Billing     off (no BILLING_SECRET_KEY): plans are set by operators\n\n');
if (demo) process.stderr.write(describeDemoSeed(demo, url) + '\n');

let stopping = false;
async function shutdown() {
  if (stopping) return;
  stopping = true;
  demoRuns.abort();
  await new Promise<void>((resolve) => server.close(() => resolve()));
  // Runs still solving after 5 s are queued again by other workers once this process is gone.
  await workers.stop(5_000);
  await stopQueue(ctx);
  await ctx.mailer.close();
  await ctx.db.destroy();
  process.exit(0);
}
process.on('SIGINT', shutdown);
process.on('SIGTERM', shutdown);
