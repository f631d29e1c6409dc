/**
 * Policy-gradient updates as mirror descent: one online learner whose decision is θ, whose round
 * loss is the likelihood-ratio surrogate of a batch, and whose step is the mirror step of a chosen
 * geometry — Euclidean (vanilla PG), Fisher (natural PG) or any {@link Geometry} — either with a
 * step-size schedule or scaled to a KL trust region with backtracking (TRPO).
 *
 * @module
 */
import {
  euclidean,
  type Geometry,
  type MirrorDescentLearner,
  type MirrorDescentSnapshot,
  mirrorDescent,
  ObserverList,
  type OnlineLearner,
  RecedeError,
  type RoundRecord,
  requireInteger,
  requirePositive,
  requireVector,
  type StepSizeInput,
} from "@recede/core";
import { type ScoredSamples, surrogateLoss } from "../estimators/scoredSamples.js";
import { requireNonNegative, requireOpenUnit, requireOptionsObject } from "../internal/validate.js";
import type { StochasticPolicy } from "../policies/policy.js";
import {
  type FisherGeometryOptions,
  fisherGeometry,
  type PreparableGeometry,
} from "./fisherGeometry.js";

/** Options of the KL trust region (see {@link policyOptimizer}). */
export interface TrustRegionOptions {
  /**
   * KL radius δ: every accepted step has mean KL(π_θ ‖ π_θ⁺) ≤ δ over the batch's states.
   * @defaultValue 0.01
   */
  readonly radius?: number;
  /**
   * Backtracking ratio α ∈ (0, 1): candidate j is θ + α^j β Δ.
   * @defaultValue 0.5
   */
  readonly backtrackRatio?: number;
  /**
   * Largest number of backtracking steps after the first candidate.
   * @defaultValue 10
   */
  readonly maxBacktracks?: number;
  /**
   * Armijo-style acceptance: require L(θ) − L(θ′) ≥ c · (predicted decrease) with c = this value;
   * 0 accepts any decrease.
   * @defaultValue 0
   */
  readonly acceptRatio?: number;
}

/** Options of {@link policyOptimizer}. */
export interface PolicyOptimizerOptions {
  /** The policy family. */
  readonly policy: StochasticPolicy;
  /**
   * Initial θ (copied).
   * @defaultValue `policy.initialParameters()`
   */
  readonly initial?: Float64Array;
  /**
   * The geometry of the step: `"euclidean"` (vanilla policy gradient), `"fisher"` (natural policy
   * gradient, see {@link fisherGeometry}) or any {@link Geometry} of dimension
   * `policy.parameterCount` (a {@link PreparableGeometry} is prepared with θ and the batch's states
   * before every step).
   * @defaultValue "euclidean"
   */
  readonly geometry?: "euclidean" | "fisher" | Geometry;
  /** Options of the Fisher geometry when `geometry` is `"fisher"`. @defaultValue {} */
  readonly fisher?: FisherGeometryOptions;
  /**
   * Step size η_t (a number, a core StepSize or t ↦ η_t); ignored with a trust region.
   * @defaultValue 0.01
   */
  readonly stepSize?: StepSizeInput;
  /**
   * Scale each step to a KL trust region instead of using `stepSize` (`true` for the defaults).
   * @defaultValue false
   */
  readonly trustRegion?: boolean | TrustRegionOptions;
}

/** The round's feedback: a scored batch (from an estimator, or built by the caller). */
export interface PolicyFeedback {
  /** The samples and their cost weights. */
  readonly samples: ScoredSamples;
}

/** What the last update did. */
export interface PolicyStepReport {
  /** Round index (1 for the first update). */
  readonly round: number;
  /** Surrogate loss L(θ_t) of the batch at the played parameters. */
  readonly surrogate: number;
  /** L(θ_{t+1}) of the same batch at the new parameters. */
  readonly surrogateAfter: number;
  /** ‖∇L(θ_t)‖₂. */
  readonly gradientNorm: number;
  /** The step size η actually used (α^j β under a trust region; 0 when nothing was accepted). */
  readonly stepSize: number;
  /** Measured mean KL(π_θt ‖ π_θt+1) over the batch's states. */
  readonly kl: number;
  /** Backtracking steps taken (0 without a trust region). */
  readonly backtracks: number;
  /** False when the trust-region line search rejected every candidate (θ unchanged). */
  readonly accepted: boolean;
  /** Conjugate-gradient iterations of the Fisher solve (0 for other geometries). */
  readonly cgIterations: number;
}

/** State captured by {@link PolicyOptimizer.snapshot}. */
export interface PolicyOptimizerSnapshot {
  /** Completed rounds. */
  readonly round: number;
  /** θ (a copy). */
  readonly decision: Float64Array;
  /** The inner mirror-descent learner's snapshot (fixed-step mode), or null. */
  readonly inner: MirrorDescentSnapshot | null;
  /** The last report, or null. */
  readonly lastReport: PolicyStepReport | null;
}

