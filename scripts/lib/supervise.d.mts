import type { ChildProcess } from 'node:child_process';

export function restartDelayMs(failuresInARow: number): number;

export interface Ended {
  code: number | null;
  signal: NodeJS.Signals | null;
}

export interface Supervision {
  done: Promise<Ended>;
  readonly child: ChildProcess | null;
  stop(): Promise<Ended>;
}

export function supervise(opts: {
  start: () => ChildProcess;
  log: (message: string) => void;
  stableMs?: number;
  giveUpAfter?: number;
  killAfterMs?: number;
  wait?: (ms: number, signal: AbortSignal) => Promise<void>;
  now?: () => number;
}): Supervision;
