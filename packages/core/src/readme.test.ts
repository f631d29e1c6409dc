import { readFileSync } from "node:fs";
import * as core from "@recede/core";
import { readmeSnippets, runSnippet } from "@recede/testkit";
import { describe, expect, it } from "vitest";

// The package README's code samples, run as written (imports bound to this package), so the
// documentation cannot rot; then the values they leave behind are checked.

const snippets = readmeSnippets(readFileSync(new URL("../README.md", import.meta.url), "utf8"));

describe("README samples", () => {
  it("has one sample, and it runs", async () => {
    expect(snippets.length).toBe(1);
    const out = await runSnippet(snippets[0], { "@recede/core": core });
    const ogd = out.ogd as core.MirrorDescentLearner;
    const hedge = out.hedge as core.MirrorDescentLearner;
    // OGD: x₂ = x₁ − η₁g with η₁ = 0.5/√1, inside the unit ball (Zinkevich 2003).
    expect(Array.from(ogd.decision())).toEqual([-0.5, 0.5]);
    // Hedge: p₂ ∝ p₁ e^{−ηℓ} (Cesa-Bianchi & Lugosi 2006, §2.1).
    const w = [1, 0, 0.5, 1].map((l) => Math.exp(-0.2 * l));
    const z = w.reduce((a, b) => a + b, 0);
    const p = hedge.decision();
    for (let i = 0; i < 4; i++) expect(p[i]).toBeCloseTo(w[i] / z, 15);
  });
});
