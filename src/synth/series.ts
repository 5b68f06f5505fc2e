/** A growable Float64Array (amortised doubling), trimmed to its length when the run ends. */
export class Series {
  data: Float64Array;
  length = 0;
  constructor(capacity = 256) {
    this.data = new Float64Array(capacity);
  }
  push(v: number): void {
    if (this.length === this.data.length) {
      const next = new Float64Array(this.data.length * 2);
      next.set(this.data);
      this.data = next;
    }
    this.data[this.length++] = v;
  }
  /** A copy of exactly the pushed values. */
  toArray(): Float64Array {
    return this.data.slice(0, this.length);
  }
}
