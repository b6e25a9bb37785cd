import { ModelAssembler } from './model-assembler';
import { ColKind, RowKind, type ModelArrays, type ModelTags } from './model-arrays';
import type { WindowPlan } from './plan-window';
import { flatCredit } from './terminal-values';
import { sliceWidths } from './unit-curves';
import { addUnitRows, coldStartPossible } from './unit-rows';

/** Column index of each decision per local step; −1 where the variable does not exist. */
export interface WindowColumns {
  supply: Int32Array;
  imp: Int32Array;
  exp: Int32Array;
  unserved: Int32Array;
  gridBinary: Int32Array;
  units: {
    on: Int32Array;
    start: Int32Array;
    power: Int32Array;
    /** Per slice of a curve with more than one slice; empty otherwise (the price sits on `power`). */
    slices: Int32Array[];
    /** 1 for a start after more than `coldAfterSteps` steps off (it pays cold − hot more). */
    coldStart: Int32Array;
    reserve: Int32Array;
  }[];
  storage: { charge: Int32Array; discharge: Int32Array; soc: Int32Array; binary: Int32Array; reserve: Int32Array }[];
  stores: { level: Int32Array; shortfall: Int32Array; spill: Int32Array }[];
  reserveShortfall: Int32Array;
  /** Per demand charge, the column of its peak in this window (−1: no step of the window is in its window). */
  peaks: Int32Array;
}

/** Row index per local step of the rows whose duals price energy, stored energy and product. */
export interface WindowRows {
  balance: Int32Array;
  stores: Int32Array[];
  storage: Int32Array[];
}

export interface BigMEntry {
  where: string;
  value: number;
}

export interface BuiltModel {
  model: ModelArrays;
  tags: ModelTags;
  columns: WindowColumns;
  rows: WindowRows;
  /** The objective's constant part (internal money units): add it to the solver's objective and bound. */
  objectiveOffset: number;
  bigM: BigMEntry[];
  binaries: number;
}

const filled = (n: number) => new Int32Array(n).fill(-1);

