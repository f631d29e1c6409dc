/**
 * The regret tracker: records, round by round, the decision x_t played, the loss ℓ_t(x_t) suffered
 * and (when available) the gradient g_t and the loss object ℓ_t, and computes regret against
 * comparators in hindsight (MATH.md §1.2, §1.7).
 *
 * Streaming design. Every quantity a comparator needs is an additive per-round statistic
 * s_t = (ℓ_t(x_t), ‖g_t‖₂², ‖g_t‖∞², ⟨g_t, x_t⟩, ℓ_t(u_t), ⟨g_t, u_t⟩, g_t, (ℓ_t(e_i))_i, A_t, b_t, c_t),
 * so the totals S_T = Σ_t s_t (compensated by TwoSum, MATH.md §8.4) determine every static regret,
 * and the same evaluation applied to a sliding-window sum gives adaptive regret. A round is first
 * staged (validated and evaluated into scratch buffers) and only then committed, so a bad round
 * throws a {@link RecedeError} and leaves the tracker exactly as it was.
 *
 * Sources: regret notions — M. Zinkevich, "Online Convex Programming and Generalized Infinitesimal
 * Gradient Ascent", ICML 2003; E. Hazan, "Introduction to Online Convex Optimization", 2016, §1;
 * Φ-path length — E. C. Hall, R. M. Willett, "Online Convex Optimization in Dynamic Environments",
 * IEEE J. Sel. Topics Signal Process. 9(4), 2015; adaptive regret over intervals — E. Hazan,
 * C. Seshadhri, "Efficient Learning Algorithms for Changing Environments", ICML 2009 (from memory).
 *
 * @module
 */

import type { LossObject, Observable, RoundRecord } from "@recede/core";
import { kernels, RecedeError, requireInteger, requireVector } from "@recede/core";
import type { Domain } from "./domain.js";
import { linearMinimum } from "./domain.js";
import { isQuadraticLoss } from "./losses.js";
import type { QuadraticMinimumStatus } from "./quadraticMinimum.js";
import { QuadraticSolver } from "./quadraticMinimum.js";
import { RefStore, RowStore } from "./seriesStore.js";
import { compensatedAdd, compensatedSum } from "./summation.js";

/**
 * A comparator sequence u_t (or an expert policy): write u_t into `out` and return it (or return
 * another Float64Array of the decision's length). `lossObject` is ℓ_t when the round carried one,
 * so per-round minimizers u_t = argmin ℓ_t can be supplied. Called once per recorded round.
 */
export type ComparatorSequence = (
  round: number,
  lossObject: LossObject | undefined,
  out: Float64Array,
) => Float64Array;

/**
 * A dynamical model Φ_t: write Φ_t(u) into `out` and return it (do not write `u`). Used for the
 * Φ-path length V_Φ = Σ_{t=1}^{T−1} ‖u_{t+1} − Φ_t(u_t)‖ (Hall & Willett 2015).
 */
export type DynamicModel = (round: number, u: Float64Array, out: Float64Array) => Float64Array;

/** An expert: a fixed decision, or a policy giving its decision per round. */
export type Expert = Float64Array | ComparatorSequence;

/**
 * How much per-round history the tracker keeps.
 * - `"full"`: every round's series row, decision copy and loss object (hindsight evaluation of any
 *   comparator with {@link RegretTracker.regretAgainst}); memory O(T·d).
 * - `"window"`: the series rows and decisions of the last `window` rounds only (ring buffers, no
 *   allocation per round).
 * - `"thinned"`: series rows of rounds s, 2s, 3s, … only, at most `maxRows` of them: when full,
 *   every other row is dropped and the stride s doubles, so a run of any length is covered end to
 *   end at even spacing in bounded memory (no decisions or loss objects; no allocation per round).
 * - `"summary"`: no per-round rows; the summaries only (no allocation per round). Memory O(k + w·k)
 *   for k statistics and adaptive window w, independent of T.
 */
export type HistoryMode = "full" | "window" | "thinned" | "summary";

/** The norm used for path lengths. */
export type PathNorm = "l1" | "l2" | "linf";

/** Options of {@link createRegretTracker}. */
export interface RegretTrackerOptions {
  /** d, the length of every decision (and gradient). Required. */
  readonly dimension: number;
  /**
   * The decision set X for the linear comparator (and the box of the quadratic comparator).
   * @defaultValue none (no linear comparator)
   */
  readonly domain?: Domain;
  /**
   * Track the linear(ized) static regret Σ⟨g_t, x_t⟩ − min_{u∈X}⟨Σ g_t, u⟩ over `domain` (needs a
   * gradient, or a loss object to take one from, every round).
   * @defaultValue true when `domain` is given
   */
  readonly linear?: boolean;
  /**
   * Track the exact static regret for quadratic losses (every round's `lossObject` made by
   * `quadraticLoss`); comparator unconstrained, or on `domain` when it is a box. O(d²) per round.
   * @defaultValue false
   */
  readonly quadratic?: boolean;
  /**
   * A finite set of experts/policies; each is evaluated on every round's loss object.
   * @defaultValue none (no expert comparator)
   */
  readonly experts?: readonly Expert[];
  /**
   * The comparator sequence u_{1:T} for dynamic regret (needs a loss object every round).
   * @defaultValue none (no dynamic regret)
   */
  readonly comparator?: ComparatorSequence;
  /**
   * The dynamical model Φ_t for the Φ-path length (needs `comparator`).
   * @defaultValue none (no Φ-path length)
   */
  readonly dynamics?: DynamicModel;
  /** Norm of the path lengths. @defaultValue "l2" */
  readonly pathNorm?: PathNorm;
  /** History kept per round. @defaultValue "full" */
  readonly history?: HistoryMode;
  /**
   * Keep each round's loss object (by reference) in `"full"` mode, for
   * {@link RegretTracker.regretAgainst}. Turn it off when the source reuses one mutable loss object
   * across rounds (then a stored reference would not describe its round).
   * @defaultValue true
   */
  readonly retainLossObjects?: boolean;
  /** Rows kept in `"window"` mode. @defaultValue 1024 */
  readonly window?: number;
  /** Most rows kept in `"thinned"` mode (an even integer ≥ 2). @defaultValue 2048 */
  readonly maxRows?: number;
  /**
   * w for adaptive regret: AR_T(w) = max over windows [s, s+w−1] ⊆ [1, T] of the window's static
   * regret against the window's best fixed comparator (each enabled static kind); when T < w, the
   * single window [1, T]. Off when omitted.
   * @defaultValue none (no adaptive regret)
   */
  readonly adaptiveWindow?: number;
  /**
   * What a round without a loss value means. `"error"`: it is a typed error unless a loss object
   * supplies ℓ_t(x_t). `"linear"`: the losses are declared linear, ℓ_t(x) = ⟨g_t, x⟩, so an absent
   * loss is taken as ⟨g_t, x_t⟩ — "absent" being `undefined`, or NaN (core's learners emit NaN when
   * their feedback carried only a gradient). ±∞ is always an error.
   * @defaultValue "error"
   */
  readonly lossWhenAbsent?: "error" | "linear";
  /**
   * What a round that fails validation does: `"throw"` a {@link RecedeError} (the tracker is
   * unchanged), or `"skip"` it — the tracker is unchanged, {@link RegretTracker.skippedRounds}
   * counts it and {@link RegretTracker.lastError} keeps the error. Use `"skip"` when the tracker
   * observes a controller that must not be interrupted (an error thrown from an observer
   * propagates out of the controller's step).
   * @defaultValue "throw"
   */
  readonly invalidRounds?: "throw" | "skip";
  /** Tolerance of the box-constrained quadratic solve (see `minimizeQuadratic`). @defaultValue 1e-12 */
  readonly quadraticTolerance?: number;
  /** Iteration cap of the box-constrained quadratic solve. @defaultValue 200 */
  readonly quadraticMaxIterations?: number;
}

