import { GrowableArray } from './growable-array';
import { ColKind, RowKind, type ModelArrays, type ModelTags } from './model-arrays';
import type { WindowPlan } from './plan-window';

/** Column index of each decision per local step; −1 where the variable does not exist. */
export interface WindowColumns {
  supply: Int32Array;
  imp: Int32Array;
  exp: Int32Array;
  unserved: Int32Array;
  gridBinary: Int32Array;
  units: { on: Int32Array; start: Int32Array; power: Int32Array }[];
  storage: { charge: Int32Array; discharge: Int32Array; soc: Int32Array; binary: Int32Array }[];
}

export interface BigMEntry {
  where: string;
  value: number;
}

export interface BuiltModel {
  model: ModelArrays;
  tags: ModelTags;
  columns: WindowColumns;
  bigM: BigMEntry[];
  binaries: number;
}

class ModelAssembler {
  private readonly cost = new GrowableArray(Float64Array);
  private readonly lower = new GrowableArray(Float64Array);
  private readonly upper = new GrowableArray(Float64Array);
  private readonly integer = new GrowableArray(Int32Array);
  private readonly colKind = new GrowableArray(Int32Array);
  private readonly colStep = new GrowableArray(Int32Array);
  private readonly colEntity = new GrowableArray(Int32Array);
  private readonly rowLo = new GrowableArray(Float64Array);
  private readonly rowHi = new GrowableArray(Float64Array);
  private readonly rowKind = new GrowableArray(Int32Array);
  private readonly rowStep = new GrowableArray(Int32Array);
  private readonly rowEntity = new GrowableArray(Int32Array);
  private readonly entryRow = new GrowableArray(Int32Array, 4096);
  private readonly entryCol = new GrowableArray(Int32Array, 4096);
  private readonly entryVal = new GrowableArray(Float64Array, 4096);
  binaries = 0;

  col(kind: ColKind, step: number, entity: number, cost: number, lower: number, upper: number, binary = false): number {
    this.cost.push(cost);
    this.lower.push(lower);
    this.upper.push(upper);
    this.integer.push(binary ? 1 : 0);
    if (binary) this.binaries++;
    this.colKind.push(kind);
    this.colStep.push(step);
    this.colEntity.push(entity);
    return this.cost.length - 1;
  }

  row(kind: RowKind, step: number, entity: number, lower: number, upper: number): number {
    this.rowLo.push(lower);
    this.rowHi.push(upper);
    this.rowKind.push(kind);
    this.rowStep.push(step);
    this.rowEntity.push(entity);
    return this.rowLo.length - 1;
  }

  /** Adds `value·x[col]` to the newest row; each column appears at most once per row by construction. */
  entry(col: number, value: number): void {
    if (col < 0 || value === 0) return;
    this.entryRow.push(this.rowLo.length - 1);
    this.entryCol.push(col);
    this.entryVal.push(value);
  }

  finish(): { model: ModelArrays; tags: ModelTags } {
    const numCols = this.cost.length;
    const numRows = this.rowLo.length;
    const nnz = this.entryRow.length;
    const starts = new Int32Array(numCols + 1);
    const cols = this.entryCol.data;
    for (let k = 0; k < nnz; k++) starts[cols[k] + 1]++;
    for (let j = 0; j < numCols; j++) starts[j + 1] += starts[j];
    const fill = starts.slice(0, numCols);
    const indices = new Int32Array(nnz);
    const values = new Float64Array(nnz);
    const rows = this.entryRow.data;
    const vals = this.entryVal.data;
    // Entries arrive in row order, so each column's row indices come out sorted.
    for (let k = 0; k < nnz; k++) {
      const at = fill[cols[k]]++;
      indices[at] = rows[k];
      values[at] = vals[k];
    }
    return {
      model: {
        numCols,
        numRows,
        colCost: this.cost.toArray(),
        colLower: this.lower.toArray(),
        colUpper: this.upper.toArray(),
        integrality: this.integer.toArray(),
        rowLower: this.rowLo.toArray(),
        rowUpper: this.rowHi.toArray(),
        starts,
        indices,
        values,
      },
      tags: {
        rowKind: Uint8Array.from(this.rowKind.toArray()),
        rowStep: this.rowStep.toArray(),
        rowEntity: Int16Array.from(this.rowEntity.toArray()),
        colKind: Uint8Array.from(this.colKind.toArray()),
        colStep: this.colStep.toArray(),
        colEntity: Int16Array.from(this.colEntity.toArray()),
      },
    };
  }
}

const filled = (n: number) => new Int32Array(n).fill(-1);

