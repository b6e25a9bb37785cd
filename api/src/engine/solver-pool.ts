import { readFile } from 'node:fs/promises';
import { createRequire } from 'node:module';
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import type { ModelArrays } from './model-arrays';
import type { SolveReply, SolveRequest, WorkerMessage } from './solver-protocol';

export class SolveAbortedError extends Error {
  constructor() {
    super('The solve was cancelled');
    this.name = 'SolveAbortedError';
  }
}

export class SolverCrashedError extends Error {
  constructor(detail: string) {
    super(`The solver worker failed: ${detail}`);
    this.name = 'SolverCrashedError';
  }
}

export interface SolveJob {
  model: ModelArrays;
  /** Counted from when a worker takes the job, not from when it was queued. */
  timeLimitSeconds: number;
  /** A `performance.now()` instant the job's time limit never reaches past, however long it queued. */
  deadlineMs?: number;
  mipGap: number;
  mipAbsGap?: number;
  wantIis?: boolean;
  wantDuals?: boolean;
  signal?: AbortSignal;
  onLog?: (line: string) => void;
}

export type SolveJobResult = Omit<SolveReply, 'type' | 'id'> & {
  /** The worker overran its time limit and was terminated; the result holds the last incumbent, if any. */
  killedAtDeadline: boolean;
  /** From the moment a worker took the job to its answer: solver time, without time spent queued. */
  workerSeconds: number;
};

export interface SolverPoolOptions {
  /** Worker threads solving in parallel. */
  size?: number;
  /** A worker is replaced after this many solves: long-lived WebAssembly instances have failed before. */
  solvesPerWorker?: number;
}

interface Slot {
  worker: Worker;
  solves: number;
  busy: boolean;
  dead: boolean;
}

interface Waiting {
  run: (slot: Slot) => void;
}

const WORKER_URL = new URL('./highs-worker.mjs', import.meta.url);

/** A WebAssembly.Module, opaque here: the api's TypeScript lib declares no WebAssembly types. */
type CompiledModule = object;
const { WebAssembly: wasm } = globalThis as unknown as { WebAssembly: { compile(bytes: Uint8Array): Promise<CompiledModule> } };

let compiledHighs: Promise<CompiledModule> | null = null;

/**
 * HiGHS compiled once per process and shared with every worker: a fresh worker then starts
 * without recompiling, and reuses the code V8 has already optimised for earlier workers.
 */
function compileHighs(): Promise<CompiledModule> {
  compiledHighs ??= readFile(createRequire(import.meta.url).resolve('highs/runtime')).then((bytes) => wasm.compile(bytes));
  return compiledHighs;
}

/** HiGHS's time_limit is soft; the worker is terminated this long after it (seconds). */
function graceSeconds(limit: number): number {
  return Math.max(2, 0.25 * limit);
}

/**
 * HiGHS in worker threads: a time limit, a cancel or a WebAssembly crash ends a worker,
 * never the process. Jobs queue when every worker is busy.
 */
export class SolverPool {
  private readonly size: number;
  private readonly solvesPerWorker: number;
  private readonly slots: Slot[] = [];
  private readonly waiting: Waiting[] = [];
  private nextId = 1;
  private solverVersion: string | null = null;
  private versionWaiters: ((v: string) => void)[] = [];
  private closed = false;
  private wasmModule: CompiledModule | null = null;

  constructor(options: SolverPoolOptions = {}) {
    this.size = Math.max(1, Math.floor(options.size ?? 1));
    this.solvesPerWorker = Math.max(1, options.solvesPerWorker ?? 1000);
  }

  /** How many solves run at once. */
  get threads(): number {
    return this.size;
  }

  /** The HiGHS version string of the loaded WebAssembly build. */
  async version(): Promise<string> {
    if (this.solverVersion) return this.solverVersion;
    await this.ready();
    if (!this.slots.length && !this.closed) this.spawn();
    return new Promise((resolve) => this.versionWaiters.push(resolve));
  }

  async solve(job: SolveJob): Promise<SolveJobResult> {
    if (this.closed) throw new Error('The solver pool is closed');
    if (job.signal?.aborted) throw new SolveAbortedError();
    await this.ready();
    return new Promise((resolve, reject) => {
      const run = (slot: Slot) => this.runOn(slot, job).then(resolve, reject);
      const free = this.acquire();
      if (free) run(free);
      else this.waiting.push({ run });
    });
  }

  /** Ends the threads that are not solving; the pool starts new ones when work comes. */
  releaseIdle(): void {
    for (const slot of this.slots.filter((s) => !s.busy)) {
      slot.dead = true;
      this.remove(slot);
      void slot.worker.terminate();
    }
  }

  async close(): Promise<void> {
    this.closed = true;
    const slots = this.slots.splice(0);
    await Promise.all(slots.map((s) => s.worker.terminate()));
  }

  private async ready(): Promise<void> {
    this.wasmModule ??= await compileHighs();
  }

