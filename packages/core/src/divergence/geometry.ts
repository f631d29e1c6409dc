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

/**
 * A Bregman geometry on vectors of a fixed dimension. Implementations allocate nothing per call
 * and do not validate their arguments (the learners validate feedback once per round and check
 * every step's result with {@link Geometry.contains}); methods must not modify their inputs.
 *
 * To add your own geometry (a Fisher metric, a weighted norm, …) implement this interface and add
 * one row to the `geometryLaws` table of the private testkit: the laws check D ≥ 0, the
 * three-point identity, ∇ψ* ∘ ∇ψ = id and the step's optimality.
 *
 * Built in: {@link euclidean}, {@link mahalanobis}, {@link entropy}, {@link positiveEntropy},
 * {@link diagonalGaussian}.
 *
 * @example
 * ```ts
 * // ψ(x) = ½ Σ wᵢxᵢ² (a diagonal metric), written by hand.
 * const w = [1, 4];
 * const weighted = {
 *   name: "weighted",
 *   dimension: 2,
 *   potential: (x) => 0.5 * (w[0] * x[0] * x[0] + w[1] * x[1] * x[1]),
 *   divergence: (x, y) => 0.5 * (w[0] * (x[0] - y[0]) ** 2 + w[1] * (x[1] - y[1]) ** 2),
 *   mirrorMap: (x, out) => { out[0] = w[0] * x[0]; out[1] = w[1] * x[1]; return out; },
 *   inverseMirrorMap: (t, out) => { out[0] = t[0] / w[0]; out[1] = t[1] / w[1]; return out; },
 *   step: (x, g, eta, out) => { out[0] = x[0] - (eta * g[0]) / w[0]; out[1] = x[1] - (eta * g[1]) / w[1]; return out; },
 *   contains: (x) => Number.isFinite(x[0]) && Number.isFinite(x[1]),
 * };
 * const learner = mirrorDescent({ geometry: weighted, initial: [0, 0], stepSize: 1 });
 * learner.update({ gradient: new Float64Array([1, 4]) }); // decision [-1, -1]
 * ```
 */
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