/** Builds the SPEC.md §2 model of one window from its plan, in the plan's internal units. */
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
    units: spec.units.map(() => ({ on: filled(n), start: filled(n), power: filled(n) })),
    storage: spec.storage.map(() => ({ charge: filled(n), discharge: filled(n), soc: filled(n), binary: filled(n) })),
  };
  const penalty = spec.siteLoad.unservedPenaltyPerKwh;

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
      c.on[k] = a.col(ColKind.UnitOn, k, i, 0, up.forcedOn[k], up.forcedOff[k] ? 0 : 1, integer);
      const powerUb = tight ? up.bigM[k] : u.ratingKw;
      const value = u.kind === 'flexible-load' ? perKwh(u.valuePerKwh) : -perKwh(u.costPerKwh);
      c.power[k] = a.col(ColKind.UnitPower, k, i, value, 0, powerUb / P);
      // Sparse sets leave out the start indicators that could only be 0 (the rows then read
      // y_k ≤ y_{k−1} there); the plain formulation keeps them, fixed at 0.
      if (up.needsStart && !(sparse && up.noStart[k])) c.start[k] = a.col(ColKind.UnitStart, k, i, -u.startupCost / M, 0, up.noStart[k] ? 0 : 1);
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
    });
  }

  for (let k = 0; k < n; k++) {
    const t = window.from + k;
    a.row(RowKind.Balance, k, -1, spec.siteLoad.kw[t] / P, spec.siteLoad.kw[t] / P);
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

  spec.units.forEach((u, i) => addUnitRows(a, plan, cols, i, u.minStableKw / P, u.minUpSteps, u.minDownSteps));

  spec.storage.forEach((s, i) => {
    const c = cols.storage[i];
    const sp = plan.storage[i];
    for (let k = 0; k < n; k++) {
      // soc_k − soc_{k−1} − Δh·ηc·c_k + Δh/ηd·d_k = 0, with soc_{−1} the window's starting SOC.
      const rhs = k === 0 ? start.socKwh[i] / P : 0;
      a.row(RowKind.StorageSoc, k, i, rhs, rhs);
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

  const { model, tags } = a.finish();
  return { model, tags, columns: cols, bigM: collectBigM(plan, cols), binaries: a.binaries };
}

function addUnitRows(
  a: ModelAssembler,
  plan: WindowPlan,
  cols: WindowColumns,
  i: number,
  minStable: number,
  minUp: number,
  minDown: number,
): void {
  const n = plan.window.steps;
  const P = plan.scales.powerKw;
  const up = plan.units[i];
  const { on, start, power } = cols.units[i];
  for (let k = 0; k < n; k++) {
    if (on[k] < 0) continue;
    if (minStable > 0) {
      a.row(RowKind.UnitMinStable, k, i, 0, Infinity);
      a.entry(power[k], 1);
      a.entry(on[k], -minStable);
    }
    a.row(RowKind.UnitMaxPower, k, i, -Infinity, 0);
    a.entry(power[k], 1);
    a.entry(on[k], -up.bigM[k] / P);
  }
  if (!up.needsStart) return;
  for (let k = 0; k < n; k++) {
    if (on[k] < 0) continue;
    // z_k ≥ y_k − y_{k−1}; a step without a binary is off, so a start after it counts as new.
    const prevOn = k === 0 ? (up.onBefore ? 1 : 0) : on[k - 1] >= 0 ? -1 : 0;
    if (prevOn === 1) continue;
    a.row(RowKind.UnitStart, k, i, 0, Infinity);
    a.entry(start[k], 1);
    a.entry(on[k], -1);
    if (prevOn === -1) a.entry(on[k - 1], 1);
  }
  if (minUp > 1) {
    // A start in the last minUp steps keeps the unit on now: Σ z_τ ≤ y_k (τ = k−minUp+1 … k).
    for (let k = 0; k < n; k++) {
      if (on[k] < 0) continue;
      let count = 0;
      for (let tau = Math.max(0, k - minUp + 1); tau < k; tau++) if (start[tau] >= 0) count++;
      if (count === 0) continue;
      a.row(RowKind.UnitMinUp, k, i, -Infinity, 0);
      for (let tau = Math.max(0, k - minUp + 1); tau <= k; tau++) a.entry(start[tau], 1);
      a.entry(on[k], -1);
    }
  }
  if (minDown > 1) {
    // On at k−minDown ⇒ no start in k−minDown+1 … k (a stop must last minDown steps):
    // Σ z_τ + y_{k−minDown} ≤ 1. Earlier history is in the plan's noStartBefore.
    for (let k = minDown; k < n; k++) {
      const before = on[k - minDown];
      if (before < 0) continue;
      let count = 0;
      for (let tau = k - minDown + 1; tau <= k; tau++) if (start[tau] >= 0) count++;
      if (count === 0) continue;
      a.row(RowKind.UnitMinDown, k, i, -Infinity, 1);
      for (let tau = k - minDown + 1; tau <= k; tau++) a.entry(start[tau], 1);
      a.entry(before, 1);
    }
  }
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
  return list;
}
