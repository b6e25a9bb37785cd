import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { chooseScales, type Scales } from './choose-scales';
import { TINY } from './numerics';
import { ratingSums, storageStepLimits } from './site-ratings';

/** A slice of the horizon solved as one model. `commit` steps of it are kept. */
export interface HorizonWindow {
  from: number;
  steps: number;
  commit: number;
  isFinal: boolean;
  /** The state the window must end in: where the next parallel segment of a rolling solve starts. */
  endState?: WindowEndState;
}

/** A state fixed at a window's end: each storage's SOC and each unit's last on/off values. */
export interface WindowEndState {
  socKwh: number[];
  /** Per unit, its on/off values over the window's last `tail.length` steps. */
  unitTails: Uint8Array[];
}

/** The state a window starts from: the spec's initial state, or what the previous window committed. */
export interface WindowStartState {
  units: { on: boolean; stepsInState: number }[];
  socKwh: number[];
}

export interface UnitPlan {
  /** 1 where the unit has an on/off binary (sparse sets leave it out where it can never run). */
  hasBinary: Uint8Array;
  /** 1 where the unit must be on (the initial state's remaining minimum up time). */
  forcedOn: Uint8Array;
  /** 1 where the unit must be off (the initial state's remaining minimum down time). */
  forcedOff: Uint8Array;
  /** Per-step big-M of `p ≤ M·y` in kW: the rating, or less where less power can reach the unit. */
  bigM: Float64Array;
  /** Start indicators are needed for a start cost or a minimum up/down time longer than one step. */
  needsStart: boolean;
  /**
   * 1 where the unit may not start: before the initial state's minimum down time has run out
   * (a unit on just before the window could only restart after a stop and a full minimum down
   * time), and where a step without a binary (off by construction) follows within its minimum up time.
   */
  noStart: Uint8Array;
  /** Whether the unit was on just before the window (y at step −1). */
  onBefore: boolean;
}

export interface StoragePlan {
  hasBinary: Uint8Array;
  chargeM: Float64Array;
  dischargeM: Float64Array;
  /** Lower bound on SOC after the window's last step (minSoc, or the final target in the last window). */
  endSocFloorKwh: number;
  /** SOC after the window's last step when the window must end in a given state, else null. */
  endSocFixedKwh: number | null;
  /** Money per kWh credited for energy left above minSoc at the end of a non-final window. */
  terminalValuePerKwh: number;
}

export interface GridPlan {
  importUb: Float64Array;
  exportUb: Float64Array;
  hasBinary: Uint8Array;
  /** big-M of the exclusivity rows (kW) per step. */
  importM: Float64Array;
  exportM: Float64Array;
}

export interface WindowPlan {
  spec: ResolvedSiteSpec;
  window: HorizonWindow;
  start: WindowStartState;
  scales: Scales;
  dh: number;
  units: UnitPlan[];
  storage: StoragePlan[];
  grid: GridPlan;
  /** The binaries the plain formulation would have, before pruning and relaxation. */
  binariesBefore: number;
  /**
   * On/off and exclusivity decisions are binary at steps before this one; after it (the
   * lookahead a rolling window does not keep) they are relaxed to [0, 1] when
   * `solver.window.lookahead` is "relaxed".
   */
  integerSteps: number;
}

/** A bound no model coefficient needs to exceed when `tightBigM` is off: ten times the site's total power. */
function looseSiteBound(spec: ResolvedSiteSpec): number {
  let total = spec.grid.importLimitKw + spec.grid.exportLimitKw;
  for (const v of spec.supply.availableKw) total = Math.max(total, v + spec.grid.importLimitKw + spec.grid.exportLimitKw);
  for (const u of spec.units) total += u.ratingKw;
  for (const s of spec.storage) total += s.maxChargeKw + s.maxDischargeKw;
  let maxLoad = 0;
  for (const v of spec.siteLoad.kw) if (v > maxLoad) maxLoad = v;
  return 10 * Math.max(1, total + maxLoad);
}

/**
 * What island energy is worth to the site, used only to price energy left in storage at a
 * window's end: the fuel it saves, or the best flexible use, or the unserved-load penalty. A
 * hard load on an island without generators has no price, yet energy kept for it may be all
 * that serves it after dark: it is valued above every per-kWh figure the spec states, so a
 * window ends with its storage as full as supply allows rather than indifferently empty.
 */
function islandEnergyValue(spec: ResolvedSiteSpec): number {
  const gens = spec.units.filter((u) => u.kind === 'generator');
  if (gens.length) return Math.max(0, Math.min(...gens.map((g) => g.costPerKwh)));
  const flex = spec.units.filter((u) => u.kind === 'flexible-load');
  const bestFlex = flex.length ? Math.max(0, ...flex.map((f) => f.valuePerKwh)) : 0;
  const penalty = spec.siteLoad.unservedPenaltyPerKwh;
  if (penalty !== null || !spec.siteLoad.kw.some((kw) => kw > 0)) return Math.max(bestFlex, penalty ?? 0);
  const stated = Math.max(bestFlex, ...spec.storage.map((s) => s.cycleCostPerKwh));
  return stated > 0 ? 2 * stated : 1;
}

