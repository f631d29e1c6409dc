/**
 * The geometry interface: a Bregman divergence D_ψ with its mirror map and closed-form mirror step.
 *
 * D_ψ(x‖y) = ψ(x) − ψ(y) − ⟨∇ψ(y), x − y⟩ (Bregman 1967; see Beck & Teboulle, "Mirror Descent and
 * Nonlinear Projected Subgradient Methods for Convex Optimization", Oper. Res. Lett., 2003).
 * The mirror step is x⁺ = argmin_{x ∈ X} η⟨g, x⟩ + D_ψ(x‖x_t): in the mirror space
 * ∇ψ(x̄) = ∇ψ(x_t) − η g, then the Bregman projection onto the feasible set X when one is given.
 *
 * @module
 */

/** A Bregman geometry on vectors of a fixed dimension. Implementations allocate nothing per call. */
export interface Geometry {
  /** Short name, e.g. `"euclidean"`, `"mahalanobis"`, `"entropy"`. */
  readonly name: string;
  /** Length of the vectors this geometry acts on. */
  readonly dimension: number;
  /** ψ(x). */
  potential(x: Float64Array): number;
  /** D_ψ(x‖y) ≥ 0. */
  divergence(x: Float64Array, y: Float64Array): number;
  /** out ← ∇ψ(x) (the mirror map). Returns `out`. */
  mirrorMap(x: Float64Array, out: Float64Array): Float64Array;
  /** out ← ∇ψ*(θ) (the inverse mirror map, onto the domain of ψ). Returns `out`. */
  inverseMirrorMap(theta: Float64Array, out: Float64Array): Float64Array;
  /**
   * out ← argmin_{x ∈ X} η⟨g, x⟩ + D_ψ(x‖xt), including the projection onto the feasible set
   * when the geometry has one. `out` may alias `xt`. Returns `out`.
   */
  step(xt: Float64Array, g: Float64Array, eta: number, out: Float64Array): Float64Array;
  /** True when x lies in the domain (and feasible set) of the geometry. */
  contains(x: Float64Array): boolean;
}
