// The supervisor `npm start` runs the app process under: a real child process that dies is started
// again after a growing delay, a stop ends it with SIGTERM, and an app that cannot start is given up on.
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { restartDelayMs, supervise } from '../../scripts/lib/supervise.mjs';

/**
 * A child that counts its starts in `file` and dies with exit code 1 (or by SIGKILL to itself) on
 * the first `crashes` of them; after that it writes `ready` and runs until it is signalled.
 */
function flakyChild(file: string, crashes: number, how: 'exit' | 'kill' = 'exit') {
  const script = `
    const fs = require('node:fs');
    const n = (fs.existsSync(process.argv[1]) ? Number(fs.readFileSync(process.argv[1], 'utf8').split(' ')[0]) : 0) + 1;
    if (n <= ${crashes}) { fs.writeFileSync(process.argv[1], n + ' crashed'); ${how === 'exit' ? 'process.exit(1)' : "process.kill(process.pid, 'SIGKILL')"}; }
    fs.writeFileSync(process.argv[1], n + ' ready');
    setInterval(() => {}, 1000);
  `;
  return () => spawn(process.execPath, ['-e', script, file], { stdio: 'ignore' });
}

const stateOf = (file: string) => readFileSync(file, 'utf8');

describe('the npm start supervisor', () => {
  it('waits 1 s after a first failure, doubling to at most 30 s', () => {
    expect([1, 2, 3, 4, 5, 6, 7, 12].map(restartDelayMs)).toEqual([1000, 2000, 4000, 8000, 16000, 30000, 30000, 30000]);
  });

  it('starts a dying app again with growing delays until it stays up, then stops it with SIGTERM', async () => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), 'gw-supervise-')), 'state');
    const waited: number[] = [];
    const logged: string[] = [];
    const app = supervise({ start: flakyChild(file, 3), log: (m) => logged.push(m), wait: async (ms) => void waited.push(ms) });
    await expect.poll(() => readFileSync(file, { flag: 'a+' }).toString(), { timeout: 30_000 }).toBe('4 ready');
    expect(waited).toEqual([1000, 2000, 4000]);
    expect(logged[0]).toMatch(/\(exit code 1\); starting it again in 1 s$/);
    const ended = await app.stop();
    expect(ended).toEqual({ code: null, signal: 'SIGTERM' });
    expect(stateOf(file)).toBe('4 ready');
  });

  it('counts a death by signal as a failure too', async () => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), 'gw-supervise-')), 'state');
    const app = supervise({ start: flakyChild(file, 1, 'kill'), log: () => {}, wait: async () => {} });
    await expect.poll(() => readFileSync(file, { flag: 'a+' }).toString(), { timeout: 30_000 }).toBe('2 ready');
    await app.stop();
  });

  it('ends a pending restart at once when stopped between two runs', async () => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), 'gw-supervise-')), 'state');
    let waiting!: () => void;
    const inWait = new Promise<void>((resolve) => (waiting = resolve));
    const app = supervise({
      start: flakyChild(file, 100),
      log: () => {},
      // Parks in the first wait until aborted, as a long backoff would.
      wait: (_ms, signal) => new Promise((resolve) => (waiting(), signal.addEventListener('abort', () => resolve(), { once: true }))),
    });
    await inWait;
    expect(await app.stop()).toEqual({ code: 1, signal: null });
    expect(stateOf(file)).toBe('1 crashed');
  });

  it('gives up on an app that dies right after every start', async () => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), 'gw-supervise-')), 'state');
    const logged: string[] = [];
    const app = supervise({ start: flakyChild(file, 100), log: (m) => logged.push(m), wait: async () => {}, giveUpAfter: 4 });
    expect(await app.done).toEqual({ code: 1, signal: null });
    expect(stateOf(file)).toBe('4 crashed');
    expect(logged.at(-1)).toMatch(/4 times in a row .* giving up/);
  });

  it('ends the supervision when the app stops by itself with exit code 0', async () => {
    const app = supervise({ start: () => spawn(process.execPath, ['-e', 'process.exit(0)']), log: () => {}, wait: async () => {} });
    expect(await app.done).toEqual({ code: 0, signal: null });
  });
});
