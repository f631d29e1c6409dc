/**
 * Imitation as online learning: each round the world reveals states labelled by the expert; the
 * learner pays the imitation loss of its current policy on them, aggregates them and refits on
 * everything seen so far (follow the leader).
 *
 * @module
 */
import {
  ObserverList,
  type OnlineLearner,
  RecedeError,
  type RoundRecord,
  requireInteger,
  requireVector,
} from "@recede/core";
import { requireInterface, requireOptionsObject } from "../internal/validate.js";
import type { StochasticPolicy } from "../policies/policy.js";
import { ImitationDataset } from "./dataset.js";
import {
  type FitPolicyOptions,
  type FitPolicyReport,
  fitPolicy,
  imitationLoss,
} from "./fitPolicy.js";

/** One round's data: `count` states with their expert labels. */
export interface ImitationFeedback {
  /** count·n states. */
  readonly states: Float64Array;
  /** count·(label width) expert labels (controls, or action indices for a categorical learner). */
  readonly labels: Float64Array;
  /** Number of pairs. */
  readonly count: number;
}

/** Options of {@link imitationLearner}. */
export interface ImitationLearnerOptions {
  /** The learner's policy family. */
  readonly policy: StochasticPolicy;
  /**
   * Initial θ (copied).
   * @defaultValue `policy.initialParameters()`
   */
  readonly initial?: Float64Array;
  /** Options of the refit. @defaultValue {} */
  readonly fit?: FitPolicyOptions;
}

/** State captured by {@link ImitationLearner.snapshot}. */
export interface ImitationLearnerSnapshot {
  readonly round: number;
  readonly decision: Float64Array;
  /** Number of aggregated pairs at the time (the data set only grows, so this restores it). */
  readonly dataSize: number;
  readonly lastFit: FitPolicyReport | null;
  readonly lastRoundLoss: number;
}

interface MutableRecord {
  round: number;
  decision: Float64Array;
  loss: number;
  gradient: undefined;
  lossObject: undefined;
}

