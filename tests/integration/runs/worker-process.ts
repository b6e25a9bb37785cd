// Starts `api/src/worker.ts` as its own process, the way `npm run worker` does, against a test database.
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const root = path.resolve(import.meta.dirname, '../../..');

export interface WorkerProcess {
  child: ChildProcess;
  pid: number;
  /** The id the worker writes into `runs.worker_id`. */
  workerId: string;
  output(): string;
  stop(): Promise<void>;
}

export async function spawnWorker(databaseUrl: string, env: Record<string, string> = {}, readyTimeoutMs = 30_000): Promise<WorkerProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'api/src/worker.ts'], {
    cwd: root,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      PATH: process.env.PATH,
      NODE_ENV: 'test',
      LOG_LEVEL: 'warn',
      DATABASE_URL: databaseUrl,
      GRIDWRIGHT_DATA: mkdtempSync(path.join(os.tmpdir(), 'gw-worker-')),
      JWT_SECRET: 'test-secret-not-for-production',
      WORKER_CONCURRENCY: '1',
      // The repo root has no tsconfig.json; tsx needs the api's for its legacy decorators.
      TSX_TSCONFIG_PATH: path.join(root, 'api/tsconfig.json'),
      ...env,
    },
  });
  let out = '';
  child.stdout!.on('data', (c: Buffer) => (out += c.toString()));
  child.stderr!.on('data', (c: Buffer) => (out += c.toString()));
  const workerId = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`worker not ready in ${readyTimeoutMs} ms:\n${out}`)), readyTimeoutMs);
    const onData = () => {
      const m = /worker ready (\S+)/.exec(out);
      if (m) {
        clearTimeout(timer);
        child.stdout!.off('data', onData);
        resolve(m[1]);
      }
    };
    child.stdout!.on('data', onData);
    child.on('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`worker exited with ${code} before it was ready:\n${out}`));
    });
  });
  return {
    child,
    pid: child.pid!,
    workerId,
    output: () => out,
    async stop() {
      if (child.exitCode !== null || child.signalCode !== null) return;
      const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
      child.kill('SIGTERM');
      const timer = setTimeout(() => child.kill('SIGKILL'), 10_000);
      await exited;
      clearTimeout(timer);
    },
  };
}
