/** The result of a run (SPEC.md §3): what `GET /v1/runs/{id}` returns once succeeded and the CLI prints. */

export const RUN_STATUSES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];
/** `no-solution`: the time limit was hit before any feasible schedule was found. */
export type SolveOutcome = 'optimal' | 'feasible' | 'infeasible' | 'no-solution';

export interface ObjectiveReport {
  /** The SPEC.md §2 objective evaluated on the returned schedule; null when there is no schedule. */
  value: number | null;
  /** The solver's dual bound (monolithic only); null when unknown. */
  bound: number | null;
  /** Relative MIP gap; null when unknown. */
  gap: number | null;
}

export interface UnitKpis {
  energyKwh: number;
  starts: number;
  onSteps: number;
}

export interface StorageKpis {
  chargedKwh: number;
  dischargedKwh: number;
  finalSocKwh: number;
}

export interface Kpis {
  suppliedKwh: number;
  curtailedKwh: number;
  importKwh: number;
  exportKwh: number;
  unservedKwh: number;
  units: Record<string, UnitKpis>;
  storage: Record<string, StorageKpis>;
}

export interface UnitSchedule {
  /** 0 or 1 per step. */
  on: number[];
  powerKw: number[];
}

export interface StorageSchedule {
  chargeKw: number[];
  dischargeKw: number[];
  /** State of charge at the END of each step. */
  socKwh: number[];
}

export interface Schedule {
  /** Start of each step, ISO 8601 with the horizon's offset. */
  timestamps: string[];
  supplyUsedKw: number[];
  curtailedKw: number[];
  unservedKw: number[];
  grid: { importKw: number[]; exportKw: number[] };
  units: Record<string, UnitSchedule>;
  storage: Record<string, StorageSchedule>;
}

export interface WindowReport {
  /**
   * `window`: a model whose first `committedSteps` steps are kept. `seam-probe`: a window solved
   * only to choose the state where a parallel segment of the rolling horizon starts; it keeps nothing.
   */
  kind: 'window' | 'seam-probe';
  fromStep: number;
  /** Last step of the window's model (inclusive). */
  toStep: number;
  committedSteps: number;
  outcome: SolveOutcome;
  gap: number | null;
  /** Independent parts the model split into and was solved in (reduction `independentBlocks`). */
  blocks: number;
  solveSeconds: number;
}

/** [smallest, largest] absolute non-zero value; null when the model has no such coefficient. */
export type CoefficientSpan = [number, number] | null;

export interface ModelReport {
  mode: 'monolithic' | 'rolling';
  windows: WindowReport[];
  /** Counts are summed over all windows in rolling mode. */
  variables: number;
  binaries: number;
  binariesPruned: number;
  constraints: number;
  nonzeros: number;
  /** After scaling, across all windows. */
  coefficientRange: { matrix: CoefficientSpan; objective: CoefficientSpan; bounds: CoefficientSpan; rhs: CoefficientSpan };
  /** Every big-M in kW (unscaled); one entry per place, the largest value over steps. */
  bigM: { where: string; value: number }[];
  reductions: { sparseSets: boolean; tightBigM: boolean; scaling: boolean; relaxExclusivity: boolean; independentBlocks: boolean };
  /** Rolling mode: sequences of windows solved side by side (1: one sequence). */
  segments: number;
  /** The internal units chosen by `scaling` (1 kW and 1 money unit when off). */
  scale: { powerKw: number; money: number };
  buildSeconds: number;
  solveSeconds: number;
  solver: { name: string; version: string };
}

export interface StepRange {
  from: number;
  /** Inclusive. */
  to: number;
}

export interface ResultWarning {
  code: string;
  message: string;
  /** RFC 6901 pointer into the submitted spec. */
  pointer?: string;
  steps?: StepRange[];
}

export interface RunResult {
  status: RunStatus;
  outcome: SolveOutcome;
  objective: ObjectiveReport;
  /** null when there is no schedule (infeasible, no-solution). */
  kpis: Kpis | null;
  schedule: Schedule | null;
  model: ModelReport;
  warnings: ResultWarning[];
}
