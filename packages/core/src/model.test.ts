import { batchDynamics, type PointDynamics, requireControlBounds } from "@recede/core";
import { catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";

// A per-sample model of our own (a damped unicycle-like map, n = 3, m = 2) with its Jacobians.
const point: PointDynamics = {
  stateSize: 3,
  controlSize: 2,
  next(x, u, t, out) {
    out[0] = x[0] + 0.1 * Math.cos(x[2]) * u[0];
    out[1] = x[1] + 0.1 * Math.sin(x[2]) * u[0];
    out[2] = 0.9 * x[2] + 0.1 * u[1] + 0.01 * t;
  },
  jacobians(x, u, _t, a, b) {
    a.fill(0);
    b.fill(0);
    a[0] = 1;
    a[2] = -0.1 * Math.sin(x[2]) * u[0];
    a[4] = 1;
    a[5] = 0.1 * Math.cos(x[2]) * u[0];
    a[8] = 0.9;
    b[0] = 0.1 * Math.cos(x[2]);
    b[2] = 0.1 * Math.sin(x[2]);
    b[5] = 0.1;
  },
};

describe("batchDynamics", () => {
  it("equals per-sample calls at offsets and touches nothing outside its range", () => {
    const dyn = batchDynamics(point);
    expect([dyn.stateSize, dyn.controlSize]).toEqual([3, 2]);
    const count = 4;
    const xo = 2;
    const uo = 1;
    const x = new Float64Array(xo + count * 3 + 2).fill(-7);
    const u = new Float64Array(uo + count * 2 + 1).fill(-9);
    for (let i = 0; i < count * 3; i++) x[xo + i] = Math.sin(1 + i);
    for (let i = 0; i < count * 2; i++) u[uo + i] = Math.cos(2 + i);
    const expected: number[] = [];
    for (let k = 0; k < count; k++) {
      const out = new Float64Array(3);
      point.next(x.slice(xo + 3 * k, xo + 3 * k + 3), u.slice(uo + 2 * k, uo + 2 * k + 2), 5, out);
      expected.push(...out);
    }
    const u0 = u.slice();
    dyn.step(x, xo, u, uo, count, 5);
    expect(Array.from(x.subarray(xo, xo + count * 3))).toEqual(expected);
    expect([x[0], x[1], x[x.length - 2], x[x.length - 1]]).toEqual([-7, -7, -7, -7]);
    expect(Array.from(u)).toEqual(Array.from(u0));
  });

  it("passes the per-sample Jacobians through, and has none when the point model has none", () => {
    const dyn = batchDynamics(point);
    const a = new Float64Array(9);
    const b = new Float64Array(6);
    dyn.jacobians?.(new Float64Array([1, 2, 0.3]), new Float64Array([0.5, -1]), 0, a, b);
    expect(a[8]).toBe(0.9);
    expect(b[5]).toBe(0.1);
    expect(b[0]).toBe(0.1 * Math.cos(0.3));
    const { jacobians: _drop, ...plain } = point;
    expect(batchDynamics(plain).jacobians).toBeUndefined();
  });
});

describe("requireControlBounds", () => {
  it("returns copies and accepts open sides", () => {
    const lower = new Float64Array([-1, Number.NEGATIVE_INFINITY]);
    const upper = new Float64Array([1, 2]);
    const b = requireControlBounds("f", "bounds", { lower, upper }, 2);
    expect(Array.from(b.lower)).toEqual([-1, Number.NEGATIVE_INFINITY]);
    expect(Array.from(b.upper)).toEqual([1, 2]);
    lower[0] = 5;
    expect(b.lower[0]).toBe(-1);
  });

  it("rejects wrong types, sizes, NaN and crossed pairs with typed errors", () => {
    const ok = new Float64Array([0, 0]);
    catchRecedeError(() => requireControlBounds("f", "bounds", null as never, 2), {
      code: "type",
      fn: "f",
      arg: "bounds",
    });
    catchRecedeError(
      () => requireControlBounds("f", "bounds", { lower: [0, 0] as never, upper: ok }, 2),
      { code: "dimension", arg: "bounds.lower" },
    );
    catchRecedeError(
      () => requireControlBounds("f", "b", { lower: ok, upper: new Float64Array(3) }, 2),
      { code: "dimension", arg: "b.upper", message: "length 2" },
    );
    catchRecedeError(
      () =>
        requireControlBounds("f", "b", { lower: new Float64Array([0, Number.NaN]), upper: ok }, 2),
      { code: "range", arg: "b[1]" },
    );
    catchRecedeError(
      () =>
        requireControlBounds(
          "f",
          "b",
          { lower: new Float64Array([0, 1]), upper: new Float64Array([0, 0.5]) },
          2,
        ),
      { code: "range", arg: "b[1]", message: "[1, 0.5]" },
    );
  });
});