/** The follow-the-leader imitation learner; create with {@link imitationLearner}. */
export class ImitationLearner
  implements OnlineLearner<ImitationFeedback, ImitationLearnerSnapshot>
{
  readonly dimension: number;
  /** The policy family. */
  readonly policy: StochasticPolicy;
  /** The aggregated data set D (grows every round). */
  readonly dataset: ImitationDataset;
  private readonly theta: Float64Array;
  private readonly initial: Float64Array;
  private readonly played: Float64Array;
  private readonly fitOptions: FitPolicyOptions;
  private readonly scratch: ImitationDataset;
  private t = 0;
  private fit: FitPolicyReport | null = null;
  private roundLoss = Number.NaN;
  private readonly observers = new ObserverList();
  private readonly record: MutableRecord;

  /** Use {@link imitationLearner}; the constructor trusts validated options. */
  constructor(policy: StochasticPolicy, initial: Float64Array, fit: FitPolicyOptions) {
    this.policy = policy;
    this.dimension = policy.parameterCount;
    this.theta = initial.slice();
    this.initial = initial.slice();
    this.played = initial.slice();
    this.fitOptions = fit;
    this.dataset = new ImitationDataset(policy.stateSize, policy.actionSize);
    this.scratch = new ImitationDataset(policy.stateSize, policy.actionSize);
    this.record = {
      round: 0,
      decision: this.played,
      loss: Number.NaN,
      gradient: undefined,
      lossObject: undefined,
    };
  }

  get round(): number {
    return this.t;
  }

  /** The report of the last refit (null before the first round). */
  get lastFit(): FitPolicyReport | null {
    return this.fit;
  }

  /** ℓ_t(θ_t): the imitation loss of the played θ on the round's new data (NaN before round 1). */
  get lastRoundLoss(): number {
    return this.roundLoss;
  }

  decision(): Float64Array {
    return this.theta;
  }

  observe(listener: (record: RoundRecord) => void): () => void {
    if (typeof listener !== "function") {
      throw new RecedeError("type", "ImitationLearner.observe", "listener", "a function", listener);
    }
    return this.observers.add(listener);
  }

  /**
   * Pay ℓ_t(θ_t) on the new pairs, aggregate them into D and refit θ_{t+1} = argmin_θ Σ_{D} ℓ.
   * On a typed error (bad shapes, non-finite labels, a failed fit) nothing changes.
   */
  update(feedback: ImitationFeedback): void {
    const fn = "ImitationLearner.update";
    if (typeof feedback !== "object" || feedback === null) {
      throw new RecedeError(
        "type",
        fn,
        "feedback",
        "an object { states, labels, count }",
        feedback,
      );
    }
    const n = this.policy.stateSize;
    const w = this.policy.actionSize;
    const count = requireInteger(fn, "feedback.count", feedback.count, 1);
    const check = (arr: unknown, len: number, name: string): Float64Array => {
      if (!(arr instanceof Float64Array) || arr.length < len) {
        throw new RecedeError(
          "dimension",
          fn,
          `feedback.${name}`,
          `a Float64Array of length >= ${len}`,
          arr,
        );
      }
      for (let i = 0; i < len; i++) {
        if (!Number.isFinite(arr[i])) {
          throw new RecedeError("non-finite", fn, `feedback.${name}[${i}]`, "finite", arr[i]);
        }
      }
      return arr;
    };
    check(feedback.states, count * n, "states");
    check(feedback.labels, count * w, "labels");
    if (this.policy.kind === "categorical") {
      for (let i = 0; i < count; i++) {
        const a = feedback.labels[i];
        if (!Number.isInteger(a) || a < 0 || a >= this.policy.actionCount) {
          throw new RecedeError(
            "range",
            fn,
            `feedback.labels[${i}]`,
            `an action index in [0, ${this.policy.actionCount - 1}]`,
            a,
          );
        }
      }
    }
    this.scratch.clear();
    for (let i = 0; i < count; i++)
      this.scratch.add(feedback.states, i * n, feedback.labels, i * w);
    const loss = imitationLoss(this.policy, this.theta, this.scratch);
    const before = this.dataset.size;
    for (let i = 0; i < count; i++)
      this.dataset.add(feedback.states, i * n, feedback.labels, i * w);
    this.played.set(this.theta);
    let report: FitPolicyReport;
    try {
      report = fitPolicy(this.policy, this.theta, this.dataset, this.fitOptions);
    } catch (e) {
      this.truncate(before);
      throw e;
    }
    this.t++;
    this.fit = report;
    this.roundLoss = loss;
    if (this.observers.active) {
      this.record.round = this.t;
      this.record.loss = loss;
      this.observers.emit(this.record);
    }
  }

  private truncate(size: number): void {
    // The data set is append-only: rebuild it with its first `size` pairs.
    const n = this.policy.stateSize;
    const w = this.policy.actionSize;
    const s = this.dataset.states.slice(0, size * n);
    const l = this.dataset.labels.slice(0, size * w);
    this.dataset.clear();
    for (let i = 0; i < size; i++) this.dataset.add(s, i * n, l, i * w);
  }

  reset(): void {
    this.theta.set(this.initial);
    this.played.set(this.initial);
    this.dataset.clear();
    this.t = 0;
    this.fit = null;
    this.roundLoss = Number.NaN;
  }

  snapshot(): ImitationLearnerSnapshot {
    return {
      round: this.t,
      decision: this.theta.slice(),
      dataSize: this.dataset.size,
      lastFit: this.fit,
      lastRoundLoss: this.roundLoss,
    };
  }

  restore(snapshot: ImitationLearnerSnapshot): void {
    const fn = "ImitationLearner.restore";
    if (typeof snapshot !== "object" || snapshot === null)
      throw new RecedeError("type", fn, "snapshot", "an ImitationLearnerSnapshot", snapshot);
    requireVector(fn, "snapshot.decision", snapshot.decision, this.dimension);
    if (
      !Number.isInteger(snapshot.dataSize) ||
      snapshot.dataSize < 0 ||
      snapshot.dataSize > this.dataset.size
    ) {
      throw new RecedeError(
        "state",
        fn,
        "snapshot.dataSize",
        `an integer in [0, ${this.dataset.size}] (the data set only grows)`,
        snapshot.dataSize,
      );
    }
    this.truncate(snapshot.dataSize);
    this.theta.set(snapshot.decision);
    this.played.set(snapshot.decision);
    this.t = snapshot.round;
    this.fit = snapshot.lastFit;
    this.roundLoss = snapshot.lastRoundLoss;
  }
}

/**
 * Create a follow-the-leader imitation learner (the online-learning reading of DAgger, S. Ross,
 * G. J. Gordon, J. A. Bagnell, "A Reduction of Imitation Learning and Structured Prediction to
 * No-Regret Online Learning", AISTATS, 2011; MATH.md §6.2): round i reveals states s visited by the
 * round's policy and the expert's labels π*(s); the round loss is
 * ℓ_i(θ) = mean over the new pairs of ‖μ_θ(s) − π*(s)‖² (squared action error; negative
 * log-likelihood for categorical learners), and the update is θ_{i+1} = argmin_θ Σ_{j≤i} ℓ_j(θ)
 * by {@link fitPolicy} on the aggregated data — follow the leader, no-regret for strongly convex
 * losses. Observers receive ℓ_i(θ_i) as the round's loss, so regret trackers apply unchanged.
 *
 * @example
 * ```ts
 * const learner = imitationLearner({ policy: pi });
 * learner.update({ states, labels, count });
 * ```
 */
export function imitationLearner(options: ImitationLearnerOptions): ImitationLearner {
  const fn = "imitationLearner";
  requireOptionsObject(fn, options);
  const policy = options.policy;
  requireInterface(fn, "policy", policy, "mean", "a StochasticPolicy");
  const initial = requireVector(
    fn,
    "initial",
    options.initial ?? policy.initialParameters(),
    policy.parameterCount,
  );
  return new ImitationLearner(policy, initial, options.fit ?? {});
}
