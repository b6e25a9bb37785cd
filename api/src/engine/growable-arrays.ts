/** Append-only typed arrays: the model builder's hot path avoids boxed numbers and O(n²) copies. */
export class GrowableFloat64 {
  data: Float64Array;
  length = 0;
  constructor(capacity = 1024) {
    this.data = new Float64Array(capacity);
  }
  push(v: number): number {
    if (this.length === this.data.length) {
      const next = new Float64Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length] = v;
    return this.length++;
  }
  toArray(): Float64Array {
    return this.data.slice(0, this.length);
  }
}

export class GrowableInt32 {
  data: Int32Array;
  length = 0;
  constructor(capacity = 1024) {
    this.data = new Int32Array(capacity);
  }
  push(v: number): number {
    if (this.length === this.data.length) {
      const next = new Int32Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length] = v;
    return this.length++;
  }
  toArray(): Int32Array {
    return this.data.slice(0, this.length);
  }
}
