import { readFileSync } from "node:fs";
import * as core from "@recede/core";
import * as pg from "@recede/policy-gradient";
import { lqrPolicyProblem } from "@recede/policy-gradient";
import * as problems from "@recede/problems";
import { readmeSnippets, runSnippet } from "@recede/testkit";
import { describe, expect, it } from "vitest";

// The README's samples, run as written (imports bound to the packages), so the documentation
// cannot rot; then what they promise is checked. The second sample continues the first: it is
// given the first one's `env` and, as `expert`, the LQR gain K* of the double integrator from
// scipy.linalg.solve_discrete_are (fixture lqr_gradient.json, "double-integrator"; Δt = 0.1,
// Q = I, R = 0.1 — the README's problem uses the same defaults).
const snippets = readmeSnippets(readFileSync(new URL("../README.md", import.meta.url), "utf8"));
const fixture = JSON.parse(
  readFileSync(new URL("../fixtures/lqr_gradient.json", import.meta.url), "utf8"),
) as { dare: { name: string; K: number[][] }[] };
const dare = fixture.dare.find((d) => d.name === "double-integrator");
if (dare === undefined) throw new Error("fixture entry missing");
const kStar = dare.K.flat();
const modules = {
  "@recede/core": core,
  "@recede/policy-gradient": pg,
  "@recede/problems": problems,
};

describe("documentation examples", () => {
  let first: Record<string, unknown> = {};

  it("README: train a policy (the trained policy beats its initial one)", async () => {
    expect(snippets.length).toBe(2);
    first = await runSnippet(snippets[0], modules);
    const env = first.env as pg.RolloutEnvironment;
    const policy = first.policy as pg.StochasticPolicy;
    const before = env.evaluate(
      pg.policyActor(policy, policy.initialParameters()),
      10,
      core.createStream(1),
    ).mean;
    const after = env.evaluate(first.controller as pg.Actor, 10, core.createStream(1)).mean;
    expect(after).toBeLessThan(before);
  });

  it("README: distil an expert with DAgger (8 rounds, one episode each)", async () => {
    const expert: pg.Actor = { act: (s) => [-(kStar[0] * s[0] + kStar[1] * s[1])] };
    const env = first.env ?? (await runSnippet(snippets[0], modules)).env;
    const out = await runSnippet(snippets[1], modules, { env, expert });
    const result = out.result as pg.ImitationResult;
    expect(result.rounds.length).toBe(8);
    expect(result.parameters.every(Number.isFinite)).toBe(true);
    expect(result.labels).toBeGreaterThan(0);
  });

  it("lqrPolicyProblem example: Gauss–Newton from K = [1, 1.5] reaches the DARE gain", () => {
    const lqr = lqrPolicyProblem({
      a: [
        [1, 0.1],
        [0, 1],
      ],
      b: [[0.005], [0.1]],
      q: [
        [1, 0],
        [0, 1],
      ],
      r: [[0.1]],
    });
    let k: Float64Array = new Float64Array([1, 1.5]);
    for (let i = 0; i < 50; i++) k = lqr.step(k, "gauss-newton", 0.5);
    // DARE gain from scipy.linalg.solve_discrete_are (fixture lqr_gradient.json, "double-integrator")
    expect(k[0]).toBeCloseTo(kStar[0], 9);
    expect(k[1]).toBeCloseTo(kStar[1], 9);
  });
});
