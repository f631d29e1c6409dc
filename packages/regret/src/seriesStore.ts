/**
 * Row storage for the tracker's per-round series: grows by doubling ("full") or keeps the last
 * `capacity` rows in a ring ("window"). Pushing a row allocates nothing in ring mode and
 * amortized O(1) in growing mode.
 *
 * @module
 * @internal
 */

/** @internal */
export class RowStore {
  readonly width: number;
  private data: Float64Array;
  private cap: number;
  private readonly ring: boolean;
  private head = 0; // ring: index of the oldest row
  private count = 0;

  constructor(width: number, capacity: number, ring: boolean) {
    this.width = width;
    this.cap = Math.max(1, capacity);
    this.ring = ring;
    this.data = new Float64Array(this.cap * width);
  }

  get length(): number {
    return this.count;
  }

  /** Rows the buffer holds before it grows (ring: the ring size). */
  get capacity(): number {
    return this.cap;
  }

  /** Bytes held by the row buffer. */
  get bytes(): number {
    return this.data.byteLength;
  }

  /** Append `row[offset … offset + width)`. */
  push(row: Float64Array, offset = 0): void {
    const w = this.width;
    if (this.ring) {
      let slot: number;
      if (this.count < this.cap) {
        slot = (this.head + this.count) % this.cap;
        this.count++;
      } else {
        slot = this.head;
        this.head = (this.head + 1) % this.cap;
      }
      const base = slot * w;
      for (let j = 0; j < w; j++) this.data[base + j] = row[offset + j];
      return;
    }
    if (this.count === this.cap) {
      const next = new Float64Array(this.cap * 2 * w);
      next.set(this.data);
      this.data = next;
      this.cap *= 2;
    }
    const base = this.count * w;
    for (let j = 0; j < w; j++) this.data[base + j] = row[offset + j];
    this.count++;
  }

  /**
   * Keep rows 1, 3, 5, … (0-based) and drop the others, in place (growing mode only): with rows at
   * rounds s, 2s, 3s, … the survivors are at 2s, 4s, … No allocation.
   */
  halve(): void {
    const w = this.width;
    const keep = this.count >> 1;
    for (let r = 0; r < keep; r++) {
      const from = (2 * r + 1) * w;
      const to = r * w;
      for (let j = 0; j < w; j++) this.data[to + j] = this.data[from + j];
    }
    this.count = keep;
  }

  /** Offset in `buffer` of the i-th retained row (0 = oldest). */
  offsetOf(i: number): number {
    return (this.ring ? (this.head + i) % this.cap : i) * this.width;
  }

  get buffer(): Float64Array {
    return this.data;
  }

  clear(): void {
    this.head = 0;
    this.count = 0;
  }
}

/** A ring or growing list of object references (loss objects), same indexing as {@link RowStore}. */
export class RefStore<T> {
  private items: Array<T | undefined>;
  private readonly ring: boolean;
  private readonly cap: number;
  private head = 0;
  private count = 0;

  constructor(capacity: number, ring: boolean) {
    this.ring = ring;
    this.cap = Math.max(1, capacity);
    this.items = ring ? new Array<T | undefined>(this.cap).fill(undefined) : [];
  }

  get length(): number {
    return this.count;
  }

  push(item: T | undefined): void {
    if (!this.ring) {
      this.items.push(item);
      this.count++;
      return;
    }
    if (this.count < this.cap) {
      this.items[this.count++] = item;
    } else {
      this.items[this.head] = item;
      this.head = (this.head + 1) % this.cap;
    }
  }

  get(i: number): T | undefined {
    return this.items[this.ring ? (this.head + i) % this.cap : i];
  }

  clear(): void {
    this.head = 0;
    this.count = 0;
    if (this.ring) this.items.fill(undefined);
    else this.items = [];
  }
}
