import { describe, expect, it } from "vitest";
import { runGantryCrane } from "./gantryCrane.js";
import { runToteRobot } from "./toteRobot.js";

// Smoke tests: each example runs end to end and meets its own scenario's goal on a fixed seed.
// (Invented scenarios: these check that the examples work, not the numerics, which the packages'
// reference tests cover.)
describe("examples", () => {
  it("harbour gantry crane: the container settles over the truck without sway", () => {
    const r = runGantryCrane({ steps: 200, seed: 1 });
    expect(r.success).toBe(true);
    expect(r.positionError).toBeLessThan(0.2);
    expect(r.swayDegrees).toBeLessThan(1);
    expect(r.maxSwayDegrees).toBeLessThan(20);
  });

  it("warehouse tote robot: reaches the pick station without touching a rack or the picker", () => {
    const r = runToteRobot({ seed: 1 });
    expect(r.success).toBe(true);
    expect(r.minClearance).toBeGreaterThan(0);
  });

  it("rejects a non-positive rope length with a typed error", () => {
    expect(() => runGantryCrane({ ropeLength: 0 })).toThrow(
      /runGantryCrane: ropeLength must be > 0/,
    );
  });
});