/** The value of a kWh at step t: the import price where the site can import, else the export price, else the island's value. */
function energyValueAt(spec: ResolvedSiteSpec, t: number, island: number): number {
  if (spec.grid.importLimitKw > 0) return spec.grid.importPrice[t];
  if (spec.grid.exportLimitKw > 0) return spec.grid.exportPrice[t];
  return island;
}

/**
 * What planning reads from the whole horizon. A solve computes it once and plans every window
 * with it: a rolling year would otherwise rescan its 35 040 steps for each of its windows
 * (measured: 4 ms a window).
 */
export interface SiteFacts {
  scales: Scales;
  /** The big-M used where `tightBigM` is off (looseSiteBound). */
  loose: number;
  /** What island energy is worth (islandEnergyValue); 0 without storage, which alone needs it. */
  island: number;
}

export function siteFacts(spec: ResolvedSiteSpec): SiteFacts {
  return {
    scales: chooseScales(spec, spec.solver.reductions.scaling),
    loose: looseSiteBound(spec),
    island: spec.storage.length ? islandEnergyValue(spec) : 0,
  };
}

function median(values: number[]): number {
  if (!values.length) return 0;
  const sorted = values.slice().sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

export interface ForcedBinaries {
  /** Local steps per storage where the exclusivity binary must stay. */
  storage: Set<number>[];
  grid: Set<number>;
}

/**
 * Plans one window: the index sets, every big-M, the scales, which exclusivity binaries may be
 * dropped, which steps keep their binaries, and how storage is valued at the window's end.
 */
export function planWindow(
  spec: ResolvedSiteSpec,
  facts: SiteFacts,
  window: HorizonWindow,
  start: WindowStartState,
  forced?: ForcedBinaries,
): WindowPlan {
  const { reductions } = spec.solver;
  const n = window.steps;
  const dh = spec.horizon.stepMinutes / 60;
  const { scales, loose, island } = facts;
  const hardLoad = spec.siteLoad.unservedPenaltyPerKwh === null;
  const { importLimitKw, exportLimitKw } = spec.grid;
  const limits = storageStepLimits(spec, dh);
  // Relax-and-fix: the lookahead only values the state the kept steps leave, so its LP
  // relaxation serves, and the MIP is left with the decisions that are actually kept.
  const integerSteps = window.isFinal || spec.solver.window.lookahead === 'integer' ? n : Math.min(n, window.commit);

  const sums = ratingSums(spec, limits);

  // What could reach a consumer (flexible load, storage charging, export) and what could be
  // absorbed from a producer (generator, import) at each step, from the balance row's bounds.
  const inflowExclImport = new Float64Array(n);
  const sink = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const t = window.from + k;
    const load = spec.siteLoad.kw[t];
    inflowExclImport[k] = spec.supply.availableKw[t] + sums.generatorKw + sums.dischargeKw - (hardLoad ? load : 0);
    sink[k] = load + sums.flexibleLoadKw + sums.chargeKw;
  }

  let binariesBefore = 0;
  const gridBinaryPossible = importLimitKw > 0 && exportLimitKw > 0;
  const grid: GridPlan = {
    importUb: new Float64Array(n),
    exportUb: new Float64Array(n),
    hasBinary: new Uint8Array(n),
    importM: new Float64Array(n),
    exportM: new Float64Array(n),
  };
  for (let k = 0; k < n; k++) {
    const t = window.from + k;
    const tightImport = Math.min(importLimitKw, Math.max(0, sink[k]));
    const tightExport = Math.min(exportLimitKw, Math.max(0, inflowExclImport[k]));
    grid.importUb[k] = reductions.tightBigM ? tightImport : importLimitKw;
    grid.exportUb[k] = reductions.tightBigM ? tightExport : exportLimitKw;
    grid.importM[k] = reductions.tightBigM ? tightImport : loose;
    grid.exportM[k] = reductions.tightBigM ? tightExport : loose;
    if (gridBinaryPossible) {
      if (k < integerSteps) binariesBefore++;
      // Importing and exporting at once only pays when a kWh sells for more than it costs;
      // otherwise netting the two never lowers the objective, so the binary is redundant.
      const needed = spec.grid.importPrice[t] < spec.grid.exportPrice[t];
      grid.hasBinary[k] = !reductions.relaxExclusivity || needed || forced?.grid.has(k) ? 1 : 0;
    }
  }

  const units: UnitPlan[] = spec.units.map((u, i) => {
    const initial = start.units[i];
    const forcedOn = new Uint8Array(n);
    const forcedOff = new Uint8Array(n);
    const hasBinary = new Uint8Array(n);
    const bigM = new Float64Array(n);
    // SPEC §2: on for k < minUpSteps ⇒ on for minUpSteps − k more steps; off for k < minDownSteps likewise.
    const mustStayOn = initial.on ? Math.max(0, u.minUpSteps - initial.stepsInState) : 0;
    const mustStayOff = initial.on ? 0 : Math.max(0, u.minDownSteps - initial.stepsInState);
    for (let k = 0; k < n; k++) {
      if (k < integerSteps) binariesBefore++;
      const reach =
        u.kind === 'generator'
          ? sink[k] + exportLimitKw
          : inflowExclImport[k] + importLimitKw;
      const tight = Math.min(u.ratingKw, Math.max(0, reach));
      bigM[k] = reductions.tightBigM ? tight : loose;
      if (k < mustStayOn) {
        forcedOn[k] = 1;
        hasBinary[k] = 1;
      } else if (k < mustStayOff) {
        forcedOff[k] = 1;
        hasBinary[k] = reductions.sparseSets ? 0 : 1;
      } else {
        hasBinary[k] = !reductions.sparseSets || tight >= u.minStableKw - TINY ? 1 : 0;
      }
    }
    const tail = window.endState?.unitTails[i] ?? new Uint8Array(0);
    for (let j = 0; j < tail.length; j++) {
      const k = n - tail.length + j;
      // The start state's own minimum up/down time wins; the caller sees the end state missed.
      if (k < 0 || forcedOn[k] || forcedOff[k]) continue;
      if (tail[j]) {
        forcedOn[k] = 1;
        hasBinary[k] = 1;
      } else {
        forcedOff[k] = 1;
        hasBinary[k] = reductions.sparseSets ? 0 : 1;
      }
    }
    const noStart = new Uint8Array(n);
    noStart.fill(1, 0, Math.min(n, initial.on ? u.minDownSteps : mustStayOff));
    let nextPruned = Infinity;
    for (let k = n - 1; k >= 0; k--) {
      if (nextPruned - k < u.minUpSteps) noStart[k] = 1;
      if (!hasBinary[k]) nextPruned = k;
    }
    return {
      hasBinary,
      forcedOn,
      forcedOff,
      bigM,
      needsStart: u.startupCost > 0 || u.minUpSteps > 1 || u.minDownSteps > 1,
      noStart,
      onBefore: initial.on,
    };
  });

  const lookahead: number[] = [];
  for (let k = window.commit; k < n; k++) lookahead.push(energyValueAt(spec, window.from + k, island));
  if (!lookahead.length) for (let k = 0; k < n; k++) lookahead.push(energyValueAt(spec, window.from + k, island));
  const energyValue = Math.max(0, median(lookahead));

  const storage: StoragePlan[] = spec.storage.map((s, i) => {
    const hasBinary = new Uint8Array(n);
    const chargeM = new Float64Array(n);
    const dischargeM = new Float64Array(n);
    const lossless = s.chargeEfficiency * s.dischargeEfficiency >= 1;
    for (let k = 0; k < n; k++) {
      const t = window.from + k;
      chargeM[k] = reductions.tightBigM ? limits[i].charge : loose;
      dischargeM[k] = reductions.tightBigM ? limits[i].discharge : loose;
      if (s.maxChargeKw <= 0 || s.maxDischargeKw <= 0) continue;
      if (k < integerSteps) binariesBefore++;
      hasBinary[k] =
        !reductions.relaxExclusivity || (!lossless && energyCanHaveNegativeValue(spec, t)) || forced?.storage[i].has(k) ? 1 : 0;
    }
    return {
      hasBinary,
      chargeM,
      dischargeM,
      endSocFloorKwh: window.isFinal && s.finalSocKwh !== null ? Math.max(s.minSocKwh, s.finalSocKwh) : s.minSocKwh,
      endSocFixedKwh: window.endState ? window.endState.socKwh[i] : null,
      // Non-final windows credit stored energy at what it would fetch later (discharge losses
      // included), so they neither drain storage at their end nor hoard energy worth less
      // than it cost. The final window has no later, and a fixed end SOC leaves nothing to value.
      terminalValuePerKwh: window.isFinal || window.endState ? 0 : energyValue * s.dischargeEfficiency,
    };
  });

  return { spec, window, start, scales, dh, units, storage, grid, binariesBefore, integerSteps };
}

/**
 * Charging and discharging one storage at once burns energy (round trip below 1) and never
 * pays unless the site must get rid of power: a paid import, a generator paid to run, or
 * generators held at their minimum stable output that the site load and (unpaid) export
 * cannot take. Elsewhere the loss is absorbed by curtailing supply, importing less or
 * exporting more (repair-exclusivity.ts does exactly that, and re-solves with the binary
 * where it cannot), so the exclusivity binary is redundant there.
 */
function energyCanHaveNegativeValue(spec: ResolvedSiteSpec, t: number): boolean {
  if (spec.grid.importLimitKw > 0 && spec.grid.importPrice[t] < 0) return true;
  let heldKw = 0;
  for (const u of spec.units) {
    if (u.kind !== 'generator') continue;
    if (u.costPerKwh < 0) return true;
    heldKw += u.minStableKw;
  }
  const exportable = spec.grid.exportPrice[t] >= 0 ? spec.grid.exportLimitKw : 0;
  return heldKw > spec.siteLoad.kw[t] + exportable;
}
