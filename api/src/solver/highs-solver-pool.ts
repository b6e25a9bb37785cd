import { Worker } from 'node:worker_threads';
import { MIN_SOLVE_SECONDS, solverOverrunSeconds } from '../engine/deadline';
import type { ModelArrays } from '../engine/model-arrays';
import { SolveAbortedError, type SolveReply, type SolveRequest, type SolverIdentity, type SolverPort } from '../engine/solver-port';
import { compileHighs, type CompiledHighs } from './compile-highs';
import type { HighsSolveMessage, HighsWorkerData, HighsWorkerMessage } from './highs-protocol';

export class SolverCrashedError extends Error {
  constructor(detail: string) {
    super(`The solver worker failed: ${detail}`);
    this.name = 'SolverCrashedError';
  }
}

export interface HighsSolverPoolOptions {
  /** Worker threads solving in parallel. */
  size?: number;
  /** A worker is replaced after this many solves: long-lived WebAssembly instances have failed before. */
  solvesPerWorker?: number;
}

interface Slot {
  worker: Worker;
  /** Shared with the thread: 1 asks HiGHS to stop at its next check (highs-worker-main.ts). */
  interrupt: Int32Array;
  solves: number;
  busy: boolean;
  dead: boolean;
}

/**
 * A thread asked to stop (a cancel, or a solve past its kill time) normally answers within
 * milliseconds, from HiGHS's next interrupt check, and stays warm for the next solve; one that
 * has not answered after this long is terminated.
 */
const INTERRUPT_GRACE_MS = 1_000;

interface Waiting {
  run: (slot: Slot) => void;
}

const WORKER_URL = new URL('./highs-worker.mjs', import.meta.url);

/**
 * HiGHS in worker threads, as the engine's solver port: a time limit, a cancel or a
 * WebAssembly crash ends a solve, never the process. A cancelled solve is interrupted through a
 * flag the thread shares, so the thread stays warm; only a thread that does not stop, or that
 * crashed, is terminated. Solves queue when every worker is busy.
 */
export class HighsSolverPool implements SolverPort {
  private readonly size: number;
  private readonly solvesPerWorker: number;
  private readonly slots: Slot[] = [];
  private readonly waiting: Waiting[] = [];
  private nextId = 1;
  private started = 0;
  private solverVersion: string | null = null;
  private versionWaiters: ((v: string) => void)[] = [];
  private closed = false;
  private compiled: Promise<CompiledHighs> | null = null;
  private wasmModule: CompiledHighs | null = null;

  constructor(options: HighsSolverPoolOptions = {}) {
    this.size = Math.max(1, Math.floor(options.size ?? 1));
    this.solvesPerWorker = Math.max(1, options.solvesPerWorker ?? 1000);
  }

  get concurrency(): number {
    return this.size;
  }

  /** Threads started so far: one per slot, plus one for each thread retired, terminated or crashed. */
  get threadsStarted(): number {
    return this.started;
  }

  /** HiGHS and the version string of the loaded WebAssembly build. */
  async describe(): Promise<SolverIdentity> {
    return { name: 'HiGHS', version: await this.version() };
  }