interface TrustRegion {
  radius: number;
  ratio: number;
  maxBacktracks: number;
  accept: number;
}

interface MutableRecord {
  round: number;
  decision: Float64Array;
  loss: number;
  gradient: Float64Array | undefined;
  lossObject: undefined;
}

/** The policy-gradient learner; create with {@link policyOptimizer}. */
export class PolicyOptimizer implements OnlineLearner<PolicyFeedback, PolicyOptimizerSnapshot> {
  readonly dimension: number;
  /** The policy family. */
  readonly policy: StochasticPolicy;
  /** The step's geometry. */
  readonly geometry: Geometry;
  /** The trust region, or null for fixed steps. */
  readonly trustRegion: Readonly<TrustRegion> | null;
  private readonly inner: MirrorDescentLearner | null;
  private readonly theta: Float64Array;
  private readonly initial: Float64Array;
  private readonly grad: Float64Array;
  private readonly dir: Float64Array;
  private readonly cand: Float64Array;
  private readonly fv: Float64Array;
  private readonly played: Float64Array;
  private t = 0;
  private report: PolicyStepReport | null = null;
  private readonly observers = new ObserverList();
  private readonly record: MutableRecord;

  /** Use {@link policyOptimizer}; the constructor trusts validated options. */
  constructor(
    policy: StochasticPolicy,
    geometry: Geometry,
    initial: Float64Array,
    stepSize: StepSizeInput,
    trust: TrustRegion | null,
  ) {
    const d = policy.parameterCount;
    this.policy = policy;
    this.dimension = d;
    this.geometry = geometry;
    this.trustRegion = trust;
    this.initial = initial.slice();
    this.theta = initial.slice();
    this.inner = trust === null ? mirrorDescent({ geometry, initial, stepSize }) : null;
    this.grad = new Float64Array(d);
    this.dir = new Float64Array(d);
    this.cand = new Float64Array(d);
    this.fv = new Float64Array(d);
    this.played = new Float64Array(d);
    this.record = {
      round: 0,
      decision: this.played,
      loss: Number.NaN,
      gradient: this.grad,
      lossObject: undefined,
    };
  }

  get round(): number {
    return this.t;
  }

  /** What the last update did (null before the first). */
  get lastReport(): PolicyStepReport | null {
    return this.report;
  }

  decision(): Float64Array {
    return this.inner !== null ? this.inner.decision() : this.theta;
  }

  observe(listener: (record: RoundRecord) => void): () => void {
    if (typeof listener !== "function") {
      throw new RecedeError("type", "PolicyOptimizer.observe", "listener", "a function", listener);
    }
    return this.observers.add(listener);
  }

  private checkSamples(fn: string, feedback: PolicyFeedback): ScoredSamples {
    if (
      typeof feedback !== "object" ||
      feedback === null ||
      typeof feedback.samples !== "object" ||
      feedback.samples === null
    ) {
      throw new RecedeError("type", fn, "feedback", "an object { samples }", feedback);
    }
    const s = feedback.samples;
    const n = this.policy.stateSize;
    const a = this.policy.actionSize;
    requireInteger(fn, "feedback.samples.count", s.count, 1);
    requirePositive(fn, "feedback.samples.normalizer", s.normalizer);
    const need = (arr: unknown, len: number, name: string): void => {
      if (!(arr instanceof Float64Array) || arr.length < len) {
        throw new RecedeError(
          "dimension",
          fn,
          `feedback.samples.${name}`,
          `a Float64Array of length >= ${len}`,
          arr,
        );
      }
    };
    need(s.states, s.count * n, "states");
    need(s.actions, s.count * a, "actions");
    need(s.logProbs, s.count, "logProbs");
    need(s.weights, s.count, "weights");
    return s;
  }

