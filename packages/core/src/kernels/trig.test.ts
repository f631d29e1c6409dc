import { readFileSync } from "node:fs";
import { kernels } from "@recede/core";
import { describe, expect, it } from "vitest";

// The `@example` blocks of trig.ts run here with `kernels` in scope (as a user imports it), and
// the values their comments state are checked (sin 0.5, cos 0.5 from memory; the outside check of
// the kernel is trig.ref.test.ts against NumPy).
function examples(): string[] {
  const src = readFileSync(new URL("./trig.ts", import.meta.url), "utf8");
  const out: string[] = [];
  const re = /@example\s*\n\s*\*\s*```ts\n((?:\s*\*.*\n)*?)\s*\*\s*```/g;
  for (let m = re.exec(src); m !== null; m = re.exec(src)) {
    out.push(
      m[1]
        .split("\n")
        .map((l) => l.replace(/^\s*\* ?/, ""))
        .join("\n"),
    );
  }
  return out;
}

describe("trig.ts doc examples", () => {
  const ex = examples();

  it("there are two, one per function", () => {
    expect(ex).toHaveLength(2);
  });

  it("kernels.sinCos(0.5, sc, 0) writes sin 0.5 and cos 0.5", () => {
    const sc = new Function("kernels", `${ex[0]}\nreturn sc;`)(kernels) as Float64Array;
    expect(sc[0]).toBeCloseTo(0.479425538604203, 15);
    expect(sc[1]).toBeCloseTo(0.8775825618903728, 15);
  });

  it("kernels.sinCosInPlace on π/6 gives ≈ (0.5, 0.866)", () => {
    const sc = new Function("kernels", `${ex[1]}\nreturn sc;`)(kernels) as Float64Array;
    expect(sc[0]).toBeCloseTo(0.5, 15);
    expect(sc[1]).toBeCloseTo(Math.sqrt(3) / 2, 15);
  });
});
