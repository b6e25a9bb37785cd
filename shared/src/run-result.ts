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
  /** Starts after more than `coldAfterSteps` steps off (all starts count as hot when the unit has one start cost). */
  coldStarts: number;
  onSteps: number;
}

export interface StorageKpis {
  chargedKwh: number;
  dischargedKwh: number;
  finalSocKwh: number;
}

/** Totals of one store over the horizon, in its own unit. */
export interface StoreKpis {
  produced: number;
  consumed: number;
  /** The demand met (the demand less the shortfall). */
  delivered: number;
  shortfall: number;
  spilled: number;
  finalLevel: number;
}

export interface DemandChargeKpis {
  /** The highest import in the charge's window, at least its existingPeakKw. */
  peakKw: number;
  /** pricePerKw × (peakKw − existingPeakKw). */
  cost: number;
}

/**
 * Where the money goes: each a signed contribution (value positive, cost negative) to
 * `objective.value`, which they sum to.
 */
export interface ObjectiveTerms {
  /** Export revenue − import cost + the value of flexible loads − generators' energy cost (their curves). */
  energy: number;
  noLoad: number;
  starts: number;
  demandCharges: number;
  /** Unserved load, reserve shortfall and store shortfall, each at its penalty. */
  penalties: number;
  cycleCost: number;
}

export interface Kpis {
  suppliedKwh: number;
  curtailedKwh: number;
  importKwh: number;
  exportKwh: number;
  unservedKwh: number;
  /** kWh of spinning reserve short of the requirement (0 without a requirement). */
  reserveShortfallKwh: number;
  units: Record<string, UnitKpis>;
  storage: Record<string, StorageKpis>;
  stores: Record<string, StoreKpis>;
  demandCharges: Record<string, DemandChargeKpis>;
  objectiveTerms: ObjectiveTerms;
}

export interface UnitSchedule {
  /** 0 or 1 per step. */
  on: number[];
  powerKw: number[];
  /** Spinning reserve the unit holds per step; present when the spec has a reserve and the unit provides it. */
  reserveKw?: number[];
}

export interface StorageSchedule {
  chargeKw: number[];
  dischargeKw: number[];
  /** State of charge at the END of each step. */
  socKwh: number[];
  /** Spinning reserve the battery holds per step; present when the spec has a reserve and the battery provides it. */
  reserveKw?: number[];
}

export interface StoreSchedule {
  /** Level at the END of each step, in the store's unit. */
  level: number[];
  /** Demand not met per step (store unit per hour). */
  shortfall: number[];
  /** Product discarded per step (store unit per hour). */
  spill: number[];
}

export interface ReserveSchedule {
  requiredKw: number[];
  /** What the units and batteries that provide reserve hold: their headroom. */
  providedKw: number[];
  shortfallKw: number[];
}

/**
 * Marginal values from the LP with every on/off and exclusivity decision fixed at the schedule's:
 * what one more kWh delivered to the site (one more unit into a store) at that step is worth, in
 * money per kWh (per store unit). null where no price is known.
 */
export interface MarginalValues {
  energyPerKwh: (number | null)[];
  stores: Record<string, (number | null)[]>;
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
  stores: Record<string, StoreSchedule>;
  /** null when the spec has no reserve requirement. */
  reserve: ReserveSchedule | null;
  marginalValues: MarginalValues;
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
  /** `stores`: per store, the internal unit of its level (a model level of 1 is that many units). */
  scale: { powerKw: number; money: number; stores: Record<string, number> };
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
