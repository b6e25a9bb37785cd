// Runs a command with a throwaway PostgreSQL cluster (used by `npm run test:soak`).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ensureNodeModules, log, root } from './lib/setup.mjs';
import { ensurePostgresInstalled, startCluster } from './lib/postgres.mjs';

ensureNodeModules();
const bin = ensurePostgresInstalled(log);
const tmp = mkdtempSync(path.join(os.tmpdir(), 'gw-soak-'));
const db = await startCluster({ bin, dir: path.join(tmp, 'postgres'), ephemeral: true, log });
const [cmd, ...args] = process.argv.slice(2);
const bin2 = cmd === 'tsx' ? [process.execPath, ['--import', 'tsx', ...args]] : [cmd, args];
const res = spawnSync(bin2[0], bin2[1], { cwd: root, stdio: 'inherit', env: { ...process.env, DATABASE_URL: db.url, GW_PG_DIR: db.dir, GW_PG_BIN: bin } });
db.stop();
rmSync(tmp, { recursive: true, force: true });
process.exit(res.status ?? 1);
