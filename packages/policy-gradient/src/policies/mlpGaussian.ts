/**
 * Multilayer-perceptron Gaussian policy: μ_θ(x) from tanh hidden layers and a linear output,
 * u ∼ N(μ_θ(x), diag σ²) with learnable log-std. Gradients by a small hand-written reverse pass;
 * Fisher-vector products by one forward-mode (Jacobian-vector) pass and one reverse pass.
 *
 * @module
 */
import {
  createStream,
  RecedeError,
  requireFinite,
  requireInteger,
  requirePositive,
  type Stream,
} from "@recede/core";
import {
  finishGaussianFisher,
  gaussianLogProb,
  gaussianMeanKl,
  gaussianPerturb,
  gaussianScore,
} from "../internal/gaussianHead.js";
import { requireOptionsObject } from "../internal/validate.js";
import type { ParameterBlock, StochasticPolicy } from "./policy.js";

/** Options of {@link mlpGaussianPolicy}. */
export interface MlpGaussianPolicyOptions {
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly actionSize: number;
  /**
   * Widths of the tanh hidden layers.
   * @defaultValue [32, 32]
   */
  readonly hidden?: readonly number[];
  /**
   * Initial standard deviation σ of the action noise (all components).
   * @defaultValue 1
   */
  readonly initialStd?: number;
  /**
   * Scale of the output layer's initial weights relative to the 1/√fan-in rule, so that the
   * initial mean action is close to zero.
   * @defaultValue 0.01
   */
  readonly outputScale?: number;
  /**
   * Seed of the initial weights.
   * @defaultValue 0
   */
  readonly seed?: number | string;
  /**
   * Fixed input normalization: the network sees h₀ = (x − stateOffset) ⊘ stateScale. Set them to
   * the typical state and its spread so that every input is of order one.
   * @defaultValue zeros
   */
  readonly stateOffset?: ArrayLike<number>;
  /**
   * See `stateOffset`; every entry > 0.
   * @defaultValue ones
   */
  readonly stateScale?: ArrayLike<number>;
}

/**
 * The tanh-MLP Gaussian policy family.
 *
 * Forward pass: h₀ = (x − offset) ⊘ scale (fixed input normalization); h_l = tanh(W_l h_{l−1} + b_l) for hidden layers; μ = W_L h_{L−1} + b_L.
 * θ layout: for each layer l = 1..L, W_l (out×in, row-major) then b_l; finally ln σ (m).
 * Reverse pass (backpropagation; Rumelhart, Hinton & Williams, "Learning representations by
 * back-propagating errors", Nature, 1986): δ_L = ∂ℓ/∂μ, ∂ℓ/∂W_l = δ_l h_{l−1}ᵀ, ∂ℓ/∂b_l = δ_l,
 * δ_{l−1} = (W_lᵀ δ_l) ⊙ (1 − h_{l−1}²).
 * Fisher-vector product (the Gaussian Fisher is a Gauss–Newton matrix, Martens, "New insights and
 * perspectives on the natural gradient method", JMLR, 2020): F v = (1/N) Σ_s J_sᵀ diag(σ⁻²) J_s v
 * ⊕ 2 v_{ln σ}, with J_s v from a forward-mode pass and J_sᵀ w from the reverse pass.
 */
export class MlpGaussianPolicy implements StochasticPolicy {
  readonly name: string = "mlp-gaussian";
  readonly kind: "gaussian" = "gaussian";
  readonly stateSize: number;
  readonly actionSize: number;
  readonly actionCount: number = 0;
  readonly parameterCount: number;
  readonly blocks: readonly ParameterBlock[];
  /** Layer widths [n, h₁, …, m]. */
  readonly sizes: readonly number[];
  /** Offset of ln σ in θ. */
  readonly logStdOffset: number;
  private readonly wOff: Int32Array;
  private readonly bOff: Int32Array;
  private readonly aOff: Int32Array;
  private readonly act: Float64Array;
  private readonly tan: Float64Array;
  private readonly del: Float64Array;
  private readonly mu2: Float64Array;
  private readonly dmu: Float64Array;
  private readonly init: Float64Array;
  private readonly inOffset: Float64Array;
  private readonly inScale: Float64Array;

