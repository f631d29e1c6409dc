/**
 * Exact Jacobians of one classical Runge–Kutta (RK4) step (internal).
 *
 * The step x⁺ = x + h/6 (k₁ + 2k₂ + 2k₃ + k₄), k₁ = f(x, u), k₂ = f(x + h/2 k₁, u),
 * k₃ = f(x + h/2 k₂, u), k₄ = f(x + h k₃, u) (E. Hairer, S. P. Nørsett, G. Wanner, "Solving Ordinary
 * Differential Equations I", 2nd ed., 1993, §II.1) is differentiated by the chain rule:
 *   ∂k₁ = F₁, ∂k₂ = F₂(I + h/2 ∂k₁), ∂k₃ = F₃(I + h/2 ∂k₂), ∂k₄ = F₄(I + h ∂k₃)  (w.r.t. x),
 *   ∂k₁ = G₁, ∂k₂ = F₂ h/2 ∂k₁ + G₂, …                                       (w.r.t. u),
 * with F_i = ∂f/∂x and G_i = ∂f/∂u at the i-th stage point. This is the derivative of the discrete
 * map itself, not of the continuous flow, so it matches finite differences of `step` to rounding.
 *
 * @module
 */

/** A continuous-time vector field ẋ = f(x, u) with its analytic partial derivatives. */
export interface VectorField {
  readonly n: number;
  readonly m: number;
  /** out[oo..] ← f(x[xo..], u[uo..]). */
  deriv(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    out: Float64Array,
    oo: number,
  ): void;
  /** fx ← ∂f/∂x (n×n), fu ← ∂f/∂u (n×m), both row-major at offset 0. */
  partials(
    x: Float64Array,
    xo: number,
    u: Float64Array,
    uo: number,
    fx: Float64Array,
    fu: Float64Array,
  ): void;
}

/** Computes A = ∂x⁺/∂x and B = ∂x⁺/∂u of an RK4 step of a {@link VectorField}; scratch made once. */
export class Rk4Jacobian {
  private readonly f: VectorField;
  private readonly h: number;
  private readonly s: Float64Array;
  private readonly k: Float64Array;
  private readonly fx: Float64Array;
  private readonly fu: Float64Array;
  private readonly dx: Float64Array; // previous stage ∂k/∂x
  private readonly du: Float64Array;
  private readonly tx: Float64Array;
  private readonly tu: Float64Array;

  constructor(f: VectorField, h: number) {
    this.f = f;
    this.h = h;
    const { n, m } = f;
    this.s = new Float64Array(n);
    this.k = new Float64Array(n);
    this.fx = new Float64Array(n * n);
    this.fu = new Float64Array(n * m);
    this.dx = new Float64Array(n * n);
    this.du = new Float64Array(n * m);
    this.tx = new Float64Array(n * n);
    this.tu = new Float64Array(n * m);
  }

  /** a ← ∂x⁺/∂x (n×n), b ← ∂x⁺/∂u (n×m), row-major. */
  jacobians(x: Float64Array, u: Float64Array, a: Float64Array, b: Float64Array): void {
    const { n, m } = this.f;
    const { h, s, k, fx, fu, dx, du, tx, tu } = this;
    a.fill(0, 0, n * n);
    b.fill(0, 0, n * m);
    for (let stage = 0; stage < 4; stage++) {
      const c = stage === 0 ? 0 : stage === 3 ? h : h / 2;
      // stage point s = x + c·k_{prev}
      for (let i = 0; i < n; i++) s[i] = stage === 0 ? x[i] : x[i] + c * k[i];
      this.f.partials(s, 0, u, 0, fx, fu);
      if (stage === 0) {
        dx.set(fx);
        du.set(fu);
      } else {
        // tx = F (I + c·dx_prev), tu = F (c·du_prev) + G
        for (let i = 0; i < n; i++) {
          for (let j = 0; j < n; j++) {
            let acc = fx[i * n + j];
            for (let p = 0; p < n; p++) acc += c * fx[i * n + p] * dx[p * n + j];
            tx[i * n + j] = acc;
          }
          for (let j = 0; j < m; j++) {
            let acc = fu[i * m + j];
            for (let p = 0; p < n; p++) acc += c * fx[i * n + p] * du[p * m + j];
            tu[i * m + j] = acc;
          }
        }
        dx.set(tx);
        du.set(tu);
      }
      const w = stage === 0 || stage === 3 ? h / 6 : h / 3;
      for (let i = 0; i < n * n; i++) a[i] += w * dx[i];
      for (let i = 0; i < n * m; i++) b[i] += w * du[i];
      // next stage needs k_stage = f(s)
      if (stage < 3) this.f.deriv(s, 0, u, 0, k, 0);
    }
    for (let i = 0; i < n; i++) a[i * n + i] += 1;
  }
}

/**
 * Generic batched RK4 step of a {@link VectorField} with scratch allocated once (5n numbers).
 * Slower than the problems' hand-inlined steps; used for model variants that are not on a hot path.
 */
export class Rk4Stepper {
  private readonly f: VectorField;
  private readonly h: number;
  private readonly k1: Float64Array;
  private readonly k2: Float64Array;
  private readonly k3: Float64Array;
  private readonly k4: Float64Array;
  private readonly s: Float64Array;

  constructor(f: VectorField, h: number) {
    this.f = f;
    this.h = h;
    this.k1 = new Float64Array(f.n);
    this.k2 = new Float64Array(f.n);
    this.k3 = new Float64Array(f.n);
    this.k4 = new Float64Array(f.n);
    this.s = new Float64Array(f.n);
  }

  /** Advance `count` states at x[xo + k·n] in place under controls at u[uo + k·m]. */
  step(x: Float64Array, xo: number, u: Float64Array, uo: number, count: number): void {
    const { n, m } = this.f;
    const { h, k1, k2, k3, k4, s } = this;
    for (let k = 0; k < count; k++) {
      const b = xo + k * n;
      const ub = uo + k * m;
      this.f.deriv(x, b, u, ub, k1, 0);
      for (let i = 0; i < n; i++) s[i] = x[b + i] + 0.5 * h * k1[i];
      this.f.deriv(s, 0, u, ub, k2, 0);
      for (let i = 0; i < n; i++) s[i] = x[b + i] + 0.5 * h * k2[i];
      this.f.deriv(s, 0, u, ub, k3, 0);
      for (let i = 0; i < n; i++) s[i] = x[b + i] + h * k3[i];
      this.f.deriv(s, 0, u, ub, k4, 0);
      for (let i = 0; i < n; i++) x[b + i] += (h / 6) * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]);
    }
  }
}
