import { readFileSync } from "node:fs";
import * as core from "@recede/core";
import * as regret from "@recede/regret";
import { readmeSnippets, runSnippet } from "@recede/testkit";
import { describe, expect, it } from "vitest";

// The package README's quick start, run as written (imports bound to the packages), so the
// documentation cannot rot; then the claims in its comments are checked.

const snippets = readmeSnippets(readFileSync(new URL("../README.md", import.meta.url), "utf8"));

describe("README samples", () => {
  it("the quick start runs; measured regret is under the printed bound", async () => {
    const quiet = { log: () => {} };
    const out = await runSnippet(
      snippets[0],
      { "@recede/core": core, "@recede/regret": regret },
      { console: quiet },
    );
    const s = out.s as regret.RegretSummary;
    const bound = out.bound as number;
    const T = out.T as number;
    const N = out.N as number;
    // √((T/2) ln N) (Cesa-Bianchi & Lugosi 2006, Thm 2.2), as the sample's comment says.
    expect(bound).toBeCloseTo(Math.sqrt((T / 2) * Math.log(N)), 12);
    expect(s.rounds).toBe(T);
    expect(s.linear?.regret).toBeLessThanOrEqual(bound);
    expect((out.csv as string).split("\n")[0]).toBe("round,loss,cumulativeLoss,linearRegret");
    expect(out.svg as string).toMatch(/^<svg[\s\S]*<\/svg>\s*$/);
  });

  it("the second sample needs @recede/mpc, which this package does not depend on", () => {
    // It was run by hand against the workspace sources in review (2026-12-02, it ran); here we pin
    // that it is the only sample left out and which packages it needs.
    expect(snippets.length).toBe(2);
    const mods = new Set(snippets[1].imports.map(([m]) => m));
    expect([...mods].sort()).toEqual(["@recede/mpc", "@recede/problems", "@recede/regret"]);
  });
});
