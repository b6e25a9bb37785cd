import { afterAll, describe, expect, it } from 'vitest';
import { Deadline } from '../../api/src/engine/deadline';
import { blockModel, findIndependentBlocks } from '../../api/src/engine/independent-blocks';
import type { ModelArrays } from '../../api/src/engine/model-arrays';
import { relativeGap, solveInBlocks } from '../../api/src/engine/solve-in-blocks';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { seededRandom } from './synthetic-sites';

const pool = new HighsSolverPool({ size: 2 });
afterAll(() => pool.close());

interface Col {
  cost: number;
  lo?: number;
  hi?: number;
  int?: boolean;
}

/** A maximised model from columns and rows written as { col: coefficient } maps. */
function model(cols: Col[], rows: { lo: number; hi: number; entries: Record<number, number> }[]): ModelArrays {
  const starts = [0];
  const indices: number[] = [];
  const values: number[] = [];
  cols.forEach((_, j) => {
    rows.forEach((r, i) => {
      if (r.entries[j] !== undefined) {
        indices.push(i);
        values.push(r.entries[j]);
      }
    });
    starts.push(indices.length);
  });
  return {
    numCols: cols.length,
    numRows: rows.length,
    colCost: Float64Array.from(cols, (c) => c.cost),
    colLower: Float64Array.from(cols, (c) => c.lo ?? 0),
    colUpper: Float64Array.from(cols, (c) => c.hi ?? 1),
    integrality: Int32Array.from(cols, (c) => (c.int ? 1 : 0)),
    rowLower: Float64Array.from(rows, (r) => r.lo),
    rowUpper: Float64Array.from(rows, (r) => r.hi),
    starts: Int32Array.from(starts),
    indices: Int32Array.from(indices),
    values: Float64Array.from(values),
  };
}

const KNAPSACK_A = { values: [4, 5, 6], weights: [3, 4, 5], capacity: 8 };
const KNAPSACK_B = { values: [3, 4, 5], weights: [2, 3, 4], capacity: 5 };

/**
 * Two knapsacks over binaries, each with `pad` zero-value continuous columns tied to it by a
 * row of their own (so a part can be made big enough to be solved apart), optionally joined by
 * a row holding one item of each. By enumerating the 8 subsets by hand: A is best with items
 * 1 and 3 (weight 8, value 10), B with items 1 and 2 (weight 5, value 7).
 */
function twoKnapsacks(opts: { linked?: boolean; pad?: number }): ModelArrays {
  const pad = opts.pad ?? 0;
  const cols: Col[] = [];
  const rows: { lo: number; hi: number; entries: Record<number, number> }[] = [];
  for (const k of [KNAPSACK_A, KNAPSACK_B]) {
    const first = cols.length;
    k.values.forEach((cost) => cols.push({ cost, int: true }));
    const knapsack: Record<number, number> = {};
    k.weights.forEach((w, i) => (knapsack[first + i] = w));
    rows.push({ lo: -Infinity, hi: k.capacity, entries: knapsack });
    if (!pad) continue;
    const padRow: Record<number, number> = { [first]: 0.5 };
    for (let i = 0; i < pad; i++) {
      padRow[cols.length] = 1;
      cols.push({ cost: 0 });
    }
    rows.push({ lo: -Infinity, hi: 100, entries: padRow });
  }
  if (opts.linked) rows.push({ lo: -Infinity, hi: 1, entries: { 2: 1, [3 + pad]: 1 } });
  return model(cols, rows);
}

