/**
 * The aggregated imitation data set D = {(s, a*)} of behaviour cloning and DAgger.
 *
 * @module
 */
import { RecedeError, requireInteger } from "@recede/core";

/**
 * A growable set of (state, expert label) pairs in flat row-major buffers.
 * A label is an action record of the learner's family: a control vector (Gaussian policies) or a
 * discrete action index (categorical policies, one number).
 */
export class ImitationDataset {
  /** State size n. */
  readonly stateSize: number;
  /** Label width (m, or 1 for an index). */
  readonly labelSize: number;
  private s: Float64Array;
  private a: Float64Array;
  private n = 0;

  constructor(stateSize: number, labelSize: number, capacity = 1024) {
    requireInteger("ImitationDataset", "stateSize", stateSize, 1);
    requireInteger("ImitationDataset", "labelSize", labelSize, 1);
    this.stateSize = stateSize;
    this.labelSize = labelSize;
    const c = Math.max(1, capacity);
    this.s = new Float64Array(c * stateSize);
    this.a = new Float64Array(c * labelSize);
  }

  /** Number of pairs. */
  get size(): number {
    return this.n;
  }

  /** The first size·n entries hold the states (the buffer may be longer). */
  get states(): Float64Array {
    return this.s;
  }

  /** The first size·(label width) entries hold the labels. */
  get labels(): Float64Array {
    return this.a;
  }

  /** Append the state at `states[so ..]` with the label at `label[lo ..]`. */
  add(states: Float64Array, so: number, label: ArrayLike<number>, lo = 0): void {
    const ns = this.stateSize;
    const na = this.labelSize;
    for (let i = 0; i < na; i++) {
      if (!Number.isFinite(label[lo + i])) {
        throw new RecedeError(
          "non-finite",
          "ImitationDataset.add",
          `label[${i}]`,
          "finite",
          label[lo + i],
        );
      }
    }
    if ((this.n + 1) * ns > this.s.length) {
      const grow = (b: Float64Array, w: number) => {
        const nb = new Float64Array(Math.max(2 * b.length, (this.n + 1) * w));
        nb.set(b);
        return nb;
      };
      this.s = grow(this.s, ns);
      this.a = grow(this.a, na);
    }
    for (let i = 0; i < ns; i++) this.s[this.n * ns + i] = states[so + i];
    for (let i = 0; i < na; i++) this.a[this.n * na + i] = label[lo + i];
    this.n++;
  }

  /** Remove every pair (the buffers are kept). */
  clear(): void {
    this.n = 0;
  }
}
