import { RecedeError } from "@recede/core";
import { describe, expect, it } from "vitest";
import { circleObstacles } from "./circleObstacles.js";
import { quadraticCost } from "./quadraticCost.js";
import { stateLimitPenalty } from "./stateLimitPenalty.js";
import { sumCosts } from "./sumCosts.js";

describe("quadraticCost", () => {
  it("evaluates (x−r)ᵀQ(x−r) + (u−ū)ᵀR(u−ū) for full and diagonal weights", () => {
    const full = quadraticCost({
      stateSize: 2,
      controlSize: 1,
      q: [
        [2, 1],
        [1, 3],
      ],
      r: 0.5,
      reference: [1, -1],
      controlReference: [2],
    });
    const out = new Float64Array([10]);
    full.running(new Float64Array([2, 1]), 0, new Float64Array([0]), 0, 1, 0, out, 0);
    // e = (1, 2): 2·1 + 2·1·2 + 3·4 = 18; control: 0.5·4 = 2; accumulated onto 10
    expect(out[0]).toBe(30);
    const diag = quadraticCost({ stateSize: 2, controlSize: 1, q: [1, 0.1], r: 0.01 });
    const o2 = new Float64Array(1);
    diag.running(new Float64Array([1, 0]), 0, new Float64Array([2]), 0, 1, 0, o2, 0);
    expect(o2[0]).toBeCloseTo(1.04, 15);
  });

  it("wraps angle errors into (−π, π]", () => {
    const c = quadraticCost({
      stateSize: 1,
      controlSize: 1,
      q: 1,
      r: 0,
      reference: [Math.PI],
      angleIndices: [0],
    });
    const out = new Float64Array(2);
    c.terminal(new Float64Array([-Math.PI + 0.1, 3 * Math.PI - 0.2]), 0, 2, out, 0);
    expect(out[0]).toBeCloseTo(0.01, 12);
    expect(out[1]).toBeCloseTo(0.04, 12);
  });

  it("follows a reference trajectory, moved by setStart, with the terminal row at start + horizon", () => {
    const c = quadraticCost({
      stateSize: 1,
      controlSize: 1,
      q: 1,
      r: 0,
      qf: 10,
      reference: [0, 1, 2, 3, 4],
      horizon: 2,
    });
    const x = new Float64Array([0]);
    const u = new Float64Array(1);
    const at = (t: number) => {
      const o = new Float64Array(1);
      c.running(x, 0, u, 0, 1, t, o, 0);
      return o[0];
    };
    const term = () => {
      const o = new Float64Array(1);
      c.terminal(x, 0, 1, o, 0);
      return o[0];
    };
    expect([at(0), at(1), at(2), at(9)]).toEqual([0, 1, 4, 16]);
    expect(term()).toBe(40); // row 2
    c.setStart(2);
    expect([at(0), at(1), at(5)]).toEqual([4, 9, 16]);
    expect(term()).toBe(160); // row min(4, 4)
    expect(() => c.setStart(-1)).toThrow(RecedeError);
  });

  it("replaces the reference in place, keeping the old one on bad input", () => {
    const c = quadraticCost({ stateSize: 2, controlSize: 1, q: 1, r: 1, reference: [1, 1] });
    const cost = () => {
      const o = new Float64Array(1);
      c.running(new Float64Array([0, 0]), 0, new Float64Array([0]), 0, 1, 0, o, 0);
      return o[0];
    };
    expect(cost()).toBe(2);
    c.setReference([3, 0], [2]);
    expect(cost()).toBe(9 + 4);
    expect(() => c.setReference([1, 2, 3])).toThrow(
      /QuadraticCost.setReference: reference must be of length 2/,
    );
    expect(() => c.setReference([0, 0], [Number.NaN])).toThrow(/controlReference\[0\]/);
    expect(cost()).toBe(13); // untouched by the failed calls
  });

  it("rejects bad weights and references with typed errors naming the option", () => {
    expect(() => quadraticCost({ stateSize: 2, controlSize: 1, q: [1, 2, 3], r: 1 })).toThrow(
      /quadraticCost: q must be a diagonal of length 2/,
    );
    expect(() =>
      quadraticCost({
        stateSize: 2,
        controlSize: 1,
        q: [
          [1, 2],
          [0, 1],
        ],
        r: 1,
      }),
    ).toThrow(/quadraticCost: q must be symmetric/);
    expect(() => quadraticCost({ stateSize: 2, controlSize: 1, q: 1, r: -1 })).toThrow(
      /r must be positive semidefinite/,
    );
    expect(() =>
      quadraticCost({ stateSize: 2, controlSize: 1, q: 1, r: 1, reference: [1, 2, 3] }),
    ).toThrow(/reference must be a length that is a positive multiple of 2/);
    expect(() =>
      quadraticCost({ stateSize: 2, controlSize: 1, q: 1, r: 1, angleIndices: [2] }),
    ).toThrow(/angleIndices/);
  });
});

