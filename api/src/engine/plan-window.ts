import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { chooseScales, type Scales } from './choose-scales';
import { demandChargeSteps } from './demand-charge-steps';
import { storeLevelFloors } from './store-floors';
import { flatValue, islandEnergyValue, lookaheadEnergyValue, medianEnergyStoreValue, storeProductValues, storeValueCurve, type StoreValuation, type ValueSlice } from './terminal-values';
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
  /** Set on a block of the horizon bound (horizon-bound.ts): its links to the blocks around it, relaxed and priced. */
  links?: BlockLinks;
}

/** Money per unit of state where two blocks of the horizon bound meet. */
export interface LinkPrices {
  socPerKwh: number[];
  storePerUnit: number[];
}

/**
 * A block of the horizon bound: solved as an LP, its start state free (priced at `start`) and its
 * end state sold at `end`, each demand charge paid on its own peak at a share of the price.
 */
export interface BlockLinks {
  /** Null: the horizon's first block, which starts from the spec's initial state. */
  start: LinkPrices | null;
  /** Null: the horizon's last block, which meets the final targets. */
  end: LinkPrices | null;
  /** Per demand charge, the share of its price this block pays (the shares of a charge sum to 1). */
  peakShares: number[];
  /** Whether the block keeps its binaries (a MIP whose dual bound counts) or is an LP relaxation. */
  integral: boolean;
}

/** A state fixed at a window's end: each storage's SOC and store's level, each unit's last on/off values and output. */
export interface WindowEndState {
  socKwh: number[];
  storeLevels: number[];
  /** Per unit, its on/off values over the window's last `tail.length` steps. */
  unitTails: Uint8Array[];
  /** Per unit, its output at the window's last step where a ramp limit carries it on; else null. */
  unitPowerKw: (number | null)[];
}

/**
 * The state a window starts from: the spec's initial state, or what the previous window
 * committed. `powerKw` is a unit's output at the step before (null: unknown or off), and
 * `peaksKw` the highest import so far in each demand charge's window (its `existingPeakKw` at first).
 */
export interface WindowStartState {
  units: { on: boolean; stepsInState: number; powerKw: number | null }[];
  socKwh: number[];
  storeLevels: number[];
  peaksKw: number[];
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
  /** Ramp limits per step in kW (rate × step length) and the most a start may reach or a stop leave from; null: no limit. */
  ramp: { up: number | null; down: number | null; startAllowance: number; stopAllowance: number } | null;
  /** Output at step −1 when the unit was on and its ramp limits reach back to it; else null. */
  powerBefore: number | null;
  /** Hot/cold starts are told apart (cold costs more): look back this many steps for an on step. */
  coldLookback: number;
  /** On/off at steps −1, −2, … (index 0 is step −1), as far back as any rule reads. */
  history: Uint8Array;
  /** 1 where the unit holds spinning reserve. */
  reserve: Uint8Array;
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
  /** A bound block's free start SOC costs this per kWh; null: the start SOC is the start state's. */
  startPricePerKwh: number | null;
  /** 1 where the battery holds spinning reserve. */
  reserve: Uint8Array;
}

export interface StorePlan {
  /** Internal unit of the store's level and flows: a level of 1 in the model is `scale` units. */
  scale: number;
  /** Lower bound on the level after the window's last step (the horizon's floor, or the final target). */
  endFloor: number;
  /** Level after the window's last step when the window must end in a given state, else null. */
  endFixed: number | null;
  /** Money per unit credited for product above the store's minimum left at the end of a non-final window: a concave curve, no slices for none. */
  terminalValue: ValueSlice[];
  /** A bound block's free start level costs this per unit; null: the start level is the start state's. */
  startPricePerUnit: number | null;
}

export interface DemandChargePlan {
  /** Local steps of the window whose import sets this charge's peak. */
  steps: number[];
  /** The peak reached so far (the charge's floor here) and the most the peak can reach in the window. */
  floorKw: number;
  capKw: number;
  /** The share of the charge's price this window pays: 1, or a bound block's share. */
  share: number;
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
  /** The spec-wide figures the plan was made with. */
  facts: SiteFacts;
  window: HorizonWindow;
  start: WindowStartState;
  scales: Scales;
  dh: number;
  units: UnitPlan[];
  storage: StoragePlan[];
  stores: StorePlan[];
  demandCharges: DemandChargePlan[];
  /** Per local step, the reserve the site must hold (kW); all 0 without a reserve requirement. */
  reserveKw: Float64Array;
  /** Per local step, whether import is capped because a battery charges from supply only. */
  supplyOnlyCap: Uint8Array;
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
  /** Per demand charge, 1 at the steps its window covers. */
  chargeSteps: Uint8Array[];
  storeFloors: Float64Array[];
  /** Per store, one value of a unit of its product over the whole horizon (storeProductValues). */
  storeValues: number[];
  /** How product left at a non-final window's end is valued ('value-curve' in every run). */
  storeValuation: StoreValuation;
}

