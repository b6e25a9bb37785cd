// PostgreSQL cluster management for `npm start`, `npm test` and the admin CLI.
// Node built-ins only: this runs before `npm ci` may have installed anything.
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { chmodSync, chownSync, existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import path from 'node:path';

const isRoot = process.getuid?.() === 0;

export function findPostgresBinDir() {
  const debianRoot = '/usr/lib/postgresql';
  if (existsSync(debianRoot)) {
    const versions = readdirSync(debianRoot)
      .filter((v) => existsSync(path.join(debianRoot, v, 'bin', 'initdb')))
      .sort((a, b) => Number(b) - Number(a));
    if (versions.length) return path.join(debianRoot, versions[0], 'bin');
  }
  const found = spawnSync('sh', ['-c', 'command -v initdb'], { encoding: 'utf8' });
  if (found.status === 0 && found.stdout.trim()) return path.dirname(found.stdout.trim());
  return null;
}

export function ensurePostgresInstalled(log) {
  let bin = findPostgresBinDir();
  if (bin) return bin;
  if (!isRoot) {
    throw new Error(
      'PostgreSQL server binaries were not found. Install them (Debian: `sudo apt-get install postgresql`) ' +
        'or set DATABASE_URL to an existing database.',
    );
  }
  log('PostgreSQL not found: installing the Debian package `postgresql` (one time)…');
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
  execFileSync('apt-get', ['install', '-y', '-qq', 'postgresql'], { stdio: 'inherit', env });
  bin = findPostgresBinDir();
  if (!bin) throw new Error('apt-get installed postgresql but no initdb was found under /usr/lib/postgresql');
  return bin;
}

function ensurePostgresUser() {
  if (spawnSync('id', ['-u', 'postgres']).status === 0) return;
  execFileSync('useradd', ['--system', '--home-dir', '/var/lib/postgresql', '--shell', '/usr/sbin/nologin', 'postgres']);
}

function uidOf(user) {
  return Number(execFileSync('id', ['-u', user], { encoding: 'utf8' }).trim());
}

function gidOf(user) {
  return Number(execFileSync('id', ['-g', user], { encoding: 'utf8' }).trim());
}

// PostgreSQL refuses to run as root; as root we run it as the `postgres` OS user.
function asPgUser(cmd, args, opts = {}) {
  const full = isRoot ? ['runuser', ['-u', 'postgres', '--', cmd, ...args]] : [cmd, args];
  // From `/`: the caller's folder may be one the postgres user cannot enter (a private temp folder).
  return spawnSync(full[0], full[1], { encoding: 'utf8', cwd: '/', ...opts });
}

function canPgUserReach(dir) {
  if (!isRoot) return true;
  return asPgUser('test', ['-x', path.dirname(dir)]).status === 0;
}

/** Where clusters go whose data folder the postgres OS user cannot reach (a private temp folder, /root). */
const RELOCATION_ROOT = '/var/lib/gridwright';

/** The folder the cluster lives in: under `dataRoot`, or a reachable fallback when the OS user cannot traverse it. */
export function resolveClusterDir(dataRoot) {
  const wanted = path.resolve(dataRoot, 'postgres');
  mkdirSync(path.dirname(wanted), { recursive: true });
  if (canPgUserReach(wanted)) return { dir: wanted, relocated: false };
  const hash = createHash('sha256').update(wanted).digest('hex').slice(0, 12);
  // The postgres user must pass through the shared root to reach its own folder below it.
  mkdirSync(RELOCATION_ROOT, { recursive: true });
  chmodSync(RELOCATION_ROOT, 0o755);
  return { dir: path.join(RELOCATION_ROOT, hash, 'postgres'), relocated: true };
}

export function freePort(preferred) {
  return new Promise((resolve) => {
    const tryPort = (port) => {
      const srv = createServer();
      srv.once('error', () => (port === 0 ? resolve(0) : tryPort(0)));
      srv.listen(port, '127.0.0.1', () => {
        const { port: got } = srv.address();
        srv.close(() => resolve(got));
      });
    };
    tryPort(preferred ?? 0);
  });
}

function pgCtl(bin, args) {
  return asPgUser(path.join(bin, 'pg_ctl'), args);
}

function isRunning(bin, dir) {
  return existsSync(path.join(dir, 'postmaster.pid')) && pgCtl(bin, ['-D', dir, 'status']).status === 0;
}

function runningPort(dir) {
  const lines = readFileSync(path.join(dir, 'postmaster.pid'), 'utf8').split('\n');
  return Number(lines[3]);
}

/**
 * Starts (initialising when new) a cluster on 127.0.0.1 and returns its URL.
 * `stop()` stops it only when this call started it.
 */
export async function startCluster({ bin, dir, database = 'gridwright', ephemeral = false, log = () => {} }) {
  if (isRoot) ensurePostgresUser();
  mkdirSync(dir, { recursive: true, mode: 0o700 });
  if (isRoot) chownRecursiveTop(dir);
  const stateFile = path.join(path.dirname(dir), 'postgres.json');

  if (!existsSync(path.join(dir, 'PG_VERSION'))) {
    log(`Initialising a PostgreSQL cluster in ${dir}`);
    const init = asPgUser(path.join(bin, 'initdb'), ['-D', dir, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--locale=C.UTF-8']);
    if (init.status !== 0) throw new Error(`initdb failed:\n${init.stdout}\n${init.stderr}`);
  }

  let port;
  let startedHere = false;
  if (isRunning(bin, dir)) {
    port = runningPort(dir);
    log(`Reusing the PostgreSQL server already running on 127.0.0.1:${port}`);
  } else {
    const recorded = existsSync(stateFile) ? JSON.parse(readFileSync(stateFile, 'utf8')).port : undefined;
    port = await freePort(recorded);
    const settings = ['-p', String(port), '-c', 'listen_addresses=127.0.0.1', '-k', dir, '-c', 'max_connections=200'];
    if (ephemeral) settings.push('-c', 'fsync=off', '-c', 'synchronous_commit=off', '-c', 'full_page_writes=off');
    const res = pgCtl(bin, ['-D', dir, '-l', path.join(dir, 'server.log'), '-w', '-t', '60', '-o', settings.join(' '), 'start']);
    if (res.status !== 0) {
      const tail = existsSync(path.join(dir, 'server.log')) ? readFileSync(path.join(dir, 'server.log'), 'utf8').slice(-2000) : '';
      throw new Error(`PostgreSQL did not start:\n${res.stdout}\n${res.stderr}\n${tail}`);
    }
    startedHere = true;
  }
  if (!ephemeral) writeFileSync(stateFile, JSON.stringify({ port, dir }, null, 2) + '\n');

  const created = asPgUser(path.join(bin, 'createdb'), ['-h', '127.0.0.1', '-p', String(port), '-U', 'postgres', database]);
  if (created.status !== 0 && !/already exists/.test(created.stderr)) {
    throw new Error(`createdb ${database} failed: ${created.stderr}`);
  }

  const url = `postgres://postgres@127.0.0.1:${port}/${database}`;
  return {
    url,
    port,
    dir,
    startedHere,
    stop() {
      if (!startedHere) return;
      pgCtl(bin, ['-D', dir, '-m', 'fast', '-w', 'stop']);
      startedHere = false;
    },
    /** Stops the server regardless of who started it (used by tests that simulate an outage). */
    forceStop() {
      pgCtl(bin, ['-D', dir, '-m', 'fast', '-w', 'stop']);
    },
    restart() {
      const settings = ['-p', String(port), '-c', 'listen_addresses=127.0.0.1', '-k', dir, '-c', 'max_connections=200'];
      if (ephemeral) settings.push('-c', 'fsync=off', '-c', 'synchronous_commit=off');
      pgCtl(bin, ['-D', dir, '-l', path.join(dir, 'server.log'), '-w', '-o', settings.join(' '), 'start']);
    },
  };
}

function chownRecursiveTop(dir) {
  const uid = uidOf('postgres');
  const gid = gidOf('postgres');
  // Only the cluster folder and its immediate parent need to belong to postgres.
  for (const d of [path.dirname(dir), dir]) {
    if (statSync(d).uid !== uid) chownSync(d, uid, gid);
  }
}

/** Where a local cluster is recorded for GRIDWRIGHT_DATA (for CLIs that run beside `npm start`). */
export function readRecordedCluster(dataRoot) {
  const candidates = [path.resolve(dataRoot, 'postgres.json')];
  const { dir, relocated } = resolveClusterDir(dataRoot);
  if (relocated) candidates.push(path.join(path.dirname(dir), 'postgres.json'));
  for (const f of candidates) if (existsSync(f)) return JSON.parse(readFileSync(f, 'utf8'));
  return null;
}
