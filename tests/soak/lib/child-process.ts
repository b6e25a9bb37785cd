import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../..');

export interface Child {
  proc: ChildProcess;
  label: string;
  /** Everything the child wrote to stdout and stderr so far. */
  output(): string;
  /** Resolves with the first stdout line matching `pattern`, rejects after `timeoutMs` or on exit. */
  waitForLine(pattern: RegExp, timeoutMs?: number): Promise<RegExpMatchArray>;
  exited: Promise<number | null>;
  kill(signal?: NodeJS.Signals): Promise<number | null>;
}

/** Starts a TypeScript entry point under tsx, the way `npm run worker` does, on loopback only. */
export function spawnTs(entry: string, env: Record<string, string>, label: string, args: string[] = []): Child {
  const proc = spawn(process.execPath, ['--import', 'tsx', path.resolve(repoRoot, entry), ...args], {
    cwd: repoRoot,
    env: { ...process.env, HOST: '127.0.0.1', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let text = '';
  const waiters: Array<{ pattern: RegExp; resolve: (m: RegExpMatchArray) => void }> = [];
  const onData = (chunk: Buffer) => {
    text += chunk.toString('utf8');
    // Bounded: a long soak must not grow the runner's memory without limit.
    if (text.length > 4_000_000) text = text.slice(-2_000_000);
    for (const w of [...waiters]) {
      const m = text.match(w.pattern);
      if (m) {
        waiters.splice(waiters.indexOf(w), 1);
        w.resolve(m);
      }
    }
  };
  proc.stdout!.on('data', onData);
  proc.stderr!.on('data', onData);
  const exited = new Promise<number | null>((resolve) => proc.once('exit', (code, signal) => resolve(code ?? (signal ? -1 : null))));
  return {
    proc,
    label,
    output: () => text,
    waitForLine(pattern, timeoutMs = 60_000) {
      const m = text.match(pattern);
      if (m) return Promise.resolve(m);
      return new Promise((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error(`${label}: no line matching ${pattern} within ${timeoutMs} ms\n${text.slice(-3000)}`)), timeoutMs);
        waiters.push({ pattern, resolve: (found) => (clearTimeout(timer), resolve(found)) });
        exited.then((code) => {
          clearTimeout(timer);
          reject(new Error(`${label} exited (${code}) before printing ${pattern}\n${text.slice(-3000)}`));
        });
      });
    },
    exited,
    async kill(signal = 'SIGTERM') {
      if (proc.exitCode !== null || proc.signalCode !== null) return proc.exitCode;
      proc.kill(signal);
      const timer = setTimeout(() => proc.kill('SIGKILL'), 10_000);
      const code = await exited;
      clearTimeout(timer);
      return code;
    },
  };
}

export const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

/** Polls `check` until it returns a value other than undefined, or throws after `timeoutMs`. */
export async function waitFor<T>(what: string, check: () => Promise<T | undefined>, timeoutMs: number, everyMs = 250): Promise<T> {
  const until = Date.now() + timeoutMs;
  let lastError: unknown;
  for (;;) {
    try {
      const v = await check();
      if (v !== undefined) return v;
    } catch (err) {
      lastError = err;
    }
    if (Date.now() > until) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}${lastError ? `: ${String(lastError)}` : ''}`);
    await sleep(everyMs);
  }
}
