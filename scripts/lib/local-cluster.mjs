import { ensurePostgresInstalled, resolveClusterDir, startCluster } from './postgres.mjs';
import { dataRoot, log } from './setup.mjs';

/** The database for `npm start` and the CLIs: DATABASE_URL when set, else the cluster under GRIDWRIGHT_DATA. */
export async function localDatabase() {
  if (process.env.DATABASE_URL) return { url: process.env.DATABASE_URL, stop() {} };
  const bin = ensurePostgresInstalled(log);
  const { dir, relocated } = resolveClusterDir(dataRoot());
  if (relocated) {
    log(`The postgres OS user cannot reach ${dataRoot()} through its parent folders; the cluster lives in ${dir} instead.`);
  }
  return startCluster({ bin, dir, log });
}
