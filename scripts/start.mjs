// `npm start`: install what is missing, start PostgreSQL on loopback, then API + console + worker.
import { spawn } from 'node:child_process';
import { buildConsole, consoleBuilt, dataRoot, ensureNodeModules, log, root } from './lib/setup.mjs';
import { localDatabase } from './lib/local-cluster.mjs';

ensureNodeModules();
const db = await localDatabase();
if (!consoleBuilt()) buildConsole();

const child = spawn(process.execPath, ['--import', 'tsx', 'api/src/main.ts'], {
  cwd: root,
  stdio: 'inherit',
  env: { ...process.env, DATABASE_URL: db.url, GRIDWRIGHT_DATA: dataRoot() },
});

let stopping = false;
function shutdown(signal) {
  if (stopping) return;
  stopping = true;
  log(`${signal}: stopping…`);
  child.kill('SIGTERM');
}
process.on('SIGINT', () => shutdown('SIGINT'));
process.on('SIGTERM', () => shutdown('SIGTERM'));

child.on('exit', (code, signal) => {
  db.stop();
  if (db.startedHere) log('PostgreSQL stopped.');
  process.exit(code ?? (signal ? 0 : 1));
});