  /** Use {@link mlpGaussianPolicy}; the constructor trusts validated options. */
  constructor(
    sizes: readonly number[],
    initialStd: number,
    outputScale: number,
    seed: number | string,
    inOffset?: Float64Array,
    inInvScale?: Float64Array,
  ) {
    this.inOffset = inOffset ?? new Float64Array(sizes[0]);
    this.inScale = inInvScale ?? new Float64Array(sizes[0]).fill(1);
    const L = sizes.length - 1;
    this.sizes = sizes.slice();
    this.stateSize = sizes[0];
    this.actionSize = sizes[L];
    this.wOff = new Int32Array(L);
    this.bOff = new Int32Array(L);
    this.aOff = new Int32Array(L + 1);
    const blocks: ParameterBlock[] = [];
    let p = 0;
    let a = 0;
    for (let l = 0; l < L; l++) {
      const fin = sizes[l];
      const fout = sizes[l + 1];
      this.wOff[l] = p;
      blocks.push({
        name: `layer${l + 1}.weight`,
        offset: p,
        length: fin * fout,
        shape: [fout, fin],
      });
      p += fin * fout;
      this.bOff[l] = p;
      blocks.push({ name: `layer${l + 1}.bias`, offset: p, length: fout, shape: [fout] });
      p += fout;
    }
    for (let l = 0; l <= L; l++) {
      this.aOff[l] = a;
      a += sizes[l];
    }
    this.logStdOffset = p;
    blocks.push({ name: "logStd", offset: p, length: this.actionSize, shape: [this.actionSize] });
    this.parameterCount = p + this.actionSize;
    this.blocks = blocks;
    this.act = new Float64Array(a);
    this.tan = new Float64Array(a);
    this.del = new Float64Array(a);
    this.mu2 = new Float64Array(this.actionSize);
    this.dmu = new Float64Array(this.actionSize);
    // Initial weights: N(0, 1/fan-in) (common practice, LeCun-style scaling), output layer scaled.
    const init = new Float64Array(this.parameterCount);
    const stream = createStream(seed);
    for (let l = 0; l < L; l++) {
      const fin = sizes[l];
      const fout = sizes[l + 1];
      const sc = (l === L - 1 ? outputScale : 1) / Math.sqrt(fin);
      stream.fillNormal(init, this.wOff[l], fin * fout);
      for (let i = 0; i < fin * fout; i++) init[this.wOff[l] + i] *= sc;
    }
    for (let j = 0; j < this.actionSize; j++) init[p + j] = Math.log(initialStd);
    this.init = init;
  }

  initialParameters(): Float64Array {
    return this.init.slice();
  }

  /** Forward pass; the mean lands in act[aOff[L] ..]. */
  private forward(theta: Float64Array, x: Float64Array, xo: number): void {
    const sizes = this.sizes;
    const L = sizes.length - 1;
    const act = this.act;
    const off = this.inOffset;
    const isc = this.inScale;
    for (let i = 0; i < sizes[0]; i++) act[i] = (x[xo + i] - off[i]) * isc[i];
    for (let l = 0; l < L; l++) {
      const fin = sizes[l];
      const fout = sizes[l + 1];
      const wo = this.wOff[l];
      const bo = this.bOff[l];
      const ai = this.aOff[l];
      const ao = this.aOff[l + 1];
      const hidden = l < L - 1;
      for (let o = 0; o < fout; o++) {
        let z = theta[bo + o];
        const r = wo + o * fin;
        for (let i = 0; i < fin; i++) z += theta[r + i] * act[ai + i];
        act[ao + o] = hidden ? Math.tanh(z) : z;
      }
    }
  }

