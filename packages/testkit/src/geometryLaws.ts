/**
 * The law suite every Bregman geometry passes (one row per geometry).
 *
 * Sources of the laws: the definition and the three-point identity (Chen & Teboulle, "Convergence
 * Analysis of a Proximal-Like Minimization Algorithm Using Bregman Functions", SIAM J. Optim., 1993);
 * the mirror-step optimality condition and lemma (Beck & Teboulle, Oper. Res. Lett., 2003); see
 * MATH.md §2.1–2.2.
 *
 * @module
 */
import type { Geometry } from "@recede/core";
import fc from "fast-check";
import { stepSize as stepSizeArb } from "./arbitraries.js";
import {
  assertClose,
  assertFinite,
  assertThat,
  bitEqual,
  type Law,
  type LawRunOptions,
} from "./law.js";

/** One geometry under test. */
export interface GeometryLawRow {
  /** Label used in the law names. */
  readonly name: string;
  /** The geometry. */
  readonly geometry: Geometry;
  /** Points of the domain and feasible set (used for x, y, z, x_t and the comparator u). */
  readonly point: fc.Arbitrary<Float64Array>;
  /** Gradients g. Keep η‖g‖ moderate so logarithms of iterates stay finite. */
  readonly gradient: fc.Arbitrary<Float64Array>;
  /** Step sizes η. @defaultValue doubles in [1e-3, 2] */
  readonly stepSize?: fc.Arbitrary<number>;
  /**
   * How the unconstrained first-order condition ∇ψ(x⁺) = ∇ψ(x_t) − ηg holds:
   * `"exact"` (no feasible set), `"up-to-constant"` (the simplex: equal up to c·1, the normal
   * cone of the affine hull), or `"none"` (a projection may be active; only the variational
   * inequality is checked).
   */
  readonly firstOrder: "exact" | "up-to-constant" | "none";
  /** Check the simplex invariants (x⁺ ≥ 0, |Σx⁺ − 1| ≤ 1e-12). @defaultValue false */
  readonly simplex?: boolean;
  /** Relative tolerance of the identities. @defaultValue 1e-9 */
  readonly tolerance?: number;
}

function sumAbs(v: Float64Array): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += Math.abs(v[i]);
  return s;
}

/**
 * The geometry laws, one {@link Law} per (row, law): D ≥ 0 and D(x‖x) = 0; the three-point
 * identity D(x‖y) + D(y‖z) − D(x‖z) = ⟨∇ψ(z) − ∇ψ(y), x − y⟩; ∇ψ* ∘ ∇ψ = id on the domain; the
 * step stays in the domain (and on the simplex within 1e-12 when asked); the step's first-order
 * condition (exact or up to a constant); the variational inequality
 * ⟨ηg + ∇ψ(x⁺) − ∇ψ(x_t), u − x⁺⟩ ≥ 0 and the mirror-step lemma
 * η⟨g, x⁺ − u⟩ ≤ D(u‖x_t) − D(u‖x⁺) − D(x⁺‖x_t) for every feasible u; inputs are not mutated and
 * `out` may alias `x_t`.
 */