  async solve(model: ModelArrays, request: SolveRequest): Promise<SolveReply> {
    if (this.closed) throw new Error('The solver pool is closed');
    if (request.signal?.aborted) throw new SolveAbortedError();
    await this.ready();
    return new Promise((resolve, reject) => {
      const run = (slot: Slot) => this.runOn(slot, model, request).then(resolve, reject);
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

  private async version(): Promise<string> {
    if (this.solverVersion) return this.solverVersion;
    await this.ready();
    if (!this.slots.length && !this.closed) this.spawn();
    return new Promise((resolve) => this.versionWaiters.push(resolve));
  }

  private async ready(): Promise<void> {
    this.compiled ??= compileHighs();
    this.wasmModule ??= await this.compiled;
  }

  private acquire(): Slot | null {
    for (const s of this.slots) if (!s.busy && !s.dead) return s;
    if (this.slots.length < this.size) return this.spawn();
    return null;
  }

  private spawn(): Slot {
    const interruptFlag = new SharedArrayBuffer(Int32Array.BYTES_PER_ELEMENT);
    const workerData: HighsWorkerData = { wasmModule: this.wasmModule!, interruptFlag };
    const worker = new Worker(WORKER_URL, { workerData });
    this.started++;
    const slot: Slot = { worker, interrupt: new Int32Array(interruptFlag), solves: 0, busy: false, dead: false };
    worker.unref();
    worker.on('message', (msg: HighsWorkerMessage) => {
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

  private runOn(slot: Slot, model: ModelArrays, request: SolveRequest): Promise<SolveReply> {
    slot.busy = true;
    slot.solves++;
    slot.worker.ref();
    Atomics.store(slot.interrupt, 0, 0);
    const id = this.nextId++;
    const { worker } = slot;
    const dispatched = performance.now();
    const elapsed = () => (performance.now() - dispatched) / 1000;
    // Counted from here, when a thread takes the model: time spent queued has already been spent.
    const timeLimitSeconds = Math.max(MIN_SOLVE_SECONDS, request.deadline.remainingSeconds());
    const killAfterSeconds = timeLimitSeconds + solverOverrunSeconds(timeLimitSeconds);
    return new Promise<SolveReply>((resolve, reject) => {
      let incumbent: { colValue: Float64Array; objective: number } | null = null;
      let answered = false;
      let freed = false;
      let grace: ReturnType<typeof setTimeout> | undefined;
      // The caller's answer and the thread's release are separate: an interrupted thread is
      // released when it has stopped, after its caller was answered.
      const answer = (outcome: () => void) => {
        if (answered) return;
        answered = true;
        request.signal?.removeEventListener('abort', onAbort);
        outcome();
      };
      const free = (retire: boolean) => {
        if (freed) return;
        freed = true;
        clearTimeout(timer);
        clearTimeout(grace);
        worker.off('message', onMessage);
        worker.off('error', onError);
        worker.off('exit', onExit);
        this.release(slot, retire);
      };
      const stop = () => {
        Atomics.store(slot.interrupt, 0, 1);
        grace = setTimeout(() => free(true), INTERRUPT_GRACE_MS);
      };
      const onMessage = (msg: HighsWorkerMessage) => {
        if (msg.type === 'ready' || msg.id !== id) return;
        if (msg.type === 'log') request.onLog?.(msg.line);
        else if (msg.type === 'incumbent') incumbent = { colValue: msg.colValue, objective: msg.objective };
        else if (msg.type === 'error') {
          free(true);
          answer(() => reject(new SolverCrashedError(msg.message)));
        } else {
          free(false);
          const { type: _type, id: _id, ...result } = msg;
          answer(() => resolve({ ...result, killedAtDeadline: false, workerSeconds: elapsed() }));
        }
      };
      const onError = (err: Error) => {
        free(true);
        answer(() => reject(new SolverCrashedError(err.message)));
      };
      const onExit = (code: number) => {
        free(true);
        answer(() => reject(new SolverCrashedError(`exit code ${code}`)));
      };
      const onAbort = () => {
        answer(() => reject(new SolveAbortedError()));
        stop();
      };
      // HiGHS's time_limit is soft: past it by the allowed overrun, the caller gets the last
      // incumbent and the thread is stopped.
      const timer = setTimeout(() => {
        answer(() =>
          resolve({
            status: 'time-limit',
            solverStatus: `HiGHS stopped ${killAfterSeconds.toFixed(1)} s after it took the model`,
            colValue: incumbent?.colValue ?? null,
            objective: incumbent?.objective ?? null,
            dualBound: null,
            mipGap: null,
            rowDual: null,
            iis: null,
            killedAtDeadline: true,
            workerSeconds: elapsed(),
          }),
        );
        stop();
      }, killAfterSeconds * 1000);
      worker.on('message', onMessage);
      worker.on('error', onError);
      worker.on('exit', onExit);
      request.signal?.addEventListener('abort', onAbort, { once: true });
      const message: HighsSolveMessage = {
        type: 'solve',
        id,
        model,
        timeLimitSeconds,
        stopWithSolutionAfterSeconds: request.stopWithSolutionBy ? Math.min(timeLimitSeconds, request.stopWithSolutionBy.remainingSeconds()) : null,
        mipGap: request.mipGap,
        mipStart: request.mipStart ?? null,
        ...(request.mipAbsGap !== undefined ? { mipAbsGap: request.mipAbsGap } : {}),
        wantIis: request.wantIis ?? false,
        wantDuals: request.wantDuals ?? false,
        wantLog: request.onLog !== undefined,
      };
      worker.postMessage(message);
    });
  }
}
