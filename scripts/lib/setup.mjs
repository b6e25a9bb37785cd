// Install steps shared by `npm start` and `npm test`. Node built-ins only.
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

export function log(message) {
  process.stderr.write(`[gridwright] ${message}\n`);
}

export function ensureNodeModules() {
  const marker = path.join(root, 'node_modules', '.package-lock.json');
  if (existsSync(marker)) return;
  log('node_modules is missing: running `npm ci` (one time)…');
  execFileSync('npm', ['ci', '--no-audit', '--no-fund'], { cwd: root, stdio: 'inherit' });
}

export function ensureChromium() {
  if (process.env.CHROMIUM_PATH && existsSync(process.env.CHROMIUM_PATH)) return process.env.CHROMIUM_PATH;
  const debian = '/usr/bin/chromium';
  if (existsSync(debian)) return debian;
  if (process.getuid?.() !== 0) {
    throw new Error('Browser tests need Chromium: install the Debian package `chromium` or set CHROMIUM_PATH.');
  }
  log('Chromium not found: installing the Debian package `chromium` for the browser tests (one time)…');
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
  execFileSync('apt-get', ['install', '-y', '-qq', 'chromium'], { stdio: 'inherit', env });
  return debian;
}

/**
 * Debian's cbc and glpsol: independent solvers the reference checks compare the engine with.
 * Installed as root; without root the checks that need them are skipped outside CI.
 */
export function ensureReferenceSolvers() {
  if (existsSync('/usr/bin/cbc') && existsSync('/usr/bin/glpsol')) return;
  if (process.getuid?.() !== 0) {
    log('cbc or glpsol missing (Debian packages coinor-cbc, glpk-utils): their reference checks will be skipped.');
    return;
  }
  log('Installing the Debian packages coinor-cbc and glpk-utils for the reference checks (one time)…');
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
  execFileSync('apt-get', ['install', '-y', '-qq', 'coinor-cbc', 'glpk-utils'], { stdio: 'inherit', env });
}

export function consoleBuilt() {
  return existsSync(path.join(root, 'console', 'dist', 'index.html'));
}

export function buildConsole() {
  log('Building the console…');
  execFileSync('npm', ['run', '-w', 'console', 'build'], { cwd: root, stdio: 'inherit' });
}

/** Runs a command to completion, inheriting stdio; returns its exit code. */
export function run(cmd, args, opts = {}) {
  const res = spawnSync(cmd, args, { cwd: root, stdio: 'inherit', ...opts });
  return res.status ?? 1;
}

export function dataRoot() {
  return path.resolve(root, process.env.GRIDWRIGHT_DATA ?? '.data');
}
