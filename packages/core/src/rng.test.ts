import { createStream } from "@recede/core";
import { describe, expect, it } from "vitest";

describe("createStream", () => {
  it("gives bit-identical streams for the same seed", () => {
    const a = new Float64Array(101);
    const b = new Float64Array(101);
    createStream(7).fillNormal(a, 0, 101);
    createStream(7).fillNormal(b, 0, 101);
    expect(Array.from(a)).toEqual(Array.from(b));
  });
});
