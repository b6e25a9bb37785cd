// `npm run dev`: the api (restarting on change) on :8080 and Vite with hot reload on :5173.
import { spawn } from 'node:child_process';
import { dataRoot, ensureNodeModules, root } from './lib/setup.mjs';
import { localDatabase } from './lib/local-cluster.mjs';

ensureNodeModules();
const db = await localDatabase();
const env = { ...process.env, DATABASE_URL: db.url, GRIDWRIGHT_DATA: dataRoot() };
const children = [
  spawn('npx', ['tsx', 'watch', 'api/src/main.ts'], { cwd: root, stdio: 'inherit', env }),
  spawn('npm', ['run', '-w', 'console', 'dev'], { cwd: root, stdio: 'inherit', env }),
];
let exited = 0;
const stopAll = () => children.forEach((c) => c.kill('SIGTERM'));
process.on('SIGINT', stopAll);
process.on('SIGTERM', stopAll);
for (const child of children) {
  child.on('exit', () => {
    if (++exited === children.length) {
      db.stop();
      process.exit(0);
    }
    stopAll();
  });
}
