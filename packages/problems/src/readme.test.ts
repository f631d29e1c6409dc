import { readFileSync } from "node:fs";
import * as problems from "@recede/problems";
import { readmeSnippets, runSnippet } from "@recede/testkit";
import { describe, expect, it } from "vitest";

// The package README's code sample, run as written (imports bound to this package), so the
// documentation cannot rot; then the values it leaves behind are checked against what it says.

const snippets = readmeSnippets(readFileSync(new URL("../README.md", import.meta.url), "utf8"));

describe("README samples", () => {
  it("has one sample, and it does what its comments say", async () => {
    expect(snippets.length).toBe(1);
    const out = await runSnippet(snippets[0], { "@recede/problems": problems });
    const x = out.x as Float64Array;
    const c = out.c as Float64Array;
    // Started hanging at (0, 0, π, 0); one 0.02 s step under F = 3 N moves the cart forward.
    expect(x[0]).toBeGreaterThan(0);
    expect(x[1]).toBeGreaterThan(0);
    expect(Math.abs(x[2] - Math.PI)).toBeLessThan(0.01);
    // The running cost of the hanging state: Q on wrap(θ) = π dominates (weights from the options).
    expect(c[0]).toBeGreaterThan(0);
    const fresh = problems.cartPole();
    const c2 = new Float64Array(1);
    fresh.cost.running(fresh.initialState(), 0, new Float64Array([3]), 0, 1, 0, c2, 0);
    expect(c[0]).toBe(c2[0]);
  });
});
