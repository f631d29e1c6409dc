/**
 * AggreVaTeD: differentiable imitation with the expert's cost-to-go as the critic.
 *
 * @module
 */
import {
  createStream,
  type Geometry,
  RecedeError,
  requireInteger,
  requireVector,
  type StepSizeInput,
} from "@recede/core";
import type { RolloutEnvironment } from "../environment/environment.js";
import type { EpisodeBatch } from "../environment/episodeBatch.js";
import type { ScoredSamples } from "../estimators/scoredSamples.js";
import {
  requireInterface,
  requireOptionsObject,
  requireUnitHalfOpen,
} from "../internal/validate.js";
import { controlOf, type StochasticPolicy } from "../policies/policy.js";
import type { FisherGeometryOptions } from "../updates/fisherGeometry.js";
import {
  type PolicyOptimizer,
  policyOptimizer,
  type TrustRegionOptions,
} from "../updates/policyOptimizer.js";
import type { Expert } from "./dagger.js";

/** Options of {@link aggrevated}. */
export interface AggrevatedOptions {
  /** Where episodes run. */
  readonly environment: RolloutEnvironment;
  /** The expert (its `costToGo` is used when present). */
  readonly expert: Expert;
  /** The learner's (stochastic, differentiable) policy family. */
  readonly policy: StochasticPolicy;
  /** Rounds N. */
  readonly rounds: number;
  /** Roll-in episodes per round. */
  readonly episodesPerRound: number;
  /** Seed of roll-ins. @defaultValue 0 */
  readonly seed?: number | string;
  /** Initial θ. @defaultValue `policy.initialParameters()` */
  readonly initial?: Float64Array;
  /**
   * Geometry of the update (see {@link PolicyOptimizerOptions.geometry}); `"fisher"` with a
   * trust region is the natural-gradient AggreVaTeD of the paper.
   * @defaultValue "fisher"
   */
  readonly geometry?: "euclidean" | "fisher" | Geometry;
  /** Fisher geometry options. @defaultValue {} */
  readonly fisher?: FisherGeometryOptions;
  /** Step size (ignored with a trust region). @defaultValue 0.01 */
  readonly stepSize?: StepSizeInput;
  /**
   * KL trust region (the KL budget δ of the paper's natural-gradient update); `false` for fixed
   * steps.
   * @defaultValue { radius: 0.01 }
   */
  readonly trustRegion?: boolean | TrustRegionOptions;
  /**
   * Where Q* comes from: `"expert"` calls `expert.costToGo(s, a, T − t)`; `"rollout"` estimates it
   * by noise-free rollouts of the environment's model: apply a at s, then follow the expert for the
   * remaining steps (at most `rolloutSteps`), summing the (discounted) running costs and, when the
   * rollout reaches the episode's end, the terminal cost.
   * @defaultValue "expert" when the expert has `costToGo`, else `"rollout"`
   */
  readonly costToGo?: "expert" | "rollout";
  /**
   * Cap on the length of each cost-to-go rollout (steps after the first action).
   * @defaultValue the remaining episode length
   */
  readonly rolloutSteps?: number;
  /**
   * Discount of the rollout estimate.
   * @defaultValue 1
   */
  readonly discount?: number;
}

/** One AggreVaTeD round. */
export interface AggrevatedRound {
  /** Round n (1-based). */
  readonly round: number;
  /** Mean undiscounted cost of the round's roll-in episodes (stochastic learner). */
  readonly rollInCost: number;
  /** The surrogate ℓ_n(θ_n) = mean advantage A*(s, a) of the learner's actions. */
  readonly loss: number;
  /** Mean KL between consecutive policies on the round's states. */
  readonly kl: number;
}

/** Result of {@link aggrevated}. */
export interface AggrevatedResult {
  /** The final θ. */
  readonly parameters: Float64Array;
  /** The policy optimizer (its geometry, reports and observers). */
  readonly optimizer: PolicyOptimizer;
  /** Per-round records. */
  readonly rounds: readonly AggrevatedRound[];
  /** Expert cost-to-go evaluations (calls to `costToGo`, or rollouts). */
  readonly costToGoEvaluations: number;
}

