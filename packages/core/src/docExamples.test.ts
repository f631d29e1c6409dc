import { readFileSync } from "node:fs";
import * as core from "@recede/core";
import { describe, expect, it } from "vitest";

// Every `@example` in these files runs here, with the package's exports in scope, so the examples
// in the API docs cannot rot.
const files = [
  "divergence/geometry.ts",
  "divergence/euclidean.ts",
  "divergence/mahalanobis.ts",
  "divergence/entropy.ts",
  "divergence/positiveEntropy.ts",
  "divergence/diagonalGaussian.ts",
  "divergence/gaussian.ts",
  "learners/stepSize.ts",
  "learners/mirrorDescent.ts",
  "learners/dynamicMirrorDescent.ts",
  "learners/fixedShare.ts",
  "learners/affineDynamic.ts",
  "learners/hedge.ts",
  "learners/onlineGradientDescent.ts",
  "matrixInput.ts",
  "model.ts",
];

function examples(file: string): string[] {
  const src = readFileSync(new URL(`./${file}`, import.meta.url), "utf8");
  const out: string[] = [];
  const re = /@example\s*\n((?:\s*\*.*\n)*?)\s*\*\s*```ts\n((?:\s*\*.*\n)*?)\s*\*\s*```/g;
  for (let m = re.exec(src); m !== null; m = re.exec(src)) {
    out.push(
      m[2]
        .split("\n")
        .map((l) => l.replace(/^\s*\* ?/, ""))
        .join("\n"),
    );
  }
  return out;
}

describe("doc examples run", () => {
  const names = Object.keys(core);
  const values = Object.values(core);
  let total = 0;
  for (const file of files) {
    const ex = examples(file);
    total += ex.length;
    ex.forEach((code, i) => {
      it(`${file} example ${i + 1}`, () => {
        const run = new Function(...names, code);
        expect(() => run(...values)).not.toThrow();
      });
    });
  }
  it("found the examples", () => {
    expect(total).toBe(22);
  });
});