/** One round fed by hand: the same fields as core's {@link RoundRecord} (round optional). */
export interface RoundInput {
  /** x_t, the decision played. */
  readonly decision: Float64Array;
  /** ℓ_t(x_t); computed from `lossObject` when omitted. */
  readonly loss?: number;
  /** g_t ∈ ∂ℓ_t(x_t); taken from `lossObject` when omitted and needed. */
  readonly gradient?: Float64Array;
  /** ℓ_t itself. */
  readonly lossObject?: LossObject;
}

/** Linear(ized) static regret over the domain. */
export interface LinearRegretSummary {
  /** Σ⟨g_t, x_t⟩ − min_{u∈X}⟨Γ_T, u⟩ — exact static regret for affine losses, an upper bound for convex ones. */
  readonly regret: number;
  /** Σ_t ⟨g_t, x_t⟩. */
  readonly playedValue: number;
  /** min_{u∈X} ⟨Γ_T, u⟩ with Γ_T = Σ_t g_t. */
  readonly bestValue: number;
  /** The minimizing u (closed form, MATH.md §1.7). */
  readonly argmin: Float64Array;
  /** Γ_T = Σ_t g_t. */
  readonly gradientSum: Float64Array;
}

/** Exact static regret for quadratic losses. */
export interface QuadraticRegretSummary {
  /** Σ ℓ_t(x_t) − min_u Σ ℓ_t(u). */
  readonly regret: number;
  /** min_u Σ ℓ_t(u). */
  readonly bestValue: number;
  readonly argmin: Float64Array;
  /**
   * `"not-spd"` when Σ A_t is not positive definite (regret is then NaN) — e.g. in the first rounds
   * of rank-deficient losses; the box-constrained solve also requires a positive definite sum.
   */
  readonly status: QuadraticMinimumStatus;
  readonly iterations: number;
  readonly residual: number;
}

/** Static regret against the best of a finite set of experts. */
export interface ExpertRegretSummary {
  /** Σ ℓ_t(x_t) − min_i Σ ℓ_t(e_i). */
  readonly regret: number;
  /** argmin_i (first on ties). */
  readonly bestIndex: number;
  /** Σ_t ℓ_t(e_{best}). */
  readonly bestLoss: number;
  /** Σ_t ℓ_t(e_i) for every expert. */
  readonly losses: Float64Array;
}

/** Dynamic regret against the comparator sequence, with its path lengths. */
export interface DynamicRegretSummary {
  /** Σ ℓ_t(x_t) − Σ ℓ_t(u_t). */
  readonly regret: number;
  /** Σ ℓ_t(u_t). */
  readonly comparatorLoss: number;
  /** Σ ⟨g_t, x_t − u_t⟩ (NaN unless every round had a gradient). */
  readonly linearizedRegret: number;
  /** P_T = Σ_{t=2}^T ‖u_t − u_{t−1}‖. */
  readonly pathLength: number;
  /** V_Φ = Σ_{t=1}^{T−1} ‖u_{t+1} − Φ_t(u_t)‖ (NaN without `dynamics`). */
  readonly phiPathLength: number;
}

/** Adaptive regret of one static comparator kind. */
export interface AdaptiveRegretEntry {
  /** max over windows of length w of the window regret (see {@link RegretTrackerOptions.adaptiveWindow}). */
  readonly regret: number;
  /** First round s of the maximizing window [s, s + w − 1] (1 when T < w). */
  readonly start: number;
}

/** Adaptive regret over sliding windows of length w. */
export interface AdaptiveRegretSummary {
  readonly window: number;
  readonly linear: AdaptiveRegretEntry | undefined;
  readonly quadratic: AdaptiveRegretEntry | undefined;
  readonly experts: AdaptiveRegretEntry | undefined;
}

/** Gradient statistics, for data-dependent bounds. */
export interface GradientStatistics {
  /** Rounds that carried (or yielded) a gradient. */
  readonly rounds: number;
  /** max_t ‖g_t‖₂ — the G of the OGD bounds. */
  readonly maxL2: number;
  /** max_t ‖g_t‖∞ — the G of the entropic (Hedge/EG) bounds. */
  readonly maxLinf: number;
  /** Σ_t ‖g_t‖₂². */
  readonly sumSquaredL2: number;
  /** Σ_t ‖g_t‖∞². */
  readonly sumSquaredLinf: number;
}

