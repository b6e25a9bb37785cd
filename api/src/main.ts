// `npm start`: migrate, seed the demo, then serve the API + console and run a worker in this process.
import { createContext } from './bootstrap';
import { startServer } from './server';

const ctx = await createContext();
await ctx.db.runMigrations({ transaction: 'each' });

const server = await startServer(ctx);
const url = `http://${ctx.config.host}:${ctx.config.port}`;
ctx.log.info({ url }, 'Gridwright is serving');
process.stderr.write(`\n  Gridwright  ${url}\n  API docs    ${url}/docs\n  Readiness   ${url}/readyz\n\n`);

let stopping = false;
async function shutdown() {
  if (stopping) return;
  stopping = true;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  await ctx.db.destroy();
  process.exit(0);
}
process.on('SIGINT', shutdown);
process.on('SIGTERM', shutdown);
