/**
 * The online-learner protocol shared by every package.
 *
 * Round t (Zinkevich 2003; Hazan 2016, §1): the learner holds a decision x_t; the world reveals a
 * loss ℓ_t; the learner pays ℓ_t(x_t) and receives feedback — the value and a (sub)gradient
 * g_t ∈ ∂ℓ_t(x_t), or a full loss object — and updates to x_{t+1}.
 *
 * Wrappers (regret tracking, timing, logging) work on any implementation through
 * {@link Observable.observe}: after every update the learner calls each observer with a
 * {@link RoundRecord}.
 *
 * @module
 */

/** A loss function ℓ_t over decisions, revealed after the learner commits. */
export interface LossObject {
  /** ℓ_t(x). */
  value(x: Float64Array): number;
  /** Write a (sub)gradient of ℓ_t at x into `out` and return `out`. */
  gradient(x: Float64Array, out: Float64Array): Float64Array;
}

/**
 * What the world reveals after the learner commits to x_t.
 *
 * Either `gradient` (with `loss` = ℓ_t(x_t)), or `lossObject` (from which the learner evaluates
 * both), or both. A learner that needs a gradient and gets neither throws.
 */
export interface Feedback {
  /** ℓ_t(x_t), the loss suffered. Computed from `lossObject` when omitted. */
  readonly loss?: number;
  /** A (sub)gradient g_t ∈ ∂ℓ_t(x_t), of the decision's length. */
  readonly gradient?: Float64Array;
  /** The loss function itself, for learners (and regret comparators) that use it. */
  readonly lossObject?: LossObject;
}

/**
 * One round as seen by an observer, emitted after the update.
 *
 * The arrays are the learner's own buffers, valid only during the callback: copy what you keep.
 */
export interface RoundRecord {
  /** Round index t, starting at 1 for the first update. */
  readonly round: number;
  /** The decision x_t that was played (before the update). */
  readonly decision: Float64Array;
  /** ℓ_t(x_t). */
  readonly loss: number;
  /** g_t, when the feedback had one. */
  readonly gradient: Float64Array | undefined;
  /** ℓ_t, when the feedback had one. */
  readonly lossObject: LossObject | undefined;
}

/** Something that emits a {@link RoundRecord} per round. */
export interface Observable {
  /** Register `listener`; returns a function that removes it. */
  observe(listener: (record: RoundRecord) => void): () => void;
}

/** The protocol every online learner in recede follows. */
export interface OnlineLearner<TFeedback = Feedback, TSnapshot = unknown> extends Observable {
  /** Length of the decision vector. */
  readonly dimension: number;
  /** Number of completed updates. */
  readonly round: number;
  /** The current decision x_t (the learner's own buffer: read it, do not write it). */
  decision(): Float64Array;
  /** Take the round's feedback and move to x_{t+1}. On a thrown error the state is unchanged. */
  update(feedback: TFeedback): void;
  /** Return to the initial decision and round 0 (observers are kept). */
  reset(): void;
  /** Capture the full state for a later {@link OnlineLearner.restore}. */
  snapshot(): TSnapshot;
  /** Return to a state captured by {@link OnlineLearner.snapshot}. */
  restore(snapshot: TSnapshot): void;
}

/**
 * A small observer list with no allocation per emit. Learners own one and call `emit`.
 *
 * The list is copy-on-write: adding or removing a listener (even from inside a callback) replaces
 * the array, so an emit in progress still calls exactly the listeners registered when it began.
 */
export class ObserverList {
  private listeners: ReadonlyArray<(record: RoundRecord) => void> = [];

  /** Register a listener; returns its remover (calling it twice is harmless). */
  add(listener: (record: RoundRecord) => void): () => void {
    this.listeners = [...this.listeners, listener];
    let removed = false;
    return () => {
      if (removed) return;
      removed = true;
      const i = this.listeners.indexOf(listener);
      if (i >= 0) this.listeners = [...this.listeners.slice(0, i), ...this.listeners.slice(i + 1)];
    };
  }

  /** True when at least one listener is registered. */
  get active(): boolean {
    return this.listeners.length > 0;
  }

  /** Call every listener with `record`. */
  emit(record: RoundRecord): void {
    const ls = this.listeners;
    for (let i = 0; i < ls.length; i++) ls[i](record);
  }
}
