/**
 * Diagonal-Gaussian output head shared by the Gaussian policy families: N(μ, diag σ²) with
 * σ_j = exp(θ[ls + j]) (learnable log-standard deviations).
 *
 * Formulas (MATH.md §5.1; Williams 1992 for the score of a Gaussian unit):
 *   ln π = −½ Σ_j z_j² − Σ_j ln σ_j − (m/2) ln 2π,   z_j = (a_j − μ_j)/σ_j,
 *   ∂ ln π/∂μ_j = z_j/σ_j,   ∂ ln π/∂ ln σ_j = z_j² − 1,
 *   Fisher in (μ, ln σ): diag(1/σ²) ⊕ 2·I,
 *   KL(N_o‖N_n) = Σ_j [ln(σ_n/σ_o) + (σ_o² + (μ_o − μ_n)²)/(2σ_n²) − ½].
 *
 * @module
 */
import type { StochasticPolicy } from "../policies/policy.js";

const HALF_LOG_2PI = 0.5 * Math.log(2 * Math.PI);

/** ln N(a; μ, diag exp(2·logStd)). */
export function gaussianLogProb(
  m: number,
  mu: Float64Array,
  mo: number,
  theta: Float64Array,
  ls: number,
  action: Float64Array,
  ao: number,
): number {
  let s = 0;
  for (let j = 0; j < m; j++) {
    const l = theta[ls + j];
    const z = (action[ao + j] - mu[mo + j]) * Math.exp(-l);
    s += -0.5 * z * z - l - HALF_LOG_2PI;
  }
  return s;
}

/**
 * dmu[j] ← w · ∂ln π/∂μ_j and out[ls + j] += w · (z_j² − 1). Returns ln π.
 */
export function gaussianScore(
  m: number,
  mu: Float64Array,
  mo: number,
  theta: Float64Array,
  ls: number,
  action: Float64Array,
  ao: number,
  weight: number,
  dmu: Float64Array,
  out: Float64Array,
): number {
  let s = 0;
  for (let j = 0; j < m; j++) {
    const l = theta[ls + j];
    const inv = Math.exp(-l);
    const z = (action[ao + j] - mu[mo + j]) * inv;
    s += -0.5 * z * z - l - HALF_LOG_2PI;
    dmu[j] = weight * z * inv;
    out[ls + j] += weight * (z * z - 1);
  }
  return s;
}

/** KL(N(μo, σo²) ‖ N(μn, σn²)) for diagonal Gaussians with log-std blocks in θo, θn. */
export function gaussianKl(
  m: number,
  muO: Float64Array,
  muN: Float64Array,
  thetaO: Float64Array,
  thetaN: Float64Array,
  ls: number,
): number {
  let s = 0;
  for (let j = 0; j < m; j++) {
    const lo = thetaO[ls + j];
    const ln = thetaN[ls + j];
    const d = muO[j] - muN[j];
    s += ln - lo + (Math.exp(2 * (lo - ln)) + d * d * Math.exp(-2 * ln)) * 0.5 - 0.5;
  }
  return s;
}

/** Draw a ← μ + σ ⊙ ε with ε ∼ N(0, I) drawn into `action[ao..]` first. */
export function gaussianPerturb(
  m: number,
  mu: Float64Array,
  theta: Float64Array,
  ls: number,
  action: Float64Array,
  ao: number,
): void {
  for (let j = 0; j < m; j++) action[ao + j] = mu[j] + Math.exp(theta[ls + j]) * action[ao + j];
}

/**
 * Finish a Gaussian-family Fisher-vector product: the mean block of `out` (entries before `ls`)
 * holds Σ_k J_kᵀ diag(σ⁻²) J_k v and is averaged over `count` states; the ln σ block is 2·v_{ln σ}
 * (the Fisher of N(μ, σ²) in ln σ is 2, independent of the state). Returns `out`.
 */
export function finishGaussianFisher(
  m: number,
  ls: number,
  count: number,
  v: Float64Array,
  out: Float64Array,
): Float64Array {
  const inv = count > 0 ? 1 / count : 0;
  for (let p = 0; p < ls; p++) out[p] *= inv;
  for (let j = 0; j < m; j++) out[ls + j] = 2 * v[ls + j];
  return out;
}

/**
 * Mean KL over `count` states, (1/count) Σ_k KL(N(μ_o(s_k), σ_o²) ‖ N(μ_n(s_k), σ_n²)), with the
 * means from `policy.mean` (the Gaussian families' deployment action is μ) written into the
 * scratch vectors `muO`, `muN` (length m) and the log-stds at `ls` in θ_o, θ_n.
 */
export function gaussianMeanKl(
  policy: StochasticPolicy,
  ls: number,
  thetaO: Float64Array,
  thetaN: Float64Array,
  states: Float64Array,
  so: number,
  count: number,
  muO: Float64Array,
  muN: Float64Array,
): number {
  const n = policy.stateSize;
  const m = policy.actionSize;
  let s = 0;
  for (let k = 0; k < count; k++) {
    const xo = so + k * n;
    policy.mean(thetaO, states, xo, muO, 0);
    policy.mean(thetaN, states, xo, muN, 0);
    s += gaussianKl(m, muO, muN, thetaO, thetaN, ls);
  }
  return count > 0 ? s / count : 0;
}
