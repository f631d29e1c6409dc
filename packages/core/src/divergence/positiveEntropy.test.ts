import { positiveEntropy } from "@recede/core";
import { catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";

describe("positiveEntropy (orthant)", () => {
  it("step is the unnormalized multiplicative update x e^{−ηg} (Kivinen & Warmuth 1997, EGU)", () => {
    const geo = positiveEntropy({ dimension: 3 });
    const out = geo.step(
      new Float64Array([1, 2, 3]),
      new Float64Array([Math.LN2, 0, -1]),
      1,
      new Float64Array(3),
    );
    expect(out[0]).toBeCloseTo(0.5, 15);
    expect(out[1]).toBe(2);
    expect(out[2]).toBeCloseTo(3 * Math.E, 14);
    expect(geo.divergence(new Float64Array([1, 1, 1]), new Float64Array([1, 1, 1]))).toBe(0);
    expect(geo.divergence(new Float64Array([2, 1, 1]), new Float64Array([1, 1, 1]))).toBeCloseTo(
      2 * Math.LN2 - 1,
      15,
    );
  });
  it("an overflowing or underflowing step is outside the domain (contains is false)", () => {
    const geo = positiveEntropy({ dimension: 1 });
    expect(
      geo.contains(
        geo.step(new Float64Array([1]), new Float64Array([-1e6]), 1, new Float64Array(1)),
      ),
    ).toBe(false);
    expect(
      geo.contains(
        geo.step(new Float64Array([1]), new Float64Array([1e6]), 1, new Float64Array(1)),
      ),
    ).toBe(false);
  });
  it("rejects bad options", () => {
    catchRecedeError(() => positiveEntropy({ dimension: -1 }), {
      code: "range",
      fn: "positiveEntropy",
      arg: "dimension",
    });
  });
});
