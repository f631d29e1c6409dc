/**
 * The policy-gradient loop: collect a batch with the current policy, score it, take one step.
 *
 * @module
 */
import { createStream, RecedeError, requireInteger } from "@recede/core";
import type { RolloutEnvironment } from "../environment/environment.js";
import type { GradientEstimator } from "../estimators/reinforce.js";
import { requireInterface, requireOptionsObject } from "../internal/validate.js";
import { PolicyOptimizer } from "./policyOptimizer.js";

/** Options of {@link trainPolicy}. */
export interface TrainPolicyOptions {
  /** Where episodes run. */
  readonly environment: RolloutEnvironment;
  /** The learner (policy family, geometry, step rule); its current θ is the starting point. */
  readonly optimizer: PolicyOptimizer;
  /** Turns each batch into scored samples (e.g. {@link reinforce}, {@link gae}). */
  readonly estimator: GradientEstimator;
  /** Rounds (policy updates). */
  readonly rounds: number;
  /** Episodes per round. */
  readonly episodesPerRound: number;
  /**
   * Seed of the episodes (initial states, disturbances, action noise).
   * @defaultValue 0
   */
  readonly seed?: number | string;
  /**
   * Called after every round with its record (e.g. to log or to stop early by throwing).
   * @defaultValue none
   */
  readonly onRound?: (record: TrainingRound) => void;
}

/** One round of {@link trainPolicy}. */
export interface TrainingRound {
  /** Round (1-based). */
  readonly round: number;
  /** Mean undiscounted episode cost of the batch (collected before the update). */
  readonly meanCost: number;
  /** Surrogate loss at the played parameters. */
  readonly surrogate: number;
  /** ‖∇L‖₂. */
  readonly gradientNorm: number;
  /** Step size used. */
  readonly stepSize: number;
  /** Measured mean KL between consecutive policies. */
  readonly kl: number;
  /** False when a trust-region line search rejected every candidate. */
  readonly accepted: boolean;
}

/** Result of {@link trainPolicy}. */
export interface TrainingResult {
  /** The final θ (a copy). */
  readonly parameters: Float64Array;
  /** Per-round records. */
  readonly rounds: readonly TrainingRound[];
}

/**
 * Run `rounds` rounds of on-policy policy gradient: x₀, disturbances and actions drawn from one
 * seeded stream; each round collects `episodesPerRound` episodes with π_θt, scores them with the
 * estimator and takes one {@link PolicyOptimizer} step (whose geometry decides vanilla / natural /
 * trust-region). Deterministic for a given seed.
 *
 * @example
 * ```ts
 * const res = trainPolicy({ environment: env, optimizer: policyOptimizer({ policy: pi, geometry: "fisher", trustRegion: true }),
 *   estimator: gae(), rounds: 50, episodesPerRound: 100, seed: 1 });
 * ```
 */
export function trainPolicy(options: TrainPolicyOptions): TrainingResult {
  const fn = "trainPolicy";
  requireOptionsObject(fn, options);
  const { environment: env, optimizer: opt, estimator: est } = options;
  if (!(opt instanceof PolicyOptimizer))
    throw new RecedeError("type", fn, "optimizer", "a PolicyOptimizer", opt);
  requireInterface(fn, "environment", env, "collect", "a RolloutEnvironment");
  requireInterface(fn, "estimator", est, "score", "a GradientEstimator");
  env.checkPolicy(fn, opt.policy);
  const rounds = requireInteger(fn, "rounds", options.rounds, 1);
  const E = requireInteger(fn, "episodesPerRound", options.episodesPerRound, 1);
  if (options.onRound !== undefined && typeof options.onRound !== "function") {
    throw new RecedeError("type", fn, "onRound", "a function", options.onRound);
  }
  const stream = createStream(options.seed ?? 0);
  const batch = env.createBatch(E, opt.policy.actionSize);
  const records: TrainingRound[] = [];
  for (let r = 1; r <= rounds; r++) {
    env.collect(opt.policy, opt.decision(), stream, batch);
    const meanCost = batch.meanCost();
    opt.update({ samples: est.score(batch) });
    const rep = opt.lastReport;
    const rec: TrainingRound = {
      round: r,
      meanCost,
      surrogate: rep?.surrogate ?? Number.NaN,
      gradientNorm: rep?.gradientNorm ?? Number.NaN,
      stepSize: rep?.stepSize ?? Number.NaN,
      kl: rep?.kl ?? Number.NaN,
      accepted: rep?.accepted ?? false,
    };
    records.push(rec);
    options.onRound?.(rec);
  }
  return { parameters: opt.decision().slice(), rounds: records };
}