  /**
   * Take one step from the batch: g = ∇L(θ_t) (the estimator's gradient), then the mirror step of
   * the geometry. Throws a {@link RecedeError} (state unchanged) when the gradient or the surrogate
   * is not finite or the step leaves the geometry's domain.
   */
  update(feedback: PolicyFeedback): void {
    const fn = "PolicyOptimizer.update";
    const s = this.checkSamples(fn, feedback);
    const policy = this.policy;
    const theta = this.decision();
    const d = this.dimension;
    const g = this.grad;
    const L0 = surrogateLoss(policy, theta, s, g);
    let gn = 0;
    for (let i = 0; i < d; i++) gn += g[i] * g[i];
    if (!Number.isFinite(L0) || !Number.isFinite(gn)) {
      throw new RecedeError(
        "non-finite",
        fn,
        "feedback.samples",
        "finite weights, states and log-probabilities (a finite surrogate and gradient)",
        `surrogate ${L0}, ‖g‖² ${gn}`,
      );
    }
    const geo = this.geometry as Partial<PreparableGeometry> & Geometry;
    if (typeof geo.prepare === "function") geo.prepare(theta, s.states, 0, s.count);
    this.played.set(theta);
    const cgBefore = this.cgCount();
    let report: PolicyStepReport;
    if (this.inner !== null) {
      this.inner.update({ gradient: g, loss: L0 });
      const next = this.inner.decision();
      report = {
        round: this.t + 1,
        surrogate: L0,
        surrogateAfter: surrogateLoss(policy, next, s, null),
        gradientNorm: Math.sqrt(gn),
        stepSize: this.inner.lastStepSize,
        kl: policy.meanKl(this.played, next, s.states, 0, s.count),
        backtracks: 0,
        accepted: true,
        cgIterations: this.cgCount() - cgBefore,
      };
    } else {
      report = this.trustRegionStep(fn, s, L0, Math.sqrt(gn), cgBefore);
    }
    this.t++;
    this.report = report;
    if (this.observers.active) {
      this.record.round = this.t;
      this.record.loss = L0;
      this.observers.emit(this.record);
    }
  }

  private cgCount(): number {
    const geo = this.geometry as { fisherProducts?: number };
    return typeof geo.fisherProducts === "number" ? geo.fisherProducts : 0;
  }

  /**
   * KL trust region (Schulman et al. 2015; MATH.md §5.4): Δ = step(θ, g, 1) − θ (= −F⁻¹g in the
   * Fisher geometry), β = √(2δ / ΔᵀFΔ) with F the policy's Fisher at θ on the batch's states, then
   * candidates θ + α^j β Δ until L decreases (by ≥ c·predicted) and the measured mean KL ≤ δ.
   * Assumes the geometry's step is affine in η (exact for unconstrained Euclidean, Mahalanobis
   * and Fisher geometries).
   */
  private trustRegionStep(
    fn: string,
    s: ScoredSamples,
    L0: number,
    gnorm: number,
    cgBefore: number,
  ): PolicyStepReport {
    const tr = this.trustRegion as TrustRegion;
    const policy = this.policy;
    const d = this.dimension;
    const theta = this.theta;
    const dir = this.dir;
    this.geometry.step(theta, this.grad, 1, dir);
    for (let i = 0; i < d; i++) dir[i] -= theta[i];
    let quad = 0;
    let slope = 0;
    let finite = true;
    for (let i = 0; i < d; i++) if (!Number.isFinite(dir[i])) finite = false;
    if (!finite) {
      throw new RecedeError(
        "non-finite",
        fn,
        "geometry.step",
        "a finite direction",
        "a non-finite direction",
      );
    }
    policy.fisherVectorProduct(theta, s.states, 0, s.count, dir, this.fv);
    for (let i = 0; i < d; i++) {
      quad += dir[i] * this.fv[i];
      slope += this.grad[i] * dir[i];
    }
    const base = {
      round: this.t + 1,
      surrogate: L0,
      gradientNorm: gnorm,
    };
    if (!(quad > 0) || !(slope < 0)) {
      return {
        ...base,
        surrogateAfter: L0,
        stepSize: 0,
        kl: 0,
        backtracks: 0,
        accepted: false,
        cgIterations: this.cgCount() - cgBefore,
      };
    }
    const beta = Math.sqrt((2 * tr.radius) / quad);
    let eta = beta;
    const cand = this.cand;
    for (let j = 0; j <= tr.maxBacktracks; j++) {
      for (let i = 0; i < d; i++) cand[i] = theta[i] + eta * dir[i];
      const L = surrogateLoss(policy, cand, s, null);
      const kl = policy.meanKl(theta, cand, s.states, 0, s.count);
      if (Number.isFinite(L) && kl <= tr.radius && L0 - L > tr.accept * -slope * eta && L < L0) {
        theta.set(cand);
        return {
          ...base,
          surrogateAfter: L,
          stepSize: eta,
          kl,
          backtracks: j,
          accepted: true,
          cgIterations: this.cgCount() - cgBefore,
        };
      }
      eta *= tr.ratio;
    }
    return {
      ...base,
      surrogateAfter: L0,
      stepSize: 0,
      kl: 0,
      backtracks: tr.maxBacktracks,
      accepted: false,
      cgIterations: this.cgCount() - cgBefore,
    };
  }

  reset(): void {
    this.theta.set(this.initial);
    this.inner?.reset();
    this.t = 0;
    this.report = null;
  }

