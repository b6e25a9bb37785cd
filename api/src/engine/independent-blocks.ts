import type { ModelArrays } from './model-arrays';

/** Columns no row links to any column outside them, with the rows that touch them. */
export interface ModelBlock {
  cols: Int32Array;
  rows: Int32Array;
  binaries: number;
}

/**
 * Blocks this small (in columns) are solved together with their neighbours: a solve has a fixed
 * cost of a few milliseconds, and a handful of tiny models is no harder together than apart.
 */
const MIN_BLOCK_COLUMNS = 200;

function findRoot(parent: Int32Array, j: number): number {
  while (parent[j] !== j) {
    parent[j] = parent[parent[j]];
    j = parent[j];
  }
  return j;
}

/**
 * The connected parts of the model: two columns belong together when a row holds both. Sparse
 * sets leave steps where every unit is off by construction; with no storage carrying energy
 * across them and no minimum down time reaching over them, nothing links the steps on either
 * side, and each side is a model of its own. A MIP's effort grows faster than its size, so
 * solving the parts apart (and in parallel) is faster, and their optima add up to the optimum.
 *
 * Parts without binaries are gathered into one LP; small parts are bundled in step order up to
 * MIN_BLOCK_COLUMNS. Rows without entries go with the first block, so an infeasible empty row
 * still makes the model infeasible. Returns one block holding everything when nothing splits.
 */
export function findIndependentBlocks(model: ModelArrays): ModelBlock[] {
  const { numCols, numRows, starts, indices, integrality } = model;
  const parent = new Int32Array(numCols);
  for (let j = 0; j < numCols; j++) parent[j] = j;
  const rowFirstCol = new Int32Array(numRows).fill(-1);
  for (let j = 0; j < numCols; j++) {
    for (let p = starts[j]; p < starts[j + 1]; p++) {
      const i = indices[p];
      const first = rowFirstCol[i];
      if (first < 0) {
        rowFirstCol[i] = j;
        continue;
      }
      const a = findRoot(parent, j);
      const b = findRoot(parent, first);
      if (a !== b) parent[Math.max(a, b)] = Math.min(a, b);
    }
  }

  // Components in order of their first column (the builder adds columns step by step).
  const componentOf = new Int32Array(numCols);
  const rootIndex = new Map<number, number>();
  const sizes: number[] = [];
  const hasInteger: boolean[] = [];
  for (let j = 0; j < numCols; j++) {
    const root = findRoot(parent, j);
    let c = rootIndex.get(root);
    if (c === undefined) {
      c = sizes.length;
      rootIndex.set(root, c);
      sizes.push(0);
      hasInteger.push(false);
    }
    componentOf[j] = c;
    sizes[c]++;
    if (integrality[j]) hasInteger[c] = true;
  }
  if (sizes.length <= 1) return [wholeModel(model)];

  // Component → block: one LP block for every part without binaries, bundles for the rest.
  const blockOf = new Int32Array(sizes.length);
  let blocks = 0;
  let lpBlock = -1;
  let open = -1;
  let openSize = 0;
  for (let c = 0; c < sizes.length; c++) {
    if (!hasInteger[c]) {
      if (lpBlock < 0) lpBlock = blocks++;
      blockOf[c] = lpBlock;
      continue;
    }
    if (open < 0 || openSize >= MIN_BLOCK_COLUMNS) {
      open = blocks++;
      openSize = 0;
    }
    blockOf[c] = open;
    openSize += sizes[c];
  }
  if (blocks === 1) return [wholeModel(model)];

  const colLists: number[][] = Array.from({ length: blocks }, () => []);
  const rowLists: number[][] = Array.from({ length: blocks }, () => []);
  const binaries = new Array<number>(blocks).fill(0);
  for (let j = 0; j < numCols; j++) {
    const b = blockOf[componentOf[j]];
    colLists[b].push(j);
    if (integrality[j]) binaries[b]++;
  }
  for (let i = 0; i < numRows; i++) {
    const first = rowFirstCol[i];
    rowLists[first < 0 ? 0 : blockOf[componentOf[first]]].push(i);
  }
  return colLists.map((cols, b) => ({ cols: Int32Array.from(cols), rows: Int32Array.from(rowLists[b]), binaries: binaries[b] }));
}

function wholeModel(model: ModelArrays): ModelBlock {
  const cols = new Int32Array(model.numCols);
  for (let j = 0; j < cols.length; j++) cols[j] = j;
  const rows = new Int32Array(model.numRows);
  for (let i = 0; i < rows.length; i++) rows[i] = i;
  let binaries = 0;
  for (let j = 0; j < model.numCols; j++) if (model.integrality[j]) binaries++;
  return { cols, rows, binaries };
}

/** The block as a model of its own: its columns and rows renumbered in their original order. */
export function blockModel(model: ModelArrays, block: ModelBlock): ModelArrays {
  const { cols, rows } = block;
  const localRow = new Int32Array(model.numRows).fill(-1);
  rows.forEach((i, r) => (localRow[i] = r));
  const starts = new Int32Array(cols.length + 1);
  let nnz = 0;
  cols.forEach((j, c) => {
    nnz += model.starts[j + 1] - model.starts[j];
    starts[c + 1] = nnz;
  });
  const indices = new Int32Array(nnz);
  const values = new Float64Array(nnz);
  let at = 0;
  for (const j of cols) {
    for (let p = model.starts[j]; p < model.starts[j + 1]; p++) {
      indices[at] = localRow[model.indices[p]];
      values[at] = model.values[p];
      at++;
    }
  }
  const pick = <T extends Float64Array | Int32Array>(source: T, at: Int32Array): T => {
    const out = new (source.constructor as new (n: number) => T)(at.length);
    at.forEach((k, n) => (out[n] = source[k]));
    return out;
  };
  return {
    numCols: cols.length,
    numRows: rows.length,
    colCost: pick(model.colCost, cols),
    colLower: pick(model.colLower, cols),
    colUpper: pick(model.colUpper, cols),
    integrality: pick(model.integrality, cols),
    rowLower: pick(model.rowLower, rows),
    rowUpper: pick(model.rowUpper, rows),
    starts,
    indices,
    values,
  };
}
