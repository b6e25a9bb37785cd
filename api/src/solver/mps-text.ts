import type { ModelArrays } from '../engine/model-arrays';

/** Column and row names in the text: their index, so a solution reads back without a lookup table. */
export const colName = (j: number) => `c${j}`;
export const rowName = (i: number) => `r${i}`;

/** Shortest text that reads back as the same double (MPS readers take 1e-7 and 2.5e+21). */
const num = (x: number) => String(x);

/**
 * A model as free-format MPS text (the `FREE` word on the NAME card tells COIN-OR's reader so).
 * MPS minimises, so the engine's maximisation is written with every cost negated; the caller
 * recomputes the objective from the values. Every column gets both bounds written out: readers
 * disagree on the default upper bound of an integer column.
 */
export function modelToMps(m: ModelArrays): string {
  const out: string[] = ['NAME gridwright FREE', 'ROWS', ' N obj'];
  const ranges: string[] = [];
  const rhs: string[] = [];
  for (let i = 0; i < m.numRows; i++) {
    const lo = m.rowLower[i];
    const hi = m.rowUpper[i];
    if (lo === hi) {
      out.push(` E ${rowName(i)}`);
      if (lo !== 0) rhs.push(` rhs ${rowName(i)} ${num(lo)}`);
    } else if (lo === -Infinity) {
      out.push(` L ${rowName(i)}`);
      // A row without bounds on either side is kept (its index names its dual) as ≤ "infinity".
      const value = hi === Infinity ? 1e30 : hi;
      if (value !== 0) rhs.push(` rhs ${rowName(i)} ${num(value)}`);
    } else {
      out.push(` G ${rowName(i)}`);
      if (lo !== 0) rhs.push(` rhs ${rowName(i)} ${num(lo)}`);
      if (hi !== Infinity) ranges.push(` rng ${rowName(i)} ${num(hi - lo)}`);
    }
  }
  out.push('COLUMNS');
  let integers = false;
  for (let j = 0; j < m.numCols; j++) {
    const integer = m.integrality[j] !== 0;
    if (integer !== integers) {
      out.push(integer ? ` MARKER 'MARKER' 'INTORG'` : ` MARKER 'MARKER' 'INTEND'`);
      integers = integer;
    }
    const name = colName(j);
    // A column in no row and without cost still has to be declared here.
    if (m.colCost[j] !== 0 || m.starts[j] === m.starts[j + 1]) out.push(` ${name} obj ${num(-m.colCost[j])}`);
    for (let k = m.starts[j]; k < m.starts[j + 1]; k++) out.push(` ${name} ${rowName(m.indices[k])} ${num(m.values[k])}`);
  }
  if (integers) out.push(` MARKER 'MARKER' 'INTEND'`);
  out.push('RHS', ...rhs);
  if (ranges.length) out.push('RANGES', ...ranges);
  out.push('BOUNDS');
  for (let j = 0; j < m.numCols; j++) {
    const lo = m.colLower[j];
    const hi = m.colUpper[j];
    const name = colName(j);
    if (lo === hi) {
      out.push(` FX bnd ${name} ${num(lo)}`);
      continue;
    }
    out.push(lo === -Infinity ? ` MI bnd ${name}` : ` LO bnd ${name} ${num(lo)}`);
    out.push(hi === Infinity ? ` PL bnd ${name}` : ` UP bnd ${name} ${num(hi)}`);
  }
  out.push('ENDATA', '');
  return out.join('\n');
}