export function geometryLaws(rows: readonly GeometryLawRow[], run: LawRunOptions = {}): Law[] {
  const params = { numRuns: run.numRuns ?? 100, seed: run.seed };
  const laws: Law[] = [];
  for (const row of rows) {
    const geo = row.geometry;
    const n = geo.dimension;
    const rtol = row.tolerance ?? 1e-9;
    const eta = row.stepSize ?? stepSizeArb();
    const mk = <T extends unknown[]>(name: string, prop: fc.IRawProperty<T>): Law => ({
      name: `${row.name}: ${name}`,
      check: () => fc.assert(prop, params),
    });

    laws.push(
      mk(
        "D(x‖y) ≥ 0 and D(x‖x) = 0",
        fc.property(row.point, row.point, (x, y) => {
          const dxy = geo.divergence(x, y);
          assertThat(dxy >= 0, `D(x‖y) = ${dxy} < 0`);
          const dxx = geo.divergence(x, x);
          assertThat(Math.abs(dxx) <= 1e-12 * (1 + Math.abs(geo.potential(x))), `D(x‖x) = ${dxx}`);
        }),
      ),
    );

    laws.push(
      mk(
        "three-point identity",
        fc.property(row.point, row.point, row.point, (x, y, z) => {
          const gz = geo.mirrorMap(z, new Float64Array(n));
          const gy = geo.mirrorMap(y, new Float64Array(n));
          let rhs = 0;
          let scale = 0;
          for (let i = 0; i < n; i++) {
            const t = (gz[i] - gy[i]) * (x[i] - y[i]);
            rhs += t;
            scale += Math.abs(gz[i] * (x[i] - y[i])) + Math.abs(gy[i] * (x[i] - y[i]));
          }
          const a = geo.divergence(x, y);
          const b = geo.divergence(y, z);
          const c = geo.divergence(x, z);
          scale += a + b + c + Math.abs(geo.potential(x)) + Math.abs(geo.potential(y));
          scale += Math.abs(geo.potential(z));
          assertClose(
            a + b - c,
            rhs,
            1e-12,
            rtol,
            scale,
            "D(x‖y)+D(y‖z)−D(x‖z) vs ⟨∇ψ(z)−∇ψ(y), x−y⟩",
          );
        }),
      ),
    );

    laws.push(
      mk(
        "inverse mirror map undoes the mirror map",
        fc.property(row.point, (x) => {
          const th = geo.mirrorMap(x, new Float64Array(n));
          const back = geo.inverseMirrorMap(th, new Float64Array(n));
          const s = 1 + sumAbs(x);
          for (let i = 0; i < n; i++)
            assertClose(back[i], x[i], 1e-12, rtol, s, `∇ψ*(∇ψ(x))[${i}]`);
        }),
      ),
    );

    laws.push(
      mk(
        "mirror step: in the domain, first-order optimal, mirror-step lemma",
        fc.property(row.point, row.point, row.gradient, eta, (xt, u, g, h) => {
          const xp = geo.step(xt, g, h, new Float64Array(n));
          assertFinite(xp, "x⁺");
          assertThat(geo.contains(xp), `x⁺ = [${Array.from(xp)}] is outside the domain`);
          if (row.simplex) {
            let s = 0;
            for (let i = 0; i < n; i++) {
              assertThat(xp[i] >= 0, `x⁺[${i}] = ${xp[i]} < 0`);
              s += xp[i];
            }
            assertThat(Math.abs(s - 1) <= 1e-12, `Σx⁺ − 1 = ${s - 1}`);
          }
          const mp = geo.mirrorMap(xp, new Float64Array(n));
          const mt = geo.mirrorMap(xt, new Float64Array(n));
          // v = ηg + ∇ψ(x⁺) − ∇ψ(x_t): zero (exact), constant (simplex) or in the normal cone.
          const v = new Float64Array(n);
          let vscale = 0;
          for (let i = 0; i < n; i++) {
            v[i] = h * g[i] + mp[i] - mt[i];
            vscale = Math.max(vscale, Math.abs(h * g[i]), Math.abs(mp[i]), Math.abs(mt[i]));
          }
          if (row.firstOrder === "exact") {
            for (let i = 0; i < n; i++)
              assertClose(v[i], 0, 1e-12, rtol, vscale, `first-order[${i}]`);
          } else if (row.firstOrder === "up-to-constant") {
            for (let i = 1; i < n; i++)
              assertClose(v[i], v[0], 1e-12, rtol, vscale, `first-order[${i}] − [0]`);
          }
          let vi = 0;
          let viScale = 0;
          for (let i = 0; i < n; i++) {
            vi += v[i] * (u[i] - xp[i]);
            // Rounding in u − x⁺ is relative to |u| and |x⁺|, not to their difference.
            viScale += vscale * (Math.abs(u[i]) + Math.abs(xp[i]));
          }
          assertThat(
            vi >= -(1e-12 + rtol * viScale),
            `⟨ηg + ∇ψ(x⁺) − ∇ψ(x_t), u − x⁺⟩ = ${vi} < 0`,
          );
          let lhs = 0;
          let lScale = 0;
          for (let i = 0; i < n; i++) {
            lhs += h * g[i] * (xp[i] - u[i]);
            lScale += Math.abs(h * g[i]) * (Math.abs(xp[i]) + Math.abs(u[i]));
          }
          const d1 = geo.divergence(u, xt);
          const d2 = geo.divergence(u, xp);
          const d3 = geo.divergence(xp, xt);
          const rhs = d1 - d2 - d3;
          const scale = lScale + d1 + d2 + d3 + viScale + Math.abs(geo.potential(u));
          assertThat(
            lhs <= rhs + 1e-12 + rtol * scale,
            `η⟨g, x⁺ − u⟩ = ${lhs} > D(u‖x_t) − D(u‖x⁺) − D(x⁺‖x_t) = ${rhs}`,
          );
        }),
      ),
    );

    laws.push(
      mk(
        "inputs not mutated; out may alias x_t",
        fc.property(row.point, row.point, row.gradient, eta, (x, y, g, h) => {
          const x0 = x.slice();
          const y0 = y.slice();
          const g0 = g.slice();
          geo.potential(x);
          geo.divergence(x, y);
          geo.mirrorMap(x, new Float64Array(n));
          const fresh = geo.step(x, g, h, new Float64Array(n));
          assertThat(bitEqual(x, x0) && bitEqual(y, y0) && bitEqual(g, g0), "an input was mutated");
          geo.contains(x);
          assertThat(bitEqual(x, x0), "contains() mutated its input");
          const aliased = x.slice();
          const ret = geo.step(aliased, g, h, aliased);
          assertThat(ret === aliased, "step must return out");
          assertThat(bitEqual(aliased, fresh), "step with out = x_t differs from a separate out");
        }),
      ),
    );
  }
  return laws;
}