export function siteFacts(spec: ResolvedSiteSpec, storeValuation: StoreValuation = 'value-curve'): SiteFacts {
  const island = spec.storage.length || spec.stores.length ? islandEnergyValue(spec) : 0;
  return {
    scales: chooseScales(spec, spec.solver.reductions.scaling),
    loose: looseSiteBound(spec),
    island,
    chargeSteps: demandChargeSteps(spec),
    storeFloors: storeLevelFloors(spec),
    storeValues: storeProductValues(spec, island),
    storeValuation,
  };
}

export interface ForcedBinaries {
  /** Local steps per storage where the exclusivity binary must stay. */
  storage: Set<number>[];
  grid: Set<number>;
}

/**
 * Plans one window: the index sets, every big-M, the scales, which exclusivity binaries may be
 * dropped, which steps keep their binaries, and how storage and stores are valued at the window's end.
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
  const { scales, loose, island, chargeSteps, storeFloors } = facts;
  const hardLoad = spec.siteLoad.unservedPenaltyPerKwh === null;
  const { importLimitKw, exportLimitKw } = spec.grid;
  const limits = storageStepLimits(spec, dh);
  // Relax-and-fix: the lookahead only values the state the kept steps leave, so its LP
  // relaxation serves, and the MIP is left with the decisions that are actually kept.
  const links = window.links;
  const integerSteps = links ? (links.integral ? n : 0) : window.isFinal || spec.solver.window.lookahead === 'integer' ? n : Math.min(n, window.commit);
  const freeStart = links !== undefined && links.start !== null;

  const sums = ratingSums(spec, limits);

  // What could reach a consumer (flexible load, storage charging, export) and what could be
  // absorbed from a producer (generator, import) at each step, from the balance row's bounds.
  const inflowExclImport = new Float64Array(n);
  const sink = new Float64Array(n);
  const reserveKw = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const t = window.from + k;
    const load = spec.siteLoad.kw[t];
    inflowExclImport[k] = spec.supply.availableKw[t] + sums.generatorKw + sums.dischargeKw - (hardLoad ? load : 0);
    sink[k] = load + sums.flexibleLoadKw + sums.chargeKw;
    reserveKw[k] = spec.reserve ? spec.reserve.upKw[t] : 0;
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
    // A free start may have stopped the unit long before: it may start at once.
    if (!freeStart) noStart.fill(1, 0, Math.min(n, initial.on ? u.minDownSteps : mustStayOff));
    let nextPruned = Infinity;
    for (let k = n - 1; k >= 0; k--) {
      if (nextPruned - k < u.minUpSteps) noStart[k] = 1;
      if (!hasBinary[k]) nextPruned = k;
    }
    const ramp = rampPlan(u, spec.horizon.stepMinutes);
    const { hot, cold, coldAfterSteps } = u.startupCost;
    const coldLookback = coldAfterSteps !== null && cold > hot ? coldAfterSteps + 1 : 0;
    const history = new Uint8Array(Math.max(coldLookback, 1));
    // Before step 0 the unit held its state for stepsInState steps and the other state before that.
    for (let m = 1; m <= history.length; m++) {
      const held = m <= initial.stepsInState;
      history[m - 1] = (held ? initial.on : !initial.on) ? 1 : 0;
    }
    const reserve = new Uint8Array(n);
    if (u.providesReserve) for (let k = 0; k < n; k++) reserve[k] = reserveKw[k] > 0 && hasBinary[k] ? 1 : 0;
    return {
      hasBinary,
      forcedOn,
      forcedOff,
      bigM,
      needsStart: u.startupCost.hot > 0 || u.minUpSteps > 1 || u.minDownSteps > 1 || ramp !== null,
      noStart,
      onBefore: initial.on,
      ramp,
      powerBefore: initial.on && ramp ? initial.powerKw : null,
      coldLookback,
      history,
      reserve,
    };
  });

  const energyValue = lookaheadEnergyValue(spec, window.from, n, window.commit, island);
  const credits = !window.isFinal && !window.endState;
  // A battery that charges from supply only caps import at what the other consumers take; an
  // unflagged battery that charged and discharged at once could pass import on to it, so
  // theirs stay exclusive.
  const anySupplyOnly = spec.storage.some((s) => s.chargeFromSupplyOnly && s.maxChargeKw > 0);

  const storage: StoragePlan[] = spec.storage.map((s, i) => {
    const hasBinary = new Uint8Array(n);
    const chargeM = new Float64Array(n);
    const dischargeM = new Float64Array(n);
    const reserve = new Uint8Array(n);
    const lossless = s.chargeEfficiency * s.dischargeEfficiency >= 1;
    // Burning energy by charging and discharging at once can make room for charging later, which
    // counts as reserve; netting the two afterwards would take that reserve away again.
    const holdsReserve = s.providesReserve && reserveKw.some((r) => r > 0);
    for (let k = 0; k < n; k++) {
      const t = window.from + k;
      chargeM[k] = reductions.tightBigM ? limits[i].charge : loose;
      dischargeM[k] = reductions.tightBigM ? limits[i].discharge : loose;
      if (s.providesReserve && reserveKw[k] > 0) reserve[k] = 1;
      if (s.maxChargeKw <= 0 || s.maxDischargeKw <= 0) continue;
      if (k < integerSteps) binariesBefore++;
      const mustStay = (anySupplyOnly && !s.chargeFromSupplyOnly) || (!lossless && (holdsReserve || energyCanHaveNegativeValue(spec, t)));
      hasBinary[k] = !reductions.relaxExclusivity || mustStay || forced?.storage[i].has(k) ? 1 : 0;
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
      terminalValuePerKwh: links ? (links.end?.socPerKwh[i] ?? 0) : credits ? energyValue * s.dischargeEfficiency : 0,
      startPricePerKwh: links?.start ? links.start.socPerKwh[i] : null,
      reserve,
    };
  });

  const lastStep = window.from + n - 1;
  const stores: StorePlan[] = spec.stores.map((s, j) => ({
    scale: scales.stores[j],
    endFloor: Math.min(s.capacity, storeFloors[j][lastStep]),
    endFixed: window.endState ? window.endState.storeLevels[j] : null,
    terminalValue: links ? flatValue(links.end?.storePerUnit[j] ?? 0) : credits ? creditedStoreValue(spec, facts, window, j, energyValue) : [],
    startPricePerUnit: links?.start ? links.start.storePerUnit[j] : null,
  }));

  const demandCharges: DemandChargePlan[] = spec.grid.demandCharges.map((_, c) => {
    const steps: number[] = [];
    let cap = start.peaksKw[c];
    for (let k = 0; k < n; k++) {
      if (!chargeSteps[c][window.from + k]) continue;
      steps.push(k);
      cap = Math.max(cap, grid.importUb[k]);
    }
    return { steps, floorKw: start.peaksKw[c], capKw: cap, share: links ? links.peakShares[c] : 1 };
  });

  const supplyOnlyCap = new Uint8Array(n);
  if (anySupplyOnly) for (let k = 0; k < n; k++) supplyOnlyCap[k] = grid.importUb[k] > 0 ? 1 : 0;

  return { spec, facts, window, start, scales, dh, units, storage, stores, demandCharges, reserveKw, supplyOnlyCap, grid, binariesBefore, integerSteps };
}

/**
 * What a non-final window credits store `j`'s product at, by the solve's store valuation; the
 * value curve reads the steps after the window's end, as many as the window has.
 */