  /** Reverse pass: δ_L in del[aOff[L]..] on entry; accumulates ∂/∂(W, b) into `out`. */
  private backward(theta: Float64Array, out: Float64Array): void {
    const sizes = this.sizes;
    const L = sizes.length - 1;
    const act = this.act;
    const del = this.del;
    for (let l = L - 1; l >= 0; l--) {
      const fin = sizes[l];
      const fout = sizes[l + 1];
      const wo = this.wOff[l];
      const bo = this.bOff[l];
      const ai = this.aOff[l];
      const ao = this.aOff[l + 1];
      for (let o = 0; o < fout; o++) {
        const d = del[ao + o];
        out[bo + o] += d;
        const r = wo + o * fin;
        for (let i = 0; i < fin; i++) out[r + i] += d * act[ai + i];
      }
      if (l > 0) {
        for (let i = 0; i < fin; i++) {
          let s = 0;
          for (let o = 0; o < fout; o++) s += theta[wo + o * fin + i] * del[ao + o];
          const h = act[ai + i];
          del[ai + i] = s * (1 - h * h);
        }
      }
    }
  }

  /** Forward-mode pass (after `forward`): tangent of μ along v lands in tan[aOff[L]..]. */
  private tangent(theta: Float64Array, v: Float64Array): void {
    const sizes = this.sizes;
    const L = sizes.length - 1;
    const act = this.act;
    const tan = this.tan;
    for (let i = 0; i < sizes[0]; i++) tan[i] = 0;
    for (let l = 0; l < L; l++) {
      const fin = sizes[l];
      const fout = sizes[l + 1];
      const wo = this.wOff[l];
      const bo = this.bOff[l];
      const ai = this.aOff[l];
      const ao = this.aOff[l + 1];
      const hidden = l < L - 1;
      for (let o = 0; o < fout; o++) {
        let dz = v[bo + o];
        const r = wo + o * fin;
        for (let i = 0; i < fin; i++) dz += v[r + i] * act[ai + i] + theta[r + i] * tan[ai + i];
        if (hidden) {
          const h = act[ao + o];
          tan[ao + o] = (1 - h * h) * dz;
        } else tan[ao + o] = dz;
      }
    }
  }

  sample(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    stream: Stream,
    action: Float64Array,
    ao: number,
  ): void {
    this.forward(theta, state, so);
    const m = this.actionSize;
    const mo = this.aOff[this.sizes.length - 1];
    for (let j = 0; j < m; j++) this.mu2[j] = this.act[mo + j];
    stream.fillNormal(action, ao, m);
    gaussianPerturb(m, this.mu2, theta, this.logStdOffset, action, ao);
  }

  mean(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
  ): void {
    this.forward(theta, state, so);
    const mo = this.aOff[this.sizes.length - 1];
    for (let j = 0; j < this.actionSize; j++) action[ao + j] = this.act[mo + j];
  }

  logProb(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
  ): number {
    this.forward(theta, state, so);
    const mo = this.aOff[this.sizes.length - 1];
    return gaussianLogProb(this.actionSize, this.act, mo, theta, this.logStdOffset, action, ao);
  }

  addGradLogProb(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    action: Float64Array,
    ao: number,
    weight: number,
    out: Float64Array,
  ): number {
    this.forward(theta, state, so);
    const m = this.actionSize;
    const mo = this.aOff[this.sizes.length - 1];
    const lp = gaussianScore(
      m,
      this.act,
      mo,
      theta,
      this.logStdOffset,
      action,
      ao,
      weight,
      this.dmu,
      out,
    );
    for (let j = 0; j < m; j++) this.del[mo + j] = this.dmu[j];
    this.backward(theta, out);
    return lp;
  }

  /**
   * out ← out + J_θμ(x)ᵀ w: the reverse pass for an arbitrary output cotangent w (length m), used by
   * regression losses on the mean action (behaviour cloning, DAgger).
   */
  addMeanVjp(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    w: Float64Array,
    out: Float64Array,
  ): void {
    this.forward(theta, state, so);
    const mo = this.aOff[this.sizes.length - 1];
    for (let j = 0; j < this.actionSize; j++) this.del[mo + j] = w[j];
    this.backward(theta, out);
  }