/** Builds the SPEC.md §2 and §5 model of one window from its plan, in the plan's internal units. */
export function buildWindowModel(plan: WindowPlan): BuiltModel {
  const { spec, window, start, scales, dh } = plan;
  const n = window.steps;
  const P = scales.powerKw;
  const M = scales.money;
  const perKwh = (price: number) => (dh * price * P) / M;
  const tight = spec.solver.reductions.tightBigM;
  const sparse = spec.solver.reductions.sparseSets;
  const a = new ModelAssembler();
  const cols: WindowColumns = {
    supply: filled(n),
    imp: filled(n),
    exp: filled(n),
    unserved: filled(n),
    gridBinary: filled(n),
    units: spec.units.map((u) => ({
      on: filled(n),
      start: filled(n),
      power: filled(n),
      slices: u.curve.length > 1 ? u.curve.map(() => filled(n)) : [],
      coldStart: filled(n),
      reserve: filled(n),
    })),
    storage: spec.storage.map(() => ({ charge: filled(n), discharge: filled(n), soc: filled(n), binary: filled(n), reserve: filled(n) })),
    stores: spec.stores.map(() => ({ level: filled(n), shortfall: filled(n), spill: filled(n) })),
    reserveShortfall: filled(n),
    peaks: filled(spec.grid.demandCharges.length),
  };
  const rows: WindowRows = { balance: filled(n), stores: spec.stores.map(() => filled(n)), storage: spec.storage.map(() => filled(n)) };
  const penalty = spec.siteLoad.unservedPenaltyPerKwh;
  const reservePenalty = spec.reserve?.shortfallPenaltyPerKwh ?? null;
  const widths = spec.units.map(sliceWidths);

  for (let k = 0; k < n; k++) {
    const t = window.from + k;
    const W = spec.supply.availableKw[t];
    if (W > 0) cols.supply[k] = a.col(ColKind.Supply, k, -1, 0, 0, W / P);
    if (plan.grid.importUb[k] > 0) {
      cols.imp[k] = a.col(ColKind.Import, k, -1, -perKwh(spec.grid.importPrice[t]), 0, plan.grid.importUb[k] / P);
    }
    if (plan.grid.exportUb[k] > 0) {
      cols.exp[k] = a.col(ColKind.Export, k, -1, perKwh(spec.grid.exportPrice[t]), 0, plan.grid.exportUb[k] / P);
    }
    const integer = k < plan.integerSteps;
    if (plan.grid.hasBinary[k] && cols.imp[k] >= 0 && cols.exp[k] >= 0) {
      cols.gridBinary[k] = a.col(ColKind.GridBinary, k, -1, 0, 0, 1, integer);
    }
    const L = spec.siteLoad.kw[t];
    if (penalty !== null && L > 0) cols.unserved[k] = a.col(ColKind.Unserved, k, -1, -perKwh(penalty), 0, L / P);

    spec.units.forEach((u, i) => {
      const up = plan.units[i];
      if (!up.hasBinary[k]) return;
      const c = cols.units[i];
      c.on[k] = a.col(ColKind.UnitOn, k, i, (-dh * u.noLoadCostPerHour) / M, up.forcedOn[k], up.forcedOff[k] ? 0 : 1, integer);
      let powerUb = tight ? up.bigM[k] : u.ratingKw;
      // Ramping up from the output before the window: the first step can rise by one ramp at most.
      if (k === 0 && up.powerBefore !== null && up.ramp?.up != null) powerUb = Math.min(powerUb, up.powerBefore + up.ramp.up);
      const fixedEnd = k === n - 1 ? (window.endState?.unitPowerKw[i] ?? null) : null;
      const sliced = u.curve.length > 1;
      const price = sliced ? 0 : u.kind === 'flexible-load' ? perKwh(u.curve[0].perKwh) : -perKwh(u.curve[0].perKwh);
      c.power[k] = a.col(ColKind.UnitPower, k, i, price, fixedEnd === null ? 0 : fixedEnd / P, (fixedEnd ?? powerUb) / P);
      if (sliced) {
        u.curve.forEach((slice, s) => {
          const value = u.kind === 'flexible-load' ? perKwh(slice.perKwh) : -perKwh(slice.perKwh);
          c.slices[s][k] = a.col(ColKind.UnitSlice, k, i, value, 0, widths[i][s] / P);
        });
      }
      // Sparse sets leave out the start indicators that could only be 0 (the rows then read
      // y_k ≤ y_{k−1} there); the plain formulation keeps them, fixed at 0.
      if (up.needsStart && !(sparse && up.noStart[k])) c.start[k] = a.col(ColKind.UnitStart, k, i, -u.startupCost.hot / M, 0, up.noStart[k] ? 0 : 1);
      if (coldStartPossible(plan, i, k)) c.coldStart[k] = a.col(ColKind.UnitColdStart, k, i, -(u.startupCost.cold - u.startupCost.hot) / M, 0, 1);
      if (up.reserve[k]) {
        const most = Math.min(plan.reserveKw[k], u.ratingKw - u.minStableKw);
        if (most > 0) c.reserve[k] = a.col(ColKind.UnitReserve, k, i, 0, 0, most / P);
      }
    });

    spec.storage.forEach((s, i) => {
      const sp = plan.storage[i];
      const c = cols.storage[i];
      const chargeUb = tight ? sp.chargeM[k] : s.maxChargeKw;
      const dischargeUb = tight ? sp.dischargeM[k] : s.maxDischargeKw;
      if (chargeUb > 0) c.charge[k] = a.col(ColKind.StorageCharge, k, i, 0, 0, chargeUb / P);
      if (dischargeUb > 0) c.discharge[k] = a.col(ColKind.StorageDischarge, k, i, -perKwh(s.cycleCostPerKwh), 0, dischargeUb / P);
      const last = k === n - 1;
      const fixed = last ? sp.endSocFixedKwh : null;
      const socLo = fixed ?? (last ? sp.endSocFloorKwh : s.minSocKwh);
      const socValue = last ? (sp.terminalValuePerKwh * P) / M : 0;
      c.soc[k] = a.col(ColKind.StorageSoc, k, i, socValue, socLo / P, (fixed ?? s.capacityKwh) / P);
      if (sp.hasBinary[k] && c.charge[k] >= 0 && c.discharge[k] >= 0) c.binary[k] = a.col(ColKind.StorageBinary, k, i, 0, 0, 1, integer);
      if (sp.reserve[k]) {
        const most = Math.min(plan.reserveKw[k], s.maxDischargeKw + s.maxChargeKw);
        if (most > 0) c.reserve[k] = a.col(ColKind.StorageReserve, k, i, 0, 0, most / P);
      }
    });

    spec.stores.forEach((s, j) => {
      const sp = plan.stores[j];
      const Q = sp.scale;
      const c = cols.stores[j];
      const last = k === n - 1;
      const lo = last ? (sp.endFixed ?? Math.max(s.min, sp.endFloor)) : s.min;
      const hi = last ? (sp.endFixed ?? s.capacity) : s.capacity;
      const value = last ? ((flatCredit(sp.terminalValue) ?? 0) * Q) / M : 0;
      c.level[k] = a.col(ColKind.StoreLevel, k, j, value, lo / Q, hi / Q);
      const demand = s.demandPerHour[t];
      if (s.shortfallPenaltyPerUnit !== null && demand > 0) {
        c.shortfall[k] = a.col(ColKind.StoreShortfall, k, j, (-dh * s.shortfallPenaltyPerUnit * Q) / M, 0, demand / Q);
      }
      if (s.spillAllowed) c.spill[k] = a.col(ColKind.StoreSpill, k, j, 0, 0, spillRateBound(plan, j, t) / Q);
    });

    if (plan.reserveKw[k] > 0 && reservePenalty !== null) {
      cols.reserveShortfall[k] = a.col(ColKind.ReserveShortfall, k, -1, -perKwh(reservePenalty), 0, plan.reserveKw[k] / P);
    }
  }

  spec.stores.forEach((s, j) => addStoreEndValue(a, plan, cols.stores[j].level[n - 1], j, s.min, M));

  spec.grid.demandCharges.forEach((charge, c) => {
    const dp = plan.demandCharges[c];
    if (!dp.steps.length) return;
    // −price·(peak − peak so far): the peak so far is paid already, so it is a constant here.
    const D = scales.demandPeakKw;
    const price = charge.pricePerKw * dp.share;
    cols.peaks[c] = a.col(ColKind.DemandPeak, dp.steps[0], c, (-price * D) / M, dp.floorKw / D, dp.capKw / D);
    a.objectiveOffset += (price * dp.floorKw) / M;
  });

  for (let k = 0; k < n; k++) {
    const t = window.from + k;
    rows.balance[k] = a.row(RowKind.Balance, k, -1, spec.siteLoad.kw[t] / P, spec.siteLoad.kw[t] / P);
    a.entry(cols.supply[k], 1);
    a.entry(cols.imp[k], 1);
    a.entry(cols.unserved[k], 1);
    a.entry(cols.exp[k], -1);
    spec.units.forEach((u, i) => a.entry(cols.units[i].power[k], u.kind === 'generator' ? 1 : -1));
    spec.storage.forEach((_, i) => {
      a.entry(cols.storage[i].discharge[k], 1);
      a.entry(cols.storage[i].charge[k], -1);
    });
  }

  spec.units.forEach((_, i) => addUnitRows(a, plan, cols, i));

  spec.storage.forEach((s, i) => {
    const c = cols.storage[i];
    const sp = plan.storage[i];
    // A bound block's SOC before its first step is free within the SOC limits, at a price.
    const freeStart = sp.startPricePerKwh === null ? -1 : a.col(ColKind.StorageStartSoc, 0, i, (-sp.startPricePerKwh * P) / M, s.minSocKwh / P, s.capacityKwh / P);
    for (let k = 0; k < n; k++) {
      // soc_k − soc_{k−1} − Δh·ηc·c_k + Δh/ηd·d_k = 0, with soc_{−1} the window's starting SOC.
      const rhs = k === 0 && freeStart < 0 ? start.socKwh[i] / P : 0;
      rows.storage[i][k] = a.row(RowKind.StorageSoc, k, i, rhs, rhs);
      if (k === 0) a.entry(freeStart, -1);
      if (k > 0) a.entry(c.soc[k - 1], -1);
      a.entry(c.soc[k], 1);
      a.entry(c.charge[k], -dh * s.chargeEfficiency);
      a.entry(c.discharge[k], dh / s.dischargeEfficiency);
    }
    for (let k = 0; k < n; k++) {
      if (c.binary[k] < 0) continue;
      a.row(RowKind.StorageChargeExclusive, k, i, -Infinity, 0);
      a.entry(c.charge[k], 1);
      a.entry(c.binary[k], -sp.chargeM[k] / P);
      a.row(RowKind.StorageDischargeExclusive, k, i, -Infinity, sp.dischargeM[k] / P);
      a.entry(c.discharge[k], 1);
      a.entry(c.binary[k], sp.dischargeM[k] / P);
    }
    for (let k = 0; k < n; k++) {
      if (c.reserve[k] < 0) continue;
      // What it can still give: its unused discharge plus the charging it can stop (SPEC §5) …
      a.row(RowKind.StorageReserveFlow, k, i, -Infinity, s.maxDischargeKw / P);
      a.entry(c.reserve[k], 1);
      a.entry(c.charge[k], -1);
      a.entry(c.discharge[k], 1);
      // … for a whole step, from the energy above its minimum at the step's end.
      a.row(RowKind.StorageReserveEnergy, k, i, -Infinity, (-s.dischargeEfficiency * s.minSocKwh) / P);
      a.entry(c.reserve[k], dh);
      a.entry(c.soc[k], -s.dischargeEfficiency);
    }
  });

  for (let k = 0; k < n; k++) {
    if (cols.gridBinary[k] < 0) continue;
    a.row(RowKind.GridImportExclusive, k, -1, -Infinity, 0);
    a.entry(cols.imp[k], 1);
    a.entry(cols.gridBinary[k], -plan.grid.importM[k] / P);
    a.row(RowKind.GridExportExclusive, k, -1, -Infinity, plan.grid.exportM[k] / P);
    a.entry(cols.exp[k], 1);
    a.entry(cols.gridBinary[k], plan.grid.exportM[k] / P);
  }

  for (let k = 0; k < n; k++) {
    if (plan.reserveKw[k] <= 0) continue;
    a.row(RowKind.ReserveRequirement, k, -1, plan.reserveKw[k] / P, Infinity);
    spec.units.forEach((_, i) => a.entry(cols.units[i].reserve[k], 1));
    spec.storage.forEach((_, i) => a.entry(cols.storage[i].reserve[k], 1));
    a.entry(cols.reserveShortfall[k], 1);
  }

  spec.grid.demandCharges.forEach((_, c) => {
    if (cols.peaks[c] < 0) return;
    for (const k of plan.demandCharges[c].steps) {
      if (cols.imp[k] < 0) continue;
      a.row(RowKind.DemandChargePeak, k, c, -Infinity, 0);
      a.entry(cols.imp[k], 1);
      a.entry(cols.peaks[c], -scales.demandPeakKw / P);
    }
  });

  for (let k = 0; k < n; k++) {
    if (!plan.supplyOnlyCap[k] || cols.imp[k] < 0) continue;
    // imp ≤ (L − u) + Σ flexible loads + Σ batteries that may charge from the grid.
    const L = spec.siteLoad.kw[window.from + k];
    a.row(RowKind.SupplyOnlyImport, k, -1, -Infinity, L / P);
    a.entry(cols.imp[k], 1);
    a.entry(cols.unserved[k], 1);
    spec.units.forEach((u, i) => {
      if (u.kind === 'flexible-load') a.entry(cols.units[i].power[k], -1);
    });
    spec.storage.forEach((s, i) => {
      if (!s.chargeFromSupplyOnly) a.entry(cols.storage[i].charge[k], -1);
    });
  }

  spec.stores.forEach((s, j) => {
    const Q = plan.stores[j].scale;
    const c = cols.stores[j];
    const keep = 1 - s.lossPerHour * dh;
    const flow = (dh * P) / Q;
    const startPrice = plan.stores[j].startPricePerUnit;
    const freeStart = startPrice === null ? -1 : a.col(ColKind.StoreStartLevel, 0, j, (-startPrice * Q) / M, s.min / Q, s.capacity / Q);
    for (let k = 0; k < n; k++) {
      // level_k − keep·level_{k−1} − Δh·(produced − consumed + short − spill) = Δh·(inflow_k − demand_k) (store units / Q).
      const t = window.from + k;
      const fixedStart = k === 0 && freeStart < 0 ? (keep * start.storeLevels[j]) / Q : 0;
      const rhs = (dh * (s.inflowPerHour[t] - s.demandPerHour[t])) / Q + fixedStart;
      rows.stores[j][k] = a.row(RowKind.StoreLevel, k, j, rhs, rhs);
      if (k === 0) a.entry(freeStart, -keep);
      a.entry(c.level[k], 1);
      if (k > 0) a.entry(c.level[k - 1], -keep);
      spec.units.forEach((u, i) => {
        const made = u.produces?.store === j ? u.produces.perKwh : 0;
        const used = u.consumes?.store === j ? u.consumes.perKwh : 0;
        if (made !== used) a.entry(cols.units[i].power[k], -(made - used) * flow);
      });
      a.entry(c.shortfall[k], -dh);
      a.entry(c.spill[k], dh);
    }
  });

  const { model, tags } = a.finish();
  return { model, tags, columns: cols, rows, objectiveOffset: a.objectiveOffset, bigM: collectBigM(plan, cols), binaries: a.binaries };
}