/** Everything the tracker knows after T rounds. Kinds that are off are `undefined`. */
export interface RegretSummary {
  readonly rounds: number;
  /** L_T = Σ_t ℓ_t(x_t). */
  readonly cumulativeLoss: number;
  readonly gradients: GradientStatistics;
  readonly linear: LinearRegretSummary | undefined;
  readonly quadratic: QuadraticRegretSummary | undefined;
  readonly experts: ExpertRegretSummary | undefined;
  readonly dynamic: DynamicRegretSummary | undefined;
  readonly adaptive: AdaptiveRegretSummary | undefined;
}

/**
 * Per-round series as columns (copies). Column names: `round`, `loss`, `cumulativeLoss`, then, when
 * on, `linearRegret`, `quadraticRegret`, `expertRegret` (each the static regret of rounds 1..t
 * against the best fixed comparator of rounds 1..t), `dynamicRegret`, `pathLength`,
 * `phiPathLength`, and `adaptiveLinear` / `adaptiveQuadratic` / `adaptiveExperts` (AR_t(w)).
 */
export interface RegretSeries {
  readonly names: readonly string[];
  /** Number of rows. */
  readonly length: number;
  readonly columns: Readonly<Record<string, Float64Array>>;
}

// Fixed statistics slots.
const S_LOSS = 0;
const S_G2 = 1;
const S_GINF2 = 2;
const S_GX = 3;
const S_DYN = 4;
const S_GU = 5;
const S_FIXED = 6;

const KIND_LINEAR = 0;
const KIND_QUADRATIC = 1;
const KIND_EXPERTS = 2;

/**
 * Create a regret tracker. Feed it with {@link RegretTracker.record} or attach it to any core
 * `Observable` (a learner, an MPC controller) with {@link RegretTracker.attach}.
 *
 * @example
 * ```ts
 * const tracker = createRegretTracker({ dimension: 3, domain: simplexDomain(3) });
 * const detach = tracker.attach(learner); // learner: any Observable emitting RoundRecords
 * // … run the learner …
 * console.log(tracker.summary().linear?.regret);
 * detach();
 * ```
 */
export function createRegretTracker(options: RegretTrackerOptions): RegretTracker {
  return new RegretTracker(options);
}

/** Create a tracker and attach it to `source` in one call (detach with `tracker.detachAll()`). */
export function trackRegret(source: Observable, options: RegretTrackerOptions): RegretTracker {
  const t = new RegretTracker(options);
  t.attach(source);
  return t;
}

/** The regret tracker. Make one with {@link createRegretTracker}. */
export class RegretTracker {
  /** d. */
  readonly dimension: number;
  /** The history mode. */
  readonly history: HistoryMode;
  private readonly domain: Domain | undefined;
  private readonly linearOn: boolean;
  private readonly quadraticOn: boolean;
  private readonly experts: readonly Expert[];
  private readonly comparator: ComparatorSequence | undefined;
  private readonly dynamics: DynamicModel | undefined;
  private readonly pathNorm: PathNorm;
  private readonly adaptiveW: number;
  private readonly qTol: number;
  private readonly qMaxIt: number;
  private readonly boxLo: Float64Array | null;
  private readonly boxHi: Float64Array | null;

  // statistics layout
  private readonly k: number;
  private readonly oG: number;
  private readonly oE: number;
  private readonly oA: number;
  private readonly oB: number;
  private readonly oC: number;

  // running state
  private t = 0;
  private gradRounds = 0;
  private maxL2 = 0;
  private maxLinf = 0;
  private readonly total: Float64Array;
  private readonly totalComp: Float64Array;
  private readonly path = new Float64Array(2); // [P, V_Φ]
  private readonly pathComp = new Float64Array(2);
  private readonly prevU: Float64Array;
  private readonly ring: Float64Array | null; // adaptive: last w stat vectors
  private readonly winSum: Float64Array;
  private readonly winComp: Float64Array;
  private readonly adaptMax = new Float64Array(3);
  private readonly adaptStart = new Float64Array(3);

  // staging scratch
  private readonly st: Float64Array;
  private readonly gScratch: Float64Array;
  private readonly uScratch: Float64Array;
  private readonly phiScratch: Float64Array;
  private readonly eScratch: Float64Array;
  private stPath = 0;
  private stGrad = false;
  private stPhi = 0;

  // evaluation scratch
  private readonly evalBuf: Float64Array;
  private readonly argminScratch: Float64Array;
  private readonly kindRegret = new Float64Array(3);
  private readonly solver: QuadraticSolver | null;

  // history
  private readonly names: readonly string[];
  private readonly rows: RowStore | null;
  private readonly decisions: RowStore | null;
  private readonly lossObjects: RefStore<LossObject> | null;
  private readonly row: Float64Array;
  private readonly detachers: Array<() => void> = [];
  private readonly skipInvalid: boolean;
  private stride = 1;
  private readonly lossLinear: boolean;
  private skipped = 0;
  private lastErr: RecedeError | undefined = undefined;