describe("stateLimitPenalty and sumCosts", () => {
  it("charges w·excess² + violationCost outside the limits only", () => {
    const pen = stateLimitPenalty({
      stateSize: 2,
      controlSize: 1,
      limits: [{ index: 0, lower: -1, upper: 2, weight: 3, violationCost: 5 }],
      terminal: false,
    });
    const x = new Float64Array([0, 9, 2.5, 0, -3, 0]);
    const out = new Float64Array(3);
    pen.running(x, 0, new Float64Array(3), 0, 3, 0, out, 0);
    expect(Array.from(out)).toEqual([0, 3 * 0.25 + 5, 3 * 4 + 5]);
    pen.terminal(x, 0, 3, out, 0);
    expect(Array.from(out)).toEqual([0, 3 * 0.25 + 5, 3 * 4 + 5]);
    expect(() =>
      stateLimitPenalty({
        stateSize: 2,
        controlSize: 1,
        limits: [{ index: 0, lower: 1, upper: 0, weight: 1 }],
      }),
    ).toThrow(/limits\[0\] must be lower ≤ upper/);
  });

  it("sums terms and checks their sizes", () => {
    const a = quadraticCost({ stateSize: 2, controlSize: 1, q: 1, r: 0 });
    const b = quadraticCost({ stateSize: 2, controlSize: 1, q: 0, r: 1 });
    const ab = quadraticCost({ stateSize: 2, controlSize: 1, q: 1, r: 1 });
    const s = sumCosts(a, b);
    const x = new Float64Array([0.3, -2]);
    const u = new Float64Array([1.7]);
    const o1 = new Float64Array(1);
    const o2 = new Float64Array(1);
    s.running(x, 0, u, 0, 1, 0, o1, 0);
    ab.running(x, 0, u, 0, 1, 0, o2, 0);
    expect(o1[0]).toBeCloseTo(o2[0], 14);
    expect(() => sumCosts()).toThrow(/sumCosts: terms/);
    expect(() => sumCosts(a, quadraticCost({ stateSize: 3, controlSize: 1, q: 1, r: 1 }))).toThrow(
      /terms\[1\] must be a cost with stateSize 2/,
    );
  });
});

describe("circleObstacles", () => {
  it("moves obstacles at constant velocity along the horizon and with setTime", () => {
    const c = circleObstacles({
      stateSize: 2,
      controlSize: 1,
      obstacles: [{ x: 0, y: 0, radius: 1, vx: 1 }],
      clearance: 0,
      weight: 1,
      collisionCost: 10,
      dt: 0.5,
      horizon: 4,
    });
    const x = new Float64Array([2, 0]);
    const u = new Float64Array(1);
    const at = (t: number) => {
      const o = new Float64Array(1);
      c.running(x, 0, u, 0, 1, t, o, 0);
      return o[0];
    };
    expect(at(0)).toBe(0); // centre at 0: distance 2
    expect(at(2)).toBeCloseTo(0, 15); // centre at 1: distance 1, on the rim
    expect(at(3)).toBeCloseTo(0.25 + 10, 12); // centre at 1.5: 0.5 inside
    c.setTime(1.5);
    expect(c.time).toBe(1.5);
    expect(at(0)).toBeCloseTo(0.25 + 10, 12);
    const term = new Float64Array(1);
    c.terminal(x, 0, 1, term, 0); // centre at 1.5 + 4·0.5 = 3.5: distance 1.5
    expect(term[0]).toBe(0);
    expect(() => c.setTime(Number.NaN)).toThrow(/CircleObstaclesCost.setTime/);
  });
});