/** The most product a store could have to spill in one step (its units per hour): a full store plus all its producers at rating. */
function spillRateBound(plan: WindowPlan, j: number, t: number): number {
  const { spec, dh } = plan;
  let made = 0;
  for (const u of spec.units) if (u.produces?.store === j) made += u.produces.perKwh * u.ratingKw;
  return spec.stores[j].capacity / dh + made + spec.stores[j].inflowPerHour[t];
}

function maxWhere(values: Float64Array, present: Int32Array): number {
  let m = 0;
  for (let k = 0; k < values.length; k++) if (present[k] >= 0 && values[k] > m) m = values[k];
  return m;
}

function collectBigM(plan: WindowPlan, cols: WindowColumns): BigMEntry[] {
  const list: BigMEntry[] = [];
  plan.spec.units.forEach((u, i) => {
    const value = maxWhere(plan.units[i].bigM, cols.units[i].on);
    if (value > 0) list.push({ where: `${u.id} capacity`, value });
    if (u.kind === 'generator' && cols.units[i].reserve.some((c) => c >= 0)) list.push({ where: `${u.id} reserve headroom (rating)`, value: u.ratingKw });
  });
  plan.spec.storage.forEach((s, i) => {
    const b = cols.storage[i].binary;
    const charge = maxWhere(plan.storage[i].chargeM, b);
    const discharge = maxWhere(plan.storage[i].dischargeM, b);
    if (charge > 0) list.push({ where: `${s.id} charge/discharge exclusivity (charge side)`, value: charge });
    if (discharge > 0) list.push({ where: `${s.id} charge/discharge exclusivity (discharge side)`, value: discharge });
  });
  const imp = maxWhere(plan.grid.importM, cols.gridBinary);
  const exp = maxWhere(plan.grid.exportM, cols.gridBinary);
  if (imp > 0) list.push({ where: 'grid import/export exclusivity (import side)', value: imp });
  if (exp > 0) list.push({ where: 'grid import/export exclusivity (export side)', value: exp });
  plan.spec.grid.demandCharges.forEach((c, i) => {
    if (cols.peaks[i] >= 0) list.push({ where: `${c.id} demand-charge peak (import limit)`, value: plan.demandCharges[i].capKw });
  });
  return list;
}

/**
 * A store's end value as a concave curve (terminal-values.ts): one column per slice, worth its
 * value a unit up to its width, together at most the level left above the store's minimum. A
 * flat value sits on the level column instead (buildWindowModel).
 */
function addStoreEndValue(a: ModelAssembler, plan: WindowPlan, level: number, j: number, min: number, M: number): void {
  const { terminalValue: curve, scale: Q } = plan.stores[j];
  if (flatCredit(curve) !== null) return;
  const last = plan.window.steps - 1;
  const slices = curve.map((slice) => a.col(ColKind.StoreEndValue, last, j, (slice.value * Q) / M, 0, slice.width / Q));
  a.row(RowKind.StoreEndValue, last, j, -Infinity, -min / Q);
  for (const col of slices) a.entry(col, 1);
  a.entry(level, -1);
}
