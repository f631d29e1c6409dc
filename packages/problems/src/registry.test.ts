import { RecedeError } from "@recede/core";
import { describe, expect, it } from "vitest";
import { getProblem, type ProblemName, problemNames, problems } from "./registry.js";

describe("problem registry", () => {
  it("builds every registered problem under its own name", () => {
    expect(problemNames.length).toBeGreaterThanOrEqual(3);
    for (const name of problemNames) {
      const p = getProblem(name);
      expect(p.name).toBe(name);
      expect(problems[name]).toBeTypeOf("function");
    }
  });

  it("passes options through", () => {
    const p = getProblem("double-integrator", { axes: 3 });
    expect(p.stateSize).toBe(6);
  });

  it("rejects unknown names with the list of known ones", () => {
    expect(() => getProblem("acrobot" as ProblemName)).toThrow(RecedeError);
    expect(() => getProblem("acrobot" as ProblemName)).toThrow(/getProblem: name must be one of/);
  });
});
