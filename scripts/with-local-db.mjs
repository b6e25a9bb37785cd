// Runs a command against the same database `npm start` uses (starting the local cluster for the
// command's duration when it is not already running).
import { spawnSync } from 'node:child_process';
import { dataRoot, ensureNodeModules, root } from './lib/setup.mjs';
import { localDatabase } from './lib/local-cluster.mjs';

ensureNodeModules();
const [cmd, ...args] = process.argv.slice(2);
const db = await localDatabase();
const bin = cmd === 'tsx' ? [process.execPath, ['--import', 'tsx', ...args]] : [cmd, args];
const res = spawnSync(bin[0], bin[1], {
  cwd: root,
  stdio: 'inherit',
  env: { ...process.env, DATABASE_URL: db.url, GRIDWRIGHT_DATA: dataRoot() },
});
db.stop();
process.exit(res.status ?? 1);