describe('independent blocks', () => {
  it('finds no split in a model whose rows link every column', () => {
    const blocks = findIndependentBlocks(twoKnapsacks({ linked: true }));
    expect(blocks).toHaveLength(1);
    expect(Array.from(blocks[0].cols)).toEqual([0, 1, 2, 3, 4, 5]);
    expect(blocks[0].binaries).toBe(6);
  });

  it('bundles small parts in column order and keeps parts without binaries in one LP block', () => {
    // The two knapsacks (3 columns each, below the bundling size) then 250 one-column LPs.
    const knapsacks = twoKnapsacks({});
    const lpCols: Col[] = Array.from({ length: 250 }, () => ({ cost: 1, hi: 2 }));
    const m = model(
      [...[...KNAPSACK_A.values, ...KNAPSACK_B.values].map((cost) => ({ cost, int: true })), ...lpCols],
      [
        { lo: -Infinity, hi: KNAPSACK_A.capacity, entries: { 0: 3, 1: 4, 2: 5 } },
        { lo: -Infinity, hi: KNAPSACK_B.capacity, entries: { 3: 2, 4: 3, 5: 4 } },
        ...lpCols.map((_, k) => ({ lo: -Infinity, hi: 1, entries: { [6 + k]: 1 } })),
      ],
    );
    expect(findIndependentBlocks(knapsacks)).toHaveLength(1);
    const blocks = findIndependentBlocks(m);
    expect(blocks).toHaveLength(2);
    const [bundle, lp] = blocks;
    expect(Array.from(bundle.cols)).toEqual([0, 1, 2, 3, 4, 5]);
    expect(Array.from(bundle.rows)).toEqual([0, 1]);
    expect(lp.binaries).toBe(0);
    expect(lp.cols).toHaveLength(250);
    expect(lp.rows).toHaveLength(250);
    const sub = blockModel(m, lp);
    expect(sub.numCols).toBe(250);
    expect(sub.numRows).toBe(250);
    expect(Array.from(sub.indices.slice(0, 3))).toEqual([0, 1, 2]);
  });

  it('solves split parts to the optimum of the whole (hand enumeration: 10 + 7)', async () => {
    const m = twoKnapsacks({ pad: 200 });
    expect(findIndependentBlocks(m)).toHaveLength(2);
    const split = await solveInBlocks(pool, m, { deadline: Deadline.after(10), mipGap: 0 }, true);
    const whole = await solveInBlocks(pool, m, { deadline: Deadline.after(10), mipGap: 0 }, false);
    expect(split.blocks).toBe(2);
    expect(whole.blocks).toBe(1);
    expect(split.status).toBe('optimal');
    expect(split.objective).toBeCloseTo(17, 9);
    expect(whole.objective).toBeCloseTo(17, 9);
    expect(split.dualBound).toBeCloseTo(17, 9);
    expect(split.mipGap).toBeCloseTo(0, 12);
    expect(Array.from(split.colValue!.slice(0, 3), Math.round)).toEqual([1, 0, 1]);
    expect(Array.from(split.colValue!.slice(203, 206), Math.round)).toEqual([1, 1, 0]);
  });

  it('reports an infeasible part as infeasible for the whole, with its subsystem in whole-model indices', async () => {
    const cols: Col[] = Array.from({ length: 420 }, (_, j) => ({ cost: 1, int: j % 210 === 0 }));
    const entriesA: Record<number, number> = {};
    const entriesB: Record<number, number> = {};
    for (let j = 0; j < 210; j++) entriesA[j] = 1;
    for (let j = 210; j < 420; j++) entriesB[j] = 1;
    // Part B needs more than its 210 columns of at most 1 each can give.
    const m = model(cols, [
      { lo: -Infinity, hi: 5, entries: entriesA },
      { lo: 300, hi: Infinity, entries: entriesB },
    ]);
    const r = await solveInBlocks(pool, m, { deadline: Deadline.after(10), mipGap: 0, wantIis: true }, true);
    expect(r.blocks).toBe(2);
    expect(r.status).toBe('infeasible');
    expect(r.colValue).toBeNull();
    expect(r.iis).not.toBeNull();
    expect(Array.from(r.iis!.rows)).toEqual([1]);
  });

  it('keeps the summed gap within the requested one when parts of opposite sign each just met it', async () => {
    // A 220-item knapsack (positive optimum) beside a 220-item covering problem (negative
    // optimum of similar size): each part solved alone to a 2 % gap leaves more than 2 % of
    // the small sum between value and bound, so the parts holding that slack are solved again.
    const n = 220;
    const rnd = seededRandom(1);
    const cols: Col[] = [];
    const knapsack: Record<number, number> = {};
    const cover: Record<number, number> = {};
    let weightA = 0;
    let weightB = 0;
    for (let j = 0; j < n; j++) {
      cols.push({ cost: 20 + Math.round(80 * rnd()), int: true });
      knapsack[j] = 10 + Math.round(60 * rnd());
      weightA += knapsack[j];
    }
    for (let j = n; j < 2 * n; j++) {
      cols.push({ cost: -3.5 * (20 + Math.round(80 * rnd())), int: true });
      cover[j] = 10 + Math.round(60 * rnd());
      weightB += cover[j];
    }
    const m = model(cols, [
      { lo: -Infinity, hi: Math.round(0.4 * weightA), entries: knapsack },
      { lo: Math.round(0.35 * weightB), hi: Infinity, entries: cover },
    ]);
    const blocks = findIndependentBlocks(m);
    expect(blocks).toHaveLength(2);
    const alone = await Promise.all(blocks.map((b) => pool.solve(blockModel(m, b), { deadline: Deadline.after(20), mipGap: 0.02 })));
    expect(Math.sign(alone[0].objective!)).toBe(-Math.sign(alone[1].objective!));
    const sumValue = alone[0].objective! + alone[1].objective!;
    const sumBound = alone[0].dualBound! + alone[1].dualBound!;
    expect(relativeGap(sumValue, sumBound)).toBeGreaterThan(0.02);

    // Both rounds (the parts, then the re-solves) share one deadline: twice what one part was given.
    const r = await solveInBlocks(pool, m, { deadline: Deadline.after(40), mipGap: 0.02 }, true);
    expect(r.status).toBe('optimal');
    expect(r.mipGap!).toBeLessThanOrEqual(0.02);
    const exact = await solveInBlocks(pool, m, { deadline: Deadline.after(60), mipGap: 0 }, true);
    expect(r.objective!).toBeLessThanOrEqual(exact.objective! + 1e-6);
    expect(r.objective!).toBeGreaterThanOrEqual(exact.objective! * (1 - 0.02) - 1e-6);
  });

  it('measures the gap as solvers commonly do: |bound − value| / |value|', () => {
    expect(relativeGap(100, 101)).toBeCloseTo(0.01, 9);
    expect(relativeGap(-50, -49)).toBeCloseTo(0.02, 9);
    expect(relativeGap(0, 0)).toBe(0);
    expect(relativeGap(0, 1)).toBeGreaterThan(1e9);
  });
});