  constructor(options: RegretTrackerOptions) {
    const fn = "createRegretTracker";
    if (options === null || typeof options !== "object") {
      throw new RecedeError("type", fn, "options", "an options object", options);
    }
    const d = requireInteger(fn, "dimension", options.dimension, 1);
    this.dimension = d;
    const domain = options.domain;
    if (domain !== undefined) {
      if (
        typeof domain !== "object" ||
        (domain.kind !== "simplex" && domain.kind !== "box" && domain.kind !== "ball")
      ) {
        throw new RecedeError("type", fn, "domain", "a simplex, box or ball domain", domain);
      }
      if (domain.dimension !== d) {
        throw new RecedeError(
          "dimension",
          fn,
          "domain.dimension",
          `equal to dimension = ${d}`,
          domain.dimension,
        );
      }
    }
    this.domain = domain;
    const linearOn = options.linear ?? domain !== undefined;
    if (linearOn && domain === undefined) {
      throw new RecedeError("state", fn, "domain", "given when linear is true", undefined);
    }
    this.linearOn = linearOn;
    this.quadraticOn = options.quadratic ?? false;
    if (this.quadraticOn && domain !== undefined && domain.kind !== "box") {
      throw new RecedeError(
        "domain",
        fn,
        "domain",
        "a box or omitted when quadratic is true (the quadratic comparator is unconstrained or box-constrained)",
        domain.kind,
      );
    }
    this.boxLo = this.quadraticOn && domain?.kind === "box" ? domain.lower : null;
    this.boxHi = this.quadraticOn && domain?.kind === "box" ? domain.upper : null;
    const experts = options.experts ?? [];
    if (!Array.isArray(experts)) {
      throw new RecedeError("type", fn, "experts", "an array", experts);
    }
    experts.forEach((e, i) => {
      if (e instanceof Float64Array) {
        if (e.length !== d) {
          throw new RecedeError("dimension", fn, `experts[${i}]`, `of length ${d}`, e);
        }
        for (let j = 0; j < d; j++) {
          if (!Number.isFinite(e[j])) {
            throw new RecedeError("non-finite", fn, `experts[${i}][${j}]`, "finite", e[j]);
          }
        }
      } else if (typeof e !== "function") {
        throw new RecedeError("type", fn, `experts[${i}]`, "a Float64Array or a function", e);
      }
    });
    this.experts = experts.map((e) => (e instanceof Float64Array ? Float64Array.from(e) : e));
    if (options.comparator !== undefined && typeof options.comparator !== "function") {
      throw new RecedeError("type", fn, "comparator", "a function", options.comparator);
    }
    this.comparator = options.comparator;
    if (options.dynamics !== undefined) {
      if (typeof options.dynamics !== "function") {
        throw new RecedeError("type", fn, "dynamics", "a function", options.dynamics);
      }
      if (options.comparator === undefined) {
        throw new RecedeError("state", fn, "comparator", "given when dynamics is", undefined);
      }
    }
    this.dynamics = options.dynamics;
    const pn = options.pathNorm ?? "l2";
    if (pn !== "l1" && pn !== "l2" && pn !== "linf") {
      throw new RecedeError("range", fn, "pathNorm", '"l1", "l2" or "linf"', pn);
    }
    this.pathNorm = pn;
    const mode = options.history ?? "full";
    if (mode !== "full" && mode !== "window" && mode !== "thinned" && mode !== "summary") {
      throw new RecedeError(
        "range",
        fn,
        "history",
        '"full", "window", "thinned" or "summary"',
        mode,
      );
    }
    this.history = mode;
    const windowRows =
      options.window === undefined ? 1024 : requireInteger(fn, "window", options.window, 1);
    const maxRows =
      options.maxRows === undefined ? 2048 : requireInteger(fn, "maxRows", options.maxRows, 2);
    if (maxRows % 2 !== 0)
      throw new RecedeError("range", fn, "maxRows", "an even integer >= 2", maxRows);
    this.adaptiveW =
      options.adaptiveWindow === undefined
        ? 0
        : requireInteger(fn, "adaptiveWindow", options.adaptiveWindow, 1);
    const law = options.lossWhenAbsent ?? "error";
    if (law !== "error" && law !== "linear") {
      throw new RecedeError("range", fn, "lossWhenAbsent", '"error" or "linear"', law);
    }
    this.lossLinear = law === "linear";
    const inv = options.invalidRounds ?? "throw";
    if (inv !== "throw" && inv !== "skip") {
      throw new RecedeError("range", fn, "invalidRounds", '"throw" or "skip"', inv);
    }
    this.skipInvalid = inv === "skip";
    this.qTol = options.quadraticTolerance ?? 1e-12;
    if (!(this.qTol > 0) || !Number.isFinite(this.qTol)) {
      throw new RecedeError("range", fn, "quadraticTolerance", "> 0", options.quadraticTolerance);
    }
    this.qMaxIt =
      options.quadraticMaxIterations === undefined
        ? 200
        : requireInteger(fn, "quadraticMaxIterations", options.quadraticMaxIterations, 1);

    // statistics layout
    let k = S_FIXED;
    this.oG = k;
    if (this.linearOn) k += d;
    this.oE = k;
    k += this.experts.length;
    this.oA = k;
    this.oB = k + d * d;
    this.oC = k + d * d + d;
    if (this.quadraticOn) k += d * d + d + 1;
    this.k = k;
    this.total = new Float64Array(k);
    this.totalComp = new Float64Array(k);
    this.st = new Float64Array(k);
    this.evalBuf = new Float64Array(k);
    this.ring = this.adaptiveW > 0 ? new Float64Array(this.adaptiveW * k) : null;
    this.winSum = new Float64Array(this.adaptiveW > 0 ? k : 0);
    this.winComp = new Float64Array(this.adaptiveW > 0 ? k : 0);
    this.gScratch = new Float64Array(d);
    this.uScratch = new Float64Array(d);
    this.phiScratch = new Float64Array(d);
    this.eScratch = new Float64Array(d);
    this.prevU = new Float64Array(d);
    this.argminScratch = new Float64Array(d);
    this.solver = this.quadraticOn ? new QuadraticSolver(d) : null;

    const names = ["round", "loss", "cumulativeLoss"];
    if (this.linearOn) names.push("linearRegret");
    if (this.quadraticOn) names.push("quadraticRegret");
    if (this.experts.length > 0) names.push("expertRegret");
    if (this.comparator) names.push("dynamicRegret", "pathLength");
    if (this.dynamics) names.push("phiPathLength");
    if (this.adaptiveW > 0) {
      if (this.linearOn) names.push("adaptiveLinear");
      if (this.quadraticOn) names.push("adaptiveQuadratic");
      if (this.experts.length > 0) names.push("adaptiveExperts");
    }
    this.names = names;
    this.row = new Float64Array(names.length);
    const ring = mode === "window";
    const cap = ring ? windowRows : mode === "thinned" ? maxRows : 256;
    this.rows = mode === "summary" ? null : new RowStore(names.length, cap, ring);
    this.decisions = mode === "summary" || mode === "thinned" ? null : new RowStore(d, cap, ring);
    this.lossObjects =
      mode === "full" && (options.retainLossObjects ?? true)
        ? new RefStore<LossObject>(cap, false)
        : null;
    this.resetState();
  }

  /** Number of rounds recorded. */
  get rounds(): number {
    return this.t;
  }

  /**
   * Rows of per-round series currently retained (0 in `"summary"` mode; ≤ `window` in `"window"`;
   * ≤ `maxRows` in `"thinned"`).
   */
  get retainedRows(): number {
    return this.rows === null ? 0 : this.rows.length;
  }

  /** Bytes held by the typed arrays of the tracker (statistics, rings, retained history). */
  get retainedBytes(): number {
    let b = this.total.byteLength * 4 + (this.ring?.byteLength ?? 0) + this.winSum.byteLength * 2;
    b += (this.rows?.bytes ?? 0) + (this.decisions?.bytes ?? 0);
    return b;
  }