  snapshot(): PolicyOptimizerSnapshot {
    return {
      round: this.t,
      decision: this.decision().slice(),
      inner: this.inner !== null ? this.inner.snapshot() : null,
      lastReport: this.report,
    };
  }

  restore(snapshot: PolicyOptimizerSnapshot): void {
    const fn = "PolicyOptimizer.restore";
    if (typeof snapshot !== "object" || snapshot === null)
      throw new RecedeError("type", fn, "snapshot", "a PolicyOptimizerSnapshot", snapshot);
    requireVector(fn, "snapshot.decision", snapshot.decision, this.dimension);
    requireInteger(fn, "snapshot.round", snapshot.round, 0);
    if ((this.inner !== null) !== (snapshot.inner !== null)) {
      throw new RecedeError(
        "state",
        fn,
        "snapshot",
        "taken from an optimizer in the same mode",
        "a snapshot of the other mode",
      );
    }
    if (this.inner !== null && snapshot.inner !== null) this.inner.restore(snapshot.inner);
    this.theta.set(snapshot.decision);
    this.t = snapshot.round;
    this.report = snapshot.lastReport;
  }
}

/**
 * Create a policy-gradient learner (see {@link PolicyOptimizer}).
 *
 * Each round, with g = ∇L(θ_t) the likelihood-ratio gradient of the batch (REINFORCE or GAE
 * weights; see {@link ScoredSamples}):
 * - fixed step (core `mirrorDescent`): θ_{t+1} = argmin_θ η_t⟨g, θ⟩ + D_ψ(θ‖θ_t) — with
 *   `geometry: "euclidean"` the vanilla policy gradient θ − η g (Williams 1992), with `"fisher"`
 *   the natural policy gradient θ − η (F + ζI)⁻¹ g (Kakade 2001);
 * - `trustRegion`: the same direction scaled to the KL radius δ, β = √(2δ/ΔᵀFΔ), with a
 *   backtracking line search on the surrogate and the measured KL (J. Schulman, S. Levine,
 *   P. Moritz, M. Jordan, P. Abbeel, "Trust Region Policy Optimization", ICML, 2015).
 * Symbols ↔ options: ψ ↔ `geometry`, η_t ↔ `stepSize`, δ ↔ `trustRegion.radius`,
 * α ↔ `trustRegion.backtrackRatio`.
 *
 * @example
 * ```ts
 * const opt = policyOptimizer({ policy: pi, geometry: "fisher", trustRegion: { radius: 0.01 } });
 * const est = gae({ discount: 0.99, lambda: 0.95 });
 * for (let k = 0; k < 50; k++) {
 *   env.collect(pi, opt.decision(), stream, batch);
 *   opt.update({ samples: est.score(batch) });
 * }
 * ```
 */
export function policyOptimizer(options: PolicyOptimizerOptions): PolicyOptimizer {
  const fn = "policyOptimizer";
  requireOptionsObject(fn, options);
  const policy = options.policy;
  if (
    typeof policy !== "object" ||
    policy === null ||
    typeof policy.addGradLogProb !== "function"
  ) {
    throw new RecedeError("type", fn, "policy", "a StochasticPolicy", policy);
  }
  const d = policy.parameterCount;
  const initial = requireVector(fn, "initial", options.initial ?? policy.initialParameters(), d);
  const g = options.geometry ?? "euclidean";
  let geometry: Geometry;
  if (g === "euclidean") geometry = euclidean({ dimension: d });
  else if (g === "fisher") geometry = fisherGeometry(policy, options.fisher ?? {});
  else if (typeof g === "object" && g !== null && typeof g.step === "function") {
    if (g.dimension !== d)
      throw new RecedeError(
        "dimension",
        fn,
        "geometry.dimension",
        `${d} (the policy's parameter count)`,
        g.dimension,
      );
    geometry = g;
  } else throw new RecedeError("type", fn, "geometry", '"euclidean", "fisher" or a Geometry', g);
  let trust: TrustRegion | null = null;
  const tr = options.trustRegion ?? false;
  if (tr !== false) {
    const o: TrustRegionOptions = tr === true ? {} : tr;
    if (typeof o !== "object" || o === null)
      throw new RecedeError("type", fn, "trustRegion", "a boolean or an object", tr);
    trust = {
      radius: requirePositive(fn, "trustRegion.radius", o.radius ?? 0.01),
      ratio: requireOpenUnit(fn, "trustRegion.backtrackRatio", o.backtrackRatio ?? 0.5),
      maxBacktracks: requireInteger(fn, "trustRegion.maxBacktracks", o.maxBacktracks ?? 10, 0),
      accept: requireNonNegative(fn, "trustRegion.acceptRatio", o.acceptRatio ?? 0),
    };
  }
  return new PolicyOptimizer(policy, geometry, initial, options.stepSize ?? 0.01, trust);
}
