/**
 * Regret bounds of online (projected) gradient descent x_{t+1} = Π_X(x_t − η_t g_t)
 * (MATH.md §1.3). Symbols ↔ options: D ↔ `diameter` (max_{x,y∈X} ‖x − y‖₂), G ↔ `gradientBound`
 * (≥ ‖g_t‖₂ for all t), T ↔ `rounds`, η ↔ `stepSize`, P_T ↔ `pathLength`.
 *
 * @module
 */

import { nonNegative, positive, roundsArg } from "./checks.js";

/** The constants every OGD bound takes. */
export interface OgdBoundParameters {
  /** D = max_{x,y∈X} ‖x − y‖₂ (≥ 0). */
  readonly diameter: number;
  /** G ≥ max_t ‖g_t‖₂ (≥ 0). */
  readonly gradientBound: number;
  /** T ≥ 1. */
  readonly rounds: number;
}

function read(fn: string, p: OgdBoundParameters): [number, number, number] {
  return [
    nonNegative(fn, "diameter", p.diameter),
    nonNegative(fn, "gradientBound", p.gradientBound),
    roundsArg(fn, p.rounds),
  ];
}

/**
 * Zinkevich's bound for η_t = t^{−1/2}:
 *   R_T ≤ D²√T / 2 + (√T − ½) G².
 * Source: M. Zinkevich, "Online Convex Programming and Generalized Infinitesimal Gradient Ascent",
 * ICML 2003, Theorem 1 (MATH.md §1.3: recalled, re-derived from
 * R_T ≤ D²/(2η_T) + (G²/2)Σ_t η_t with Σ_{t≤T} t^{−1/2} ≤ 2√T − 1).
 */
export function ogdRegretBoundZinkevich(p: OgdBoundParameters): number {
  const [D, G, T] = read("ogdRegretBoundZinkevich", p);
  const s = Math.sqrt(T);
  return (D * D * s) / 2 + (s - 0.5) * G * G;
}

/**
 * Hazan's bound for η_t = D / (G√t):
 *   R_T ≤ (3/2) G D √T.
 * Source: E. Hazan, "Introduction to Online Convex Optimization", Foundations and Trends in
 * Optimization 2(3–4), 2016, Theorem 3.1 (MATH.md §1.3: recalled and re-derived).
 */
export function ogdRegretBoundHazan(p: OgdBoundParameters): number {
  const [D, G, T] = read("ogdRegretBoundHazan", p);
  return 1.5 * G * D * Math.sqrt(T);
}

/** Parameters of the fixed-step OGD bounds. */
export interface OgdFixedStepParameters extends OgdBoundParameters {
  /** η > 0, the same every round. */
  readonly stepSize: number;
}

/**
 * Fixed step η:
 *   R_T ≤ D² / (2η) + η T G² / 2,
 * which at η = D/(G√T) ({@link ogdTunedStepSize}) is G D √T.
 * Source: derived in MATH.md §1.3 from the one-step inequality
 * ⟨g_t, x_t − u⟩ ≤ (‖x_t − u‖² − ‖x_{t+1} − u‖²)/(2η) + η‖g_t‖²/2 (Zinkevich 2003; Hazan 2016, §3.1).
 */
export function ogdRegretBoundFixedStep(p: OgdFixedStepParameters): number {
  const fn = "ogdRegretBoundFixedStep";
  const [D, G, T] = read(fn, p);
  const eta = positive(fn, "stepSize", p.stepSize);
  return (D * D) / (2 * eta) + (eta * T * G * G) / 2;
}

/**
 * η* = D / (G√T), the step that minimizes {@link ogdRegretBoundFixedStep} (needs G, D > 0):
 * d/dη [D²/(2η) + ηTG²/2] = 0. Derived (MATH.md §1.3; Zinkevich 2003).
 */
export function ogdTunedStepSize(p: OgdBoundParameters): number {
  const fn = "ogdTunedStepSize";
  const [D, G, T] = read(fn, p);
  positive(fn, "diameter", D);
  positive(fn, "gradientBound", G);
  return D / (G * Math.sqrt(T));
}

/** Parameters of the OGD dynamic-regret bound. */
export interface OgdDynamicParameters extends OgdFixedStepParameters {
  /** P_T = Σ_{t=2}^T ‖u_t − u_{t−1}‖₂ of the comparator sequence. */
  readonly pathLength: number;
}

/**
 * Dynamic regret of fixed-step OGD against any comparator sequence u_{1:T} ⊂ X:
 *   R_T(u_{1:T}) ≤ D²/(2η) + D·P_T/η + η T G²/2.
 * Source: derived in MATH.md §1.3 (adds ‖x_{t+1} − u_{t+1}‖² − ‖x_{t+1} − u_t‖² ≤ 2D‖u_{t+1} − u_t‖
 * to the telescoping sum). Zinkevich 2003, Theorem 2 has the same form with a looser first term
 * 7D²/(4η) (recalled, not re-read); this function implements the derived constant.
 */
export function ogdDynamicRegretBound(p: OgdDynamicParameters): number {
  const fn = "ogdDynamicRegretBound";
  const [D, G, T] = read(fn, p);
  const eta = positive(fn, "stepSize", p.stepSize);
  const P = nonNegative(fn, "pathLength", p.pathLength);
  return (D * D) / (2 * eta) + (D * P) / eta + (eta * T * G * G) / 2;
}