  /**
   * Subscribe to `source` (any core `Observable`, e.g. a learner or an MPC controller); every
   * emitted {@link RoundRecord} is passed to {@link RegretTracker.record}. Returns the detach
   * function. A bad round throws out of the source's emit, with the tracker unchanged.
   */
  attach(source: Observable): () => void {
    if (source === null || typeof source !== "object" || typeof source.observe !== "function") {
      throw new RecedeError("type", "RegretTracker.attach", "source", "an Observable", source);
    }
    const listener = (r: RoundRecord): void => this.record(r);
    const off = source.observe(listener);
    let live = true;
    const detach = (): void => {
      if (!live) return;
      live = false;
      off();
      const i = this.detachers.indexOf(detach);
      if (i >= 0) this.detachers.splice(i, 1);
    };
    this.detachers.push(detach);
    return detach;
  }

  /** Detach from every source attached with {@link RegretTracker.attach}. */
  detachAll(): void {
    while (this.detachers.length > 0) this.detachers[this.detachers.length - 1]();
  }

  /**
   * Record one round. Validates everything first (decision length and finiteness, loss, gradient,
   * comparator and expert outputs and their loss values); on any failure throws a
   * {@link RecedeError} and the tracker is unchanged. No allocation in the `"summary"`, `"window"`
   * and `"thinned"` modes.
   */
  record(input: RoundInput | RoundRecord): void {
    if (this.skipInvalid) {
      try {
        this.stage(input);
      } catch (e) {
        this.skipped++;
        this.lastErr =
          e instanceof RecedeError
            ? e
            : new RecedeError("type", "RegretTracker.record", "round", "valid", String(e));
        return;
      }
    } else this.stage(input);
    this.commit(input);
  }

  /** Rounds rejected under `invalidRounds: "skip"` (0 otherwise). */
  get skippedRounds(): number {
    return this.skipped;
  }

  /** The error of the last skipped round, if any. */
  get lastError(): RecedeError | undefined {
    return this.lastErr;
  }

  // ---------------------------------------------------------------- staging (may throw)

  private stage(input: RoundInput | RoundRecord): void {
    const fn = "RegretTracker.record";
    const d = this.dimension;
    if (input === null || typeof input !== "object") {
      throw new RecedeError("type", fn, "round", "a round object", input);
    }
    const x = requireVector(fn, "decision", input.decision, d);
    const lo = input.lossObject;
    if (
      lo !== undefined &&
      (lo === null ||
        typeof lo !== "object" ||
        typeof lo.value !== "function" ||
        typeof lo.gradient !== "function")
    ) {
      throw new RecedeError("type", fn, "lossObject", "a LossObject (value, gradient)", lo);
    }
    let loss = input.loss;
    let lossFromGradient = false;
    if (loss === undefined || (this.lossLinear && lo === undefined && Number.isNaN(loss))) {
      if (lo !== undefined) {
        loss = lo.value(x);
        if (typeof loss !== "number" || !Number.isFinite(loss)) {
          throw new RecedeError("non-finite", fn, "lossObject.value(decision)", "finite", loss);
        }
      } else if (this.lossLinear) {
        lossFromGradient = true; // ⟨g_t, x_t⟩, filled in once the gradient is validated
        loss = 0;
      } else {
        throw new RecedeError(
          "state",
          fn,
          "loss",
          'given (or a lossObject, or lossWhenAbsent: "linear" with a gradient)',
          loss,
        );
      }
    } else if (typeof loss !== "number" || !Number.isFinite(loss)) {
      throw new RecedeError(
        "non-finite",
        fn,
        "loss",
        this.lossLinear ? "a finite number (or absent)" : "a finite number",
        loss,
      );
    }
    const st = this.st;
    st.fill(0);
    st[S_LOSS] = loss;
    this.stGrad = false;

    // gradient
    let g: Float64Array | undefined = input.gradient;
    if (g !== undefined && g !== null) {
      if (!(g instanceof Float64Array)) {
        throw new RecedeError("type", fn, "gradient", `a Float64Array of length ${d}`, g);
      }
      if (g.length !== d) throw new RecedeError("dimension", fn, "gradient", `of length ${d}`, g);
    } else if (this.linearOn) {
      if (lo === undefined) {
        throw new RecedeError(
          "state",
          fn,
          "gradient",
          "given (or a lossObject) when the linear comparator is on",
          undefined,
        );
      }
      g = lo.gradient(x, this.gScratch);
      if (!(g instanceof Float64Array) || g.length !== d) {
        throw new RecedeError(
          "dimension",
          fn,
          "lossObject.gradient(decision)",
          `a Float64Array of length ${d}`,
          g,
        );
      }
    } else g = undefined;
    if (lossFromGradient && g === undefined) {
      throw new RecedeError(
        "state",
        fn,
        "gradient",
        'given when the loss is absent and lossWhenAbsent is "linear"',
        undefined,
      );
    }
    if (g !== undefined) {
      let s2 = 0;
      let sinf = 0;
      let gx = 0;
      for (let i = 0; i < d; i++) {
        const v = g[i];
        if (!Number.isFinite(v)) {
          throw new RecedeError("non-finite", fn, `gradient[${i}]`, "finite", v);
        }
        s2 += v * v;
        gx += v * x[i];
        const a = Math.abs(v);
        if (a > sinf) sinf = a;
      }
      this.stGrad = true;
      st[S_G2] = s2;
      st[S_GINF2] = sinf * sinf;
      st[S_GX] = gx;
      if (lossFromGradient) st[S_LOSS] = st[S_GX];
      if (this.linearOn) kernels.copy(d, g, 0, st, this.oG);
    }

    // quadratic
    if (this.quadraticOn) {
      if (!isQuadraticLoss(lo)) {
        throw new RecedeError(
          "type",
          fn,
          "lossObject",
          "a quadraticLoss when the quadratic comparator is on",
          lo,
        );
      }
      if (lo.dimension !== d) {
        throw new RecedeError("dimension", fn, "lossObject.dimension", `${d}`, lo.dimension);
      }
      kernels.copy(d * d, lo.hessian, 0, st, this.oA);
      kernels.copy(d, lo.linear, 0, st, this.oB);
      st[this.oC] = lo.constant;
    }

    // experts
    const ne = this.experts.length;
    if (ne > 0) {
      if (lo === undefined) {
        throw new RecedeError("state", fn, "lossObject", "given when experts are set", undefined);
      }
      const round = this.t + 1;
      for (let i = 0; i < ne; i++) {
        const e = this.experts[i];
        const u = e instanceof Float64Array ? e : this.checkPoint(e(round, lo, this.eScratch), i);
        const v = lo.value(u);
        if (typeof v !== "number" || !Number.isFinite(v)) {
          throw new RecedeError("non-finite", fn, `lossObject.value(experts[${i}])`, "finite", v);
        }
        st[this.oE + i] = v;
      }
    }

    // comparator sequence and path lengths
    if (this.comparator !== undefined) {
      if (lo === undefined) {
        throw new RecedeError(
          "state",
          fn,
          "lossObject",
          "given when a comparator sequence is set",
          undefined,
        );
      }
      const round = this.t + 1;
      const u0 = this.checkPoint(this.comparator(round, lo, this.uScratch), -1);
      const u = this.uScratch;
      if (u0 !== u) kernels.copy(d, u0, 0, u, 0);
      const v = lo.value(u);
      if (typeof v !== "number" || !Number.isFinite(v)) {
        throw new RecedeError("non-finite", fn, "lossObject.value(comparator)", "finite", v);
      }
      st[S_DYN] = v;
      if (g !== undefined) st[S_GU] = kernels.dot(d, g, 0, u, 0);
      this.stPath = 0;
      this.stPhi = 0;
      if (round > 1) {
        this.stPath = this.distance(u, this.prevU);
        if (this.dynamics !== undefined) {
          const p = this.dynamics(round - 1, this.prevU, this.phiScratch);
          if (!(p instanceof Float64Array) || p.length !== d) {
            throw new RecedeError(
              "dimension",
              fn,
              "dynamics(u)",
              `a Float64Array of length ${d}`,
              p,
            );
          }
          for (let i = 0; i < d; i++) {
            if (!Number.isFinite(p[i])) {
              throw new RecedeError("non-finite", fn, `dynamics(u)[${i}]`, "finite", p[i]);
            }
          }
          this.stPhi = this.distance(u, p);
        }
      }
    }
  }

