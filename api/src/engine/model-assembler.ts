import { GrowableArray } from './growable-array';
import { ColKind, RowKind, type ModelArrays, type ModelTags } from './model-arrays';
import { TINY } from './numerics';

/**
 * A row bound that is float noise (a start level that cancels a step's net demand to 1e-15, say) is
 * written as 0: in the model's order-one units it means 0, and left alone it would read as a
 * coefficient fifteen orders of magnitude from the rest in the formulation report.
 */
const noiseToZero = (x: number) => (Math.abs(x) < TINY ? 0 : x);

/**
 * Collects columns, rows and entries of one MILP in typed arrays and packs them as CSC. Entries
 * arrive row by row; `objectiveOffset` holds the constant part of the objective the columns
 * cannot carry (internal money units).
 */
export class ModelAssembler {
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
  objectiveOffset = 0;

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
    this.rowLo.push(noiseToZero(lower));
    this.rowHi.push(noiseToZero(upper));
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