  /**
   * One fused forward/reverse pass for regression on the mean action:
   * out ← out + scale · J_θμ(x)ᵀ (μ_θ(x) − target); returns ‖μ_θ(x) − target‖².
   */
  addSquaredErrorGradient(
    theta: Float64Array,
    state: Float64Array,
    so: number,
    target: Float64Array,
    to: number,
    scale: number,
    out: Float64Array,
  ): number {
    this.forward(theta, state, so);
    const mo = this.aOff[this.sizes.length - 1];
    let sq = 0;
    for (let j = 0; j < this.actionSize; j++) {
      const r = this.act[mo + j] - target[to + j];
      sq += r * r;
      this.del[mo + j] = scale * r;
    }
    this.backward(theta, out);
    return sq;
  }

  fisherVectorProduct(
    theta: Float64Array,
    states: Float64Array,
    so: number,
    count: number,
    v: Float64Array,
    out: Float64Array,
  ): Float64Array {
    const m = this.actionSize;
    const ls = this.logStdOffset;
    const mo = this.aOff[this.sizes.length - 1];
    out.fill(0);
    for (let k = 0; k < count; k++) {
      this.forward(theta, states, so + k * this.stateSize);
      this.tangent(theta, v);
      for (let j = 0; j < m; j++) {
        this.del[mo + j] = this.tan[mo + j] * Math.exp(-2 * theta[ls + j]);
      }
      this.backward(theta, out);
    }
    return finishGaussianFisher(m, ls, count, v, out);
  }

  meanKl(
    thetaOld: Float64Array,
    thetaNew: Float64Array,
    states: Float64Array,
    so: number,
    count: number,
  ): number {
    const ls = this.logStdOffset;
    return gaussianMeanKl(this, ls, thetaOld, thetaNew, states, so, count, this.mu2, this.dmu);
  }
}

/**
 * Create a tanh-MLP Gaussian policy family (see {@link MlpGaussianPolicy}).
 *
 * Symbols ↔ options: n ↔ `stateSize`, m ↔ `actionSize`, hidden widths ↔ `hidden`, σ₀ ↔ `initialStd`.
 *
 * @example
 * ```ts
 * const pi = mlpGaussianPolicy({ stateSize: 4, actionSize: 1, hidden: [16, 16], seed: 3 });
 * const theta = pi.initialParameters();
 * ```
 */
export function mlpGaussianPolicy(options: MlpGaussianPolicyOptions): MlpGaussianPolicy {
  const fn = "mlpGaussianPolicy";
  requireOptionsObject(fn, options);
  const n = requireInteger(fn, "stateSize", options.stateSize, 1);
  const m = requireInteger(fn, "actionSize", options.actionSize, 1);
  const hidden = options.hidden ?? [32, 32];
  if (!Array.isArray(hidden))
    throw new RecedeError("type", fn, "hidden", "an array of integers", hidden);
  for (let i = 0; i < hidden.length; i++) requireInteger(fn, `hidden[${i}]`, hidden[i], 1);
  const std = requirePositive(fn, "initialStd", options.initialStd ?? 1);
  const outScale = requirePositive(fn, "outputScale", options.outputScale ?? 0.01);
  const seed = options.seed ?? 0;
  if (typeof seed !== "number" && typeof seed !== "string") {
    throw new RecedeError("type", fn, "seed", "a number or a string", seed);
  }
  const offset = new Float64Array(n);
  const inv = new Float64Array(n).fill(1);
  if (options.stateOffset !== undefined) {
    if (options.stateOffset.length !== n) {
      throw new RecedeError("dimension", fn, "stateOffset", `of length ${n}`, options.stateOffset);
    }
    for (let i = 0; i < n; i++)
      offset[i] = requireFinite(fn, `stateOffset[${i}]`, options.stateOffset[i]);
  }
  if (options.stateScale !== undefined) {
    if (options.stateScale.length !== n) {
      throw new RecedeError("dimension", fn, "stateScale", `of length ${n}`, options.stateScale);
    }
    for (let i = 0; i < n; i++)
      inv[i] = 1 / requirePositive(fn, `stateScale[${i}]`, options.stateScale[i]);
  }
  return new MlpGaussianPolicy([n, ...hidden, m], std, outScale, seed, offset, inv);
}