  private checkPoint(u: unknown, expert: number): Float64Array {
    const d = this.dimension;
    const what = expert >= 0 ? `experts[${expert}](round)` : "comparator(round)";
    if (!(u instanceof Float64Array) || u.length !== d) {
      throw new RecedeError(
        "dimension",
        "RegretTracker.record",
        what,
        `a Float64Array of length ${d}`,
        u,
      );
    }
    for (let i = 0; i < d; i++) {
      if (!Number.isFinite(u[i])) {
        throw new RecedeError(
          "non-finite",
          "RegretTracker.record",
          `${what}[${i}]`,
          "finite",
          u[i],
        );
      }
    }
    return u;
  }

  private distance(a: Float64Array, b: Float64Array): number {
    const d = this.dimension;
    let s = 0;
    switch (this.pathNorm) {
      case "l1":
        for (let i = 0; i < d; i++) s += Math.abs(a[i] - b[i]);
        return s;
      case "linf":
        for (let i = 0; i < d; i++) s = Math.max(s, Math.abs(a[i] - b[i]));
        return s;
      default: {
        let m = 0;
        for (let i = 0; i < d; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
        if (m === 0) return 0;
        for (let i = 0; i < d; i++) {
          const r = (a[i] - b[i]) / m;
          s += r * r;
        }
        return m * Math.sqrt(s);
      }
    }
  }

  // ---------------------------------------------------------------- commit (cannot throw)

  private commit(input: RoundInput | RoundRecord): void {
    const k = this.k;
    const d = this.dimension;
    const st = this.st;
    for (let i = 0; i < k; i++) compensatedAdd(this.total, this.totalComp, i, st[i]);
    this.t++;
    if (this.stGrad) {
      this.gradRounds++;
      const l2 = Math.sqrt(st[S_G2]);
      const linf = Math.sqrt(st[S_GINF2]);
      if (l2 > this.maxL2) this.maxL2 = l2;
      if (linf > this.maxLinf) this.maxLinf = linf;
    }
    if (this.comparator !== undefined) {
      if (this.t > 1) {
        compensatedAdd(this.path, this.pathComp, 0, this.stPath);
        if (this.dynamics !== undefined) compensatedAdd(this.path, this.pathComp, 1, this.stPhi);
      }
      kernels.copy(d, this.uScratch, 0, this.prevU, 0);
    }
    if (this.ring !== null) this.advanceWindow();
    if (this.rows !== null) {
      this.decisions?.push(input.decision, 0);
      this.lossObjects?.push(input.lossObject);
      if (this.history !== "thinned") this.writeRow(st[S_LOSS]);
      else if (this.t % this.stride === 0) {
        this.writeRow(st[S_LOSS]);
        if (this.rows.length === this.rows.capacity) {
          this.rows.halve();
          this.stride *= 2;
        }
      }
    }
  }

  private advanceWindow(): void {
    const w = this.adaptiveW;
    const k = this.k;
    const ring = this.ring as Float64Array;
    const slot = ((this.t - 1) % w) * k;
    const st = this.st;
    const full = this.t > w;
    for (let i = 0; i < k; i++) {
      if (full) compensatedAdd(this.winSum, this.winComp, i, -ring[slot + i]);
      ring[slot + i] = st[i];
      compensatedAdd(this.winSum, this.winComp, i, st[i]);
    }
    if (this.t % w === 0) {
      // Re-sum the window exactly every w rounds so add/subtract drift cannot accumulate.
      const n = Math.min(this.t, w);
      for (let i = 0; i < k; i++) {
        this.winSum[i] = compensatedSum(ring, i, n, k);
        this.winComp[i] = 0;
      }
    }
    if (this.t >= w) {
      this.evaluate(this.winSum, this.winComp, false);
      const start = this.t - w + 1;
      for (let j = 0; j < 3; j++) {
        const r = this.kindRegret[j];
        if (this.t === w || r > this.adaptMax[j]) {
          this.adaptMax[j] = r;
          this.adaptStart[j] = start;
        }
      }
    }
  }

  private writeRow(loss: number): void {
    const row = this.row;
    let c = 0;
    row[c++] = this.t;
    row[c++] = loss;
    row[c++] = this.total[S_LOSS] + this.totalComp[S_LOSS];
    if (this.linearOn || this.quadraticOn || this.experts.length > 0) {
      this.evaluate(this.total, this.totalComp, false);
    }
    if (this.linearOn) row[c++] = this.kindRegret[KIND_LINEAR];
    if (this.quadraticOn) row[c++] = this.kindRegret[KIND_QUADRATIC];
    if (this.experts.length > 0) row[c++] = this.kindRegret[KIND_EXPERTS];
    if (this.comparator) {
      row[c++] =
        this.total[S_LOSS] + this.totalComp[S_LOSS] - (this.total[S_DYN] + this.totalComp[S_DYN]);
      row[c++] = this.path[0] + this.pathComp[0];
    }
    if (this.dynamics) row[c++] = this.path[1] + this.pathComp[1];
    if (this.adaptiveW > 0) {
      const partial = this.t < this.adaptiveW;
      // Before w rounds the adaptive regret is the regret of the single window [1, t].
      if (this.linearOn) row[c++] = partial ? this.kindRegret[KIND_LINEAR] : this.adaptMax[0];
      if (this.quadraticOn) row[c++] = partial ? this.kindRegret[KIND_QUADRATIC] : this.adaptMax[1];
      if (this.experts.length > 0) {
        row[c++] = partial ? this.kindRegret[KIND_EXPERTS] : this.adaptMax[2];
      }
    }
    this.rows?.push(row, 0);
  }

  /**
   * Static regret of every enabled kind from a compensated statistics sum, into kindRegret.
   * With `withArgmin`, the minimizers land in argminScratch (linear) — callers copy them.
   */
  private evaluate(sum: Float64Array, comp: Float64Array, _withArgmin: boolean): void {
    const k = this.k;
    const e = this.evalBuf;
    for (let i = 0; i < k; i++) e[i] = sum[i] + comp[i];
    const L = e[S_LOSS];
    const kr = this.kindRegret;
    if (this.linearOn) {
      kr[KIND_LINEAR] = e[S_GX] - linearMinimum(this.domain as Domain, e, this.oG);
    }
    if (this.quadraticOn) {
      const rep = (this.solver as QuadraticSolver).solve(
        e,
        this.oA,
        e,
        this.oB,
        this.boxLo,
        this.boxHi,
        this.argminScratch,
        this.qTol,
        this.qMaxIt,
      );
      kr[KIND_QUADRATIC] = L - (rep.value + e[this.oC]);
    }
    const ne = this.experts.length;
    if (ne > 0) {
      let best = e[this.oE];
      for (let i = 1; i < ne; i++) if (e[this.oE + i] < best) best = e[this.oE + i];
      kr[KIND_EXPERTS] = L - best;
    }
  }

  // ---------------------------------------------------------------- results

  /** The summaries after the rounds recorded so far (allocates the returned object). */
  summary(): RegretSummary {
    const d = this.dimension;
    const e = this.evalBuf;
    const k = this.k;
    for (let i = 0; i < k; i++) e[i] = this.total[i] + this.totalComp[i];
    const L = e[S_LOSS];
    const gradients: GradientStatistics = {
      rounds: this.gradRounds,
      maxL2: this.maxL2,
      maxLinf: this.maxLinf,
      sumSquaredL2: e[S_G2],
      sumSquaredLinf: e[S_GINF2],
    };
    let linear: LinearRegretSummary | undefined;
    if (this.linearOn) {
      const argmin = new Float64Array(d);
      const best = linearMinimum(this.domain as Domain, e, this.oG, argmin);
      linear = {
        regret: e[S_GX] - best,
        playedValue: e[S_GX],
        bestValue: best,
        argmin,
        gradientSum: e.slice(this.oG, this.oG + d),
      };
    }
    let quadratic: QuadraticRegretSummary | undefined;
    if (this.quadraticOn) {
      const argmin = new Float64Array(d);
      const rep = (this.solver as QuadraticSolver).solve(
        e,
        this.oA,
        e,
        this.oB,
        this.boxLo,
        this.boxHi,
        argmin,
        this.qTol,
        this.qMaxIt,
      );
      const best = this.t === 0 ? 0 : rep.value + e[this.oC];
      quadratic = {
        regret: L - best,
        bestValue: best,
        argmin,
        status: this.t === 0 ? "converged" : rep.status,
        iterations: rep.iterations,
        residual: rep.residual,
      };
    }
    let experts: ExpertRegretSummary | undefined;
    const ne = this.experts.length;
    if (ne > 0) {
      const losses = e.slice(this.oE, this.oE + ne);
      let bi = 0;
      for (let i = 1; i < ne; i++) if (losses[i] < losses[bi]) bi = i;
      experts = { regret: L - losses[bi], bestIndex: bi, bestLoss: losses[bi], losses };
    }
    let dynamic: DynamicRegretSummary | undefined;
    if (this.comparator !== undefined) {
      dynamic = {
        regret: L - e[S_DYN],
        comparatorLoss: e[S_DYN],
        linearizedRegret: this.gradRounds === this.t ? e[S_GX] - e[S_GU] : Number.NaN,
        pathLength: this.path[0] + this.pathComp[0],
        phiPathLength: this.dynamics ? this.path[1] + this.pathComp[1] : Number.NaN,
      };
    }
    let adaptive: AdaptiveRegretSummary | undefined;
    if (this.adaptiveW > 0) {
      const entry = (kind: number, on: boolean): AdaptiveRegretEntry | undefined => {
        if (!on) return undefined;
        if (this.t === 0) return { regret: 0, start: 1 };
        if (this.t < this.adaptiveW) {
          this.evaluate(this.total, this.totalComp, false);
          return { regret: this.kindRegret[kind], start: 1 };
        }
        return { regret: this.adaptMax[kind], start: this.adaptStart[kind] };
      };
      adaptive = {
        window: this.adaptiveW,
        linear: entry(KIND_LINEAR, this.linearOn),
        quadratic: entry(KIND_QUADRATIC, this.quadraticOn),
        experts: entry(KIND_EXPERTS, ne > 0),
      };
    }
    return {
      rounds: this.t,
      cumulativeLoss: L,
      gradients,
      linear,
      quadratic,
      experts,
      dynamic,
      adaptive,
    };
  }

  /** The retained per-round series (copies; see {@link RegretSeries} for the columns). */
  series(): RegretSeries {
    const names = this.names;
    const n = this.rows === null ? 0 : this.rows.length;
    const columns: Record<string, Float64Array> = {};
    for (const name of names) columns[name] = new Float64Array(n);
    if (this.rows !== null) {
      const buf = this.rows.buffer;
      for (let r = 0; r < n; r++) {
        const o = this.rows.offsetOf(r);
        for (let c = 0; c < names.length; c++) columns[names[c]][r] = buf[o + c];
      }
    }
    return { names: [...names], length: n, columns };
  }

  /** Copies of the retained decisions x_t, oldest first (empty in `"summary"` mode). */
  retainedDecisions(): Float64Array[] {
    const out: Float64Array[] = [];
    const s = this.decisions;
    if (s === null) return out;
    for (let r = 0; r < s.length; r++) {
      const o = s.offsetOf(r);
      out.push(s.buffer.slice(o, o + this.dimension));
    }
    return out;
  }

  /**
   * Static regret against a user-supplied fixed comparator u, evaluated in hindsight on the stored
   * loss objects: Σ_t ℓ_t(x_t) − Σ_t ℓ_t(u) (compensated sums). Needs `history: "full"`,
   * `retainLossObjects` and a loss object in every round.
   */
  regretAgainst(u: Float64Array): number {
    return this.hindsight(() => u, "RegretTracker.regretAgainst", "u");
  }

  /**
   * Dynamic regret against a user-supplied comparator sequence, in hindsight:
   * Σ_t ℓ_t(x_t) − Σ_t ℓ_t(u_t). Same requirements as {@link RegretTracker.regretAgainst}.
   */
  regretAgainstSequence(sequence: ComparatorSequence): number {
    if (typeof sequence !== "function") {
      throw new RecedeError(
        "type",
        "RegretTracker.regretAgainstSequence",
        "sequence",
        "a function",
        sequence,
      );
    }
    return this.hindsight(sequence, "RegretTracker.regretAgainstSequence", "sequence");
  }

  /**
   * The best of a user-supplied finite set of experts/policies, evaluated in hindsight on the stored
   * loss objects: regret = Σ_t ℓ_t(x_t) − min_i Σ_t ℓ_t(e_i(t)). Same requirements as
   * {@link RegretTracker.regretAgainst}; for streaming use pass `experts` to the tracker instead.
   */
  bestOfExperts(experts: readonly Expert[]): ExpertRegretSummary {
    const fn = "RegretTracker.bestOfExperts";
    if (!Array.isArray(experts) || experts.length === 0) {
      throw new RecedeError("type", fn, "experts", "a non-empty array", experts);
    }
    const losses = new Float64Array(experts.length);
    let L = Number.NaN;
    experts.forEach((e, i) => {
      if (!(e instanceof Float64Array) && typeof e !== "function") {
        throw new RecedeError("type", fn, `experts[${i}]`, "a Float64Array or a function", e);
      }
      const seq: ComparatorSequence = e instanceof Float64Array ? () => e : e;
      const r = this.hindsight(seq, fn, `experts[${i}]`);
      if (Number.isNaN(L)) L = this.cumulativeLossFromRows();
      losses[i] = L - r;
    });
    let bi = 0;
    for (let i = 1; i < losses.length; i++) if (losses[i] < losses[bi]) bi = i;
    return { regret: L - losses[bi], bestIndex: bi, bestLoss: losses[bi], losses };
  }

  private cumulativeLossFromRows(): number {
    const rows = this.rows as RowStore;
    const x = new Float64Array(rows.length);
    for (let r = 0; r < rows.length; r++) x[r] = rows.buffer[rows.offsetOf(r) + 1];
    return compensatedSum(x);
  }

  private hindsight(sequence: ComparatorSequence, fnName: string, arg: string): number {
    const d = this.dimension;
    if (this.history !== "full" || this.rows === null) {
      throw new RecedeError("state", fnName, "history", '"full"', this.history);
    }
    if (this.lossObjects === null) {
      throw new RecedeError("state", fnName, "retainLossObjects", "true", false);
    }
    const out = new Float64Array(d);
    const losses = new Float64Array(this.t);
    const comp = new Float64Array(this.t);
    const buf = this.rows.buffer;
    for (let r = 0; r < this.t; r++) {
      const lo = this.lossObjects.get(r);
      if (lo === undefined) {
        throw new RecedeError("state", fnName, `lossObject of round ${r + 1}`, "recorded", lo);
      }
      const u = sequence(r + 1, lo, out);
      if (!(u instanceof Float64Array) || u.length !== d) {
        throw new RecedeError("dimension", fnName, arg, `a Float64Array of length ${d}`, u);
      }
      const v = lo.value(u);
      if (!Number.isFinite(v)) {
        throw new RecedeError(
          "non-finite",
          fnName,
          `loss at ${arg} in round ${r + 1}`,
          "finite",
          v,
        );
      }
      losses[r] = buf[this.rows.offsetOf(r) + 1];
      comp[r] = v;
    }
    return compensatedSum(losses) - compensatedSum(comp);
  }

  /** Forget every round (options and attachments are kept). */
  reset(): void {
    this.resetState();
  }

  private resetState(): void {
    this.t = 0;
    this.stride = 1;
    this.skipped = 0;
    this.lastErr = undefined;
    this.gradRounds = 0;
    this.maxL2 = 0;
    this.maxLinf = 0;
    this.total.fill(0);
    this.totalComp.fill(0);
    this.path.fill(0);
    this.pathComp.fill(0);
    this.prevU.fill(0);
    this.ring?.fill(0);
    this.winSum.fill(0);
    this.winComp.fill(0);
    this.adaptMax.fill(0);
    this.adaptStart.fill(1);
    this.rows?.clear();
    this.decisions?.clear();
    this.lossObjects?.clear();
  }

  /** A short description for logs. */
  toString(): string {
    return `RegretTracker(d=${this.dimension}, history=${this.history}, rounds=${this.t}, columns=${this.names.join(",")})`;
  }
}