function creditedStoreValue(spec: ResolvedSiteSpec, facts: SiteFacts, window: HorizonWindow, j: number, energyValue: number): ValueSlice[] {
  const after = window.from + window.steps;
  switch (facts.storeValuation) {
    case 'value-curve':
      return storeValueCurve(spec, j, after, Math.min(spec.horizon.steps, after + window.steps), facts.island);
    case 'horizon-value':
      return flatValue(facts.storeValues[j]);
    case 'median-energy':
      return flatValue(medianEnergyStoreValue(spec, j, energyValue));
    case 'none':
      return [];
  }
}

/** A unit's ramp limits in kW per step, with the start and stop allowances of SPEC §5; null without any. */
function rampPlan(u: ResolvedSiteSpec['units'][number], stepMinutes: number): UnitPlan['ramp'] {
  if (u.rampUpKwPerMin === null && u.rampDownKwPerMin === null) return null;
  const up = u.rampUpKwPerMin === null ? null : u.rampUpKwPerMin * stepMinutes;
  const down = u.rampDownKwPerMin === null ? null : u.rampDownKwPerMin * stepMinutes;
  return {
    up,
    down,
    startAllowance: up === null ? u.ratingKw : Math.min(u.ratingKw, Math.max(u.minStableKw, up)),
    stopAllowance: down === null ? u.ratingKw : Math.min(u.ratingKw, Math.max(u.minStableKw, down)),
  };
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
    if (u.curve.some((slice) => slice.perKwh < 0)) return true;
    heldKw += u.minStableKw;
  }
  const exportable = spec.grid.exportPrice[t] >= 0 ? spec.grid.exportLimitKw : 0;
  return heldKw > spec.siteLoad.kw[t] + exportable;
}
