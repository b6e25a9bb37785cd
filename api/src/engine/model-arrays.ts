/** A MILP as plain arrays, maximised: what the solver adapter sends to HiGHS (CSC matrix). */
export interface ModelArrays {
  numCols: number;
  numRows: number;
  colCost: Float64Array;
  colLower: Float64Array;
  colUpper: Float64Array;
  /** 1 integer (all integers here are binaries), 0 continuous. */
  integrality: Int32Array;
  rowLower: Float64Array;
  rowUpper: Float64Array;
  starts: Int32Array;
  indices: Int32Array;
  values: Float64Array;
}

/** What a row or column stands for, so an infeasible subsystem can be told in the spec's words. */
export enum RowKind {
  Balance = 1,
  UnitMinStable,
  UnitMaxPower,
  UnitStart,
  UnitMinUp,
  UnitMinDown,
  StorageSoc,
  StorageChargeExclusive,
  StorageDischargeExclusive,
  GridImportExclusive,
  GridExportExclusive,
  UnitCurve,
  UnitColdStart,
  UnitRampUp,
  UnitRampDown,
  UnitStartExact,
  ReserveRequirement,
  UnitReserve,
  StorageReserveFlow,
  StorageReserveEnergy,
  DemandChargePeak,
  SupplyOnlyImport,
  StoreLevel,
  /** A non-final window's credit for product left in a store: its slices hold at most the level above the minimum. */
  StoreEndValue,
}

export enum ColKind {
  Supply = 1,
  Import,
  Export,
  Unserved,
  GridBinary,
  UnitOn,
  UnitStart,
  UnitPower,
  StorageCharge,
  StorageDischarge,
  StorageSoc,
  StorageBinary,
  UnitSlice,
  UnitColdStart,
  UnitReserve,
  StorageReserve,
  ReserveShortfall,
  DemandPeak,
  StoreLevel,
  StoreShortfall,
  StoreSpill,
  /** A slice of a store's end value (StoreEndValue row). */
  StoreEndValue,
  /** A bound block's free state before its first step (horizon-bound.ts). */
  StorageStartSoc,
  StoreStartLevel,
}

/** Per row and per column: kind, local step and the index of the unit, storage, store or demand charge (−1 for none). */
export interface ModelTags {
  rowKind: Uint8Array;
  rowStep: Int32Array;
  rowEntity: Int16Array;
  colKind: Uint8Array;
  colStep: Int32Array;
  colEntity: Int16Array;
}
