type NumberArray = Float64Array | Int32Array;

/** Append-only typed array: the model builder's hot path avoids boxed numbers and O(n²) copies. */
export class GrowableArray<T extends NumberArray> {
  data: T;
  length = 0;

  constructor(
    private readonly allocate: new (length: number) => T,
    capacity = 1024,
  ) {
    this.data = new allocate(capacity);
  }

  push(v: number): number {
    if (this.length === this.data.length) {
      const next = new this.allocate(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length] = v;
    return this.length++;
  }

  toArray(): T {
    return this.data.slice(0, this.length) as T;
  }
}