/**
 * Q*(s_i, a_i) for every sample of the batch (sample i = e·T + t), by expert rollouts on the
 * environment's model, batched by start time. `useExpertAction` replaces a_i by π*(s_i) (for V*).
 */
function rolloutCostToGo(
  env: RolloutEnvironment,
  expert: Expert,
  batch: EpisodeBatch,
  useExpertAction: boolean,
  cap: number,
  gamma: number,
  out: Float64Array,
): void {
  const E = batch.episodes;
  const T = batch.horizon;
  const n = env.stateSize;
  const m = env.controlSize;
  const x = new Float64Array(E * n);
  const u = new Float64Array(E * m);
  const c = new Float64Array(E);
  const s = new Float64Array(n);
  for (let t0 = 0; t0 < T; t0++) {
    for (let e = 0; e < E; e++) {
      const i = e * T + t0;
      for (let k = 0; k < n; k++) x[e * n + k] = batch.states[i * n + k];
    }
    const acc = new Float64Array(E);
    let disc = 1;
    const last = Math.min(T - 1, t0 + cap);
    for (let t = t0; t <= last; t++) {
      for (let e = 0; e < E; e++) {
        if (t === t0 && !useExpertAction) {
          for (let j = 0; j < m; j++) u[e * m + j] = batch.controls[(e * T + t0) * m + j];
        } else {
          for (let k = 0; k < n; k++) s[k] = x[e * n + k];
          expert.reset?.();
          const a = controlOf(expert.act(s));
          for (let j = 0; j < m; j++) u[e * m + j] = a[j];
          env.clip(u, e * m);
        }
      }
      c.fill(0);
      env.cost.running(x, 0, u, 0, E, t, c, 0);
      for (let e = 0; e < E; e++) acc[e] += disc * c[e];
      env.dynamics.step(x, 0, u, 0, E, t);
      disc *= gamma;
    }
    if (last === T - 1) {
      c.fill(0);
      env.cost.terminal(x, 0, E, c, 0);
      for (let e = 0; e < E; e++) acc[e] += disc * c[e];
    }
    for (let e = 0; e < E; e++) out[e * T + t0] = acc[e];
  }
}

/**
 * AggreVaTeD (W. Sun, A. Venkatraman, G. J. Gordon, B. Boots, J. A. Bagnell, "Deeply AggreVaTeD:
 * Differentiable Imitation Learning for Sequential Prediction", ICML, 2017; MATH.md §6.3).
 * Round n: roll in with the stochastic learner π_θn (states s_t ∼ d_t^{π_θn}, actions
 * a_t ∼ π_θn(·|s_t)), score each action by the expert's advantage A*(s_t, a_t) = Q*(s_t, a_t) −
 * Q*(s_t, π*(s_t)), and take one policy step on
 *   ℓ_n(θ) = (1/(E·T)) Σ_{e,t} A*(s_t, a_t) · π_θ(a_t|s_t)/π_θn(a_t|s_t),
 *   ∇ℓ_n(θ_n) = (1/(E·T)) Σ ∇ ln π_θn(a_t|s_t) A*(s_t, a_t),
 * in the chosen geometry — by default the natural gradient with a KL budget δ, the paper's second
 * procedure. Q* comes from `expert.costToGo` or from expert rollouts on the environment's model
 * (see {@link AggrevatedOptions.costToGo}); the rollouts are deterministic (no disturbance), so
 * for a deterministic expert they give its exact finite-horizon cost-to-go.
 *
 * @example
 * ```ts
 * const res = aggrevated({ environment: env, expert, policy: pi, rounds: 30, episodesPerRound: 10 });
 * ```
 */