  private acquire(): Slot | null {
    for (const s of this.slots) if (!s.busy && !s.dead) return s;
    if (this.slots.length < this.size) return this.spawn();
    return null;
  }

  private spawn(): Slot {
    const worker = new Worker(WORKER_URL, { workerData: { wasmModule: this.wasmModule } });
    const slot: Slot = { worker, solves: 0, busy: false, dead: false };
    worker.unref();
    worker.on('message', (msg: WorkerMessage) => {
      if (msg.type !== 'ready') return;
      this.solverVersion = msg.version;
      for (const w of this.versionWaiters.splice(0)) w(msg.version);
    });
    worker.on('exit', () => {
      slot.dead = true;
      this.remove(slot);
    });
    this.slots.push(slot);
    return slot;
  }

  private remove(slot: Slot): void {
    const at = this.slots.indexOf(slot);
    if (at >= 0) this.slots.splice(at, 1);
  }

  private release(slot: Slot, retire: boolean): void {
    slot.busy = false;
    if (retire || slot.solves >= this.solvesPerWorker) {
      slot.dead = true;
      this.remove(slot);
      void slot.worker.terminate();
    } else {
      slot.worker.unref();
    }
    const next = this.waiting.shift();
    if (next && !this.closed) {
      const free = this.acquire();
      if (free) next.run(free);
      else this.waiting.unshift(next);
    }
  }

  private runOn(slot: Slot, job: SolveJob): Promise<SolveJobResult> {
    slot.busy = true;
    slot.solves++;
    slot.worker.ref();
    const id = this.nextId++;
    const { worker } = slot;
    const dispatched = performance.now();
    const elapsed = () => (performance.now() - dispatched) / 1000;
    const timeLimitSeconds =
      job.deadlineMs === undefined ? job.timeLimitSeconds : Math.max(0.05, Math.min(job.timeLimitSeconds, (job.deadlineMs - performance.now()) / 1000));
    return new Promise<SolveJobResult>((resolve, reject) => {
      let incumbent: { colValue: Float64Array; objective: number } | null = null;
      let settled = false;
      const finish = (retire: boolean, outcome: () => void) => {
        if (settled) return;
        settled = true;
        clearTimeout(timer);
        worker.off('message', onMessage);
        worker.off('error', onError);
        worker.off('exit', onExit);
        job.signal?.removeEventListener('abort', onAbort);
        this.release(slot, retire);
        outcome();
      };
      const onMessage = (msg: WorkerMessage) => {
        if (msg.type === 'ready' || msg.id !== id) return;
        if (msg.type === 'log') job.onLog?.(msg.line);
        else if (msg.type === 'incumbent') incumbent = { colValue: msg.colValue, objective: msg.objective };
        else if (msg.type === 'error') finish(true, () => reject(new SolverCrashedError(msg.message)));
        else finish(false, () => resolve({ ...stripEnvelope(msg), killedAtDeadline: false, workerSeconds: elapsed() }));
      };
      const onError = (err: Error) => finish(true, () => reject(new SolverCrashedError(err.message)));
      const onExit = (code: number) => finish(true, () => reject(new SolverCrashedError(`exit code ${code}`)));
      const onAbort = () => finish(true, () => reject(new SolveAbortedError()));
      const timer = setTimeout(
        () =>
          finish(true, () =>
            resolve({
              status: 'time-limit',
              modelStatus: -1,
              colValue: incumbent?.colValue ?? null,
              objective: incumbent?.objective ?? null,
              dualBound: null,
              mipGap: null,
              nodes: 0,
              runSeconds: timeLimitSeconds + graceSeconds(timeLimitSeconds),
              iis: null,
              rowDual: null,
              killedAtDeadline: true,
              workerSeconds: elapsed(),
            }),
          ),
        (timeLimitSeconds + graceSeconds(timeLimitSeconds)) * 1000,
      );
      worker.on('message', onMessage);
      worker.on('error', onError);
      worker.on('exit', onExit);
      job.signal?.addEventListener('abort', onAbort, { once: true });
      const request: SolveRequest = {
        type: 'solve',
        id,
        model: job.model,
        timeLimitSeconds,
        mipGap: job.mipGap,
        ...(job.mipAbsGap !== undefined ? { mipAbsGap: job.mipAbsGap } : {}),
        wantIis: job.wantIis ?? false,
        wantDuals: job.wantDuals ?? false,
        wantLog: job.onLog !== undefined,
      };
      worker.postMessage(request);
    });
  }
}

function stripEnvelope(msg: SolveReply): Omit<SolveReply, 'type' | 'id'> {
  const { type: _type, id: _id, ...rest } = msg;
  return rest;
}

let defaultPool: SolverPool | null = null;

/** Solver threads when nobody says: one per core, at most four (each holds its own HiGHS heap). */
export function defaultSolverThreads(): number {
  return Math.max(1, Math.min(4, os.availableParallelism()));
}

/** The process-wide pool used when a caller passes none. */
export function defaultSolverPool(): SolverPool {
  defaultPool ??= new SolverPool({ size: defaultSolverThreads() });
  return defaultPool;
}
