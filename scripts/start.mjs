// `npm start`: install what is missing, start PostgreSQL and the local payment provider fake on
// loopback, then API + console + worker in one app process, started again with a growing delay
// whenever it dies (PostgreSQL and the fake stay up). Ctrl-C (or SIGTERM) stops the app, then the
// fake and PostgreSQL, then exits.
import { spawn } from 'node:child_process';
import { buildConsole, consoleBuilt, dataRoot, ensureNodeModules, log, root } from './lib/setup.mjs';
import { startFakePayments } from './lib/fake-payments.mjs';
import { localDatabase } from './lib/local-cluster.mjs';
import { supervise } from './lib/supervise.mjs';

ensureNodeModules();
const db = await localDatabase();
const payments = await startFakePayments({ log, dataDir: dataRoot() });
if (!consoleBuilt()) buildConsole();

const app = supervise({
  log,
  start: () =>
    spawn(process.execPath, ['--import', 'tsx', 'api/src/main.ts'], {
      cwd: root,
      stdio: 'inherit',
      env: { ...process.env, ...payments.env, DATABASE_URL: db.url, GRIDWRIGHT_DATA: dataRoot() },
    }),
});

let stopping = false;
async function shutdown(signal) {
  if (stopping) return;
  stopping = true;
  log(`${signal}: stopping…`);
  await app.stop();
}
process.on('SIGINT', () => shutdown('SIGINT'));
process.on('SIGTERM', () => shutdown('SIGTERM'));

const ended = await app.done;
await payments.stop();
db.stop();
if (db.startedHere) log('PostgreSQL stopped.');
process.exit(stopping ? 0 : (ended.code ?? 1));