export function aggrevated(options: AggrevatedOptions): AggrevatedResult {
  const fn = "aggrevated";
  requireOptionsObject(fn, options);
  const env = options.environment;
  requireInterface(fn, "environment", env, "collect", "a RolloutEnvironment");
  const expert = options.expert;
  requireInterface(fn, "expert", expert, "act", "an object with act(state)");
  const policy = options.policy;
  env.checkPolicy(fn, policy);
  if (env.terminate !== null) {
    throw new RecedeError(
      "type",
      fn,
      "environment",
      "an environment without early termination (cost-to-go rollouts run to the horizon)",
      "an environment with a terminate test",
    );
  }
  if (env.discreteControls !== null) {
    throw new RecedeError(
      "type",
      fn,
      "environment",
      "an environment with continuous controls",
      "a discrete-control environment",
    );
  }
  const rounds = requireInteger(fn, "rounds", options.rounds, 1);
  const E = requireInteger(fn, "episodesPerRound", options.episodesPerRound, 1);
  const mode = options.costToGo ?? (typeof expert.costToGo === "function" ? "expert" : "rollout");
  if (mode !== "expert" && mode !== "rollout")
    throw new RecedeError("range", fn, "costToGo", '"expert" or "rollout"', mode);
  if (mode === "expert" && typeof expert.costToGo !== "function") {
    throw new RecedeError(
      "type",
      fn,
      "expert.costToGo",
      'a function when costToGo is "expert"',
      expert.costToGo,
    );
  }
  const T = env.horizon;
  const cap = requireInteger(fn, "rolloutSteps", options.rolloutSteps ?? T, 0);
  const gamma = requireUnitHalfOpen(fn, "discount", options.discount ?? 1);
  const initial = requireVector(
    fn,
    "initial",
    options.initial ?? policy.initialParameters(),
    policy.parameterCount,
  );
  const opt = policyOptimizer({
    policy,
    initial,
    geometry: options.geometry ?? "fisher",
    fisher: options.fisher,
    stepSize: options.stepSize,
    trustRegion: options.trustRegion ?? { radius: 0.01 },
  });
  const stream = createStream(options.seed ?? 0);
  const batch = env.createBatch(E);
  const N = E * T;
  const q = new Float64Array(N);
  const v = new Float64Array(N);
  const w = new Float64Array(N);
  const n = env.stateSize;
  const m = env.controlSize;
  const s = new Float64Array(n);
  const a = new Float64Array(m);
  const ua = new Float64Array(m);
  const records: AggrevatedRound[] = [];
  let evals = 0;
  for (let r = 1; r <= rounds; r++) {
    env.collect(policy, opt.decision(), stream, batch);
    if (mode === "expert") {
      const ctg = expert.costToGo as NonNullable<Expert["costToGo"]>;
      for (let i = 0; i < N; i++) {
        const t = i % T;
        for (let k = 0; k < n; k++) s[k] = batch.states[i * n + k];
        for (let j = 0; j < m; j++) a[j] = batch.controls[i * m + j];
        q[i] = ctg.call(expert, s, a, T - t);
        const ue = controlOf(expert.act(s));
        for (let j = 0; j < m; j++) ua[j] = ue[j];
        env.clip(ua, 0);
        v[i] = ctg.call(expert, s, ua, T - t);
      }
      evals += 2 * N;
    } else {
      rolloutCostToGo(env, expert, batch, false, cap, gamma, q);
      rolloutCostToGo(env, expert, batch, true, cap, gamma, v);
      evals += 2 * N;
    }
    let loss = 0;
    for (let i = 0; i < N; i++) {
      w[i] = q[i] - v[i];
      loss += w[i];
    }
    const samples: ScoredSamples = {
      count: N,
      states: batch.states,
      actions: batch.actions,
      logProbs: batch.logProbs,
      weights: w,
      normalizer: N,
    };
    opt.update({ samples });
    records.push({
      round: r,
      rollInCost: batch.meanCost(),
      loss: loss / N,
      kl: opt.lastReport?.kl ?? 0,
    });
  }
  return {
    parameters: opt.decision().slice(),
    optimizer: opt,
    rounds: records,
    costToGoEvaluations: evals,
  };
}
