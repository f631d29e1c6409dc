/**
 * Example scenario (our own): a harbour gantry crane moves a container along its rail and stops it
 * over the truck without sway, controlled by MPPI from @recede/mpc.
 *
 * Model (cart with a hanging point-mass load on a rigid rope; Newton–Euler equations, common
 * practice): state (x, v, φ, ω) with x the trolley position, φ the rope angle from vertical,
 * control F the trolley force in kN:
 *
 *   (M + m − m cos²φ) ẍ = F + m g sin φ cos φ + m L ω² sin φ
 *   L φ̈ = −(ẍ cos φ + g sin φ)
 *
 * integrated by RK4 at the control period. Run it: `node examples/dist/gantryCrane.js`.
 * Invented data for a demonstration; not a validated crane controller. On real machines: simulate
 * first, enforce actuator limits, keep an independent emergency stop, follow the applicable safety
 * standards.
 *
 * @module
 */
import { pathToFileURL } from "node:url";
import { type CostModel, type Dynamics, RecedeError } from "@recede/core";
import { mppi } from "@recede/mpc";

/** Options of {@link runGantryCrane}. */
export interface GantryCraneOptions {
  /** Distance to travel along the rail, m. @defaultValue 20 */
  readonly distance?: number;
  /** Rope length L, m. @defaultValue 15 */
  readonly ropeLength?: number;
  /** Control steps (0.1 s each). @defaultValue 300 */
  readonly steps?: number;
  /** MPPI samples K. @defaultValue 256 */
  readonly samples?: number;
  /** MPPI horizon H (steps). @defaultValue 50 */
  readonly horizon?: number;
  /** Seed. @defaultValue 1 */
  readonly seed?: number;
}

/** What the crane run reports. */
export interface GantryCraneResult {
  /** Final distance to the target, m. */
  readonly positionError: number;
  /** Final sway angle, degrees. */
  readonly swayDegrees: number;
  /** Largest sway angle during the transfer, degrees. */
  readonly maxSwayDegrees: number;
  /** Final trolley speed, m/s. */
  readonly speed: number;
  /** First time (s) from which position error < 0.2 m and sway < 1° held to the end (NaN if never). */
  readonly settledAt: number;
  /** True when settled: the container can be set down. */
  readonly success: boolean;
}

const TROLLEY = 5; // t
const CONTAINER = 20; // t
const G = 9.81;
const DT = 0.1;
const FORCE_LIMIT = 30; // kN

/** The crane's batched model (units: t, m, s, kN → accelerations in m/s²). */
export function craneDynamics(ropeLength: number): Dynamics {
  const L = ropeLength;
  const k = new Float64Array(16);
  const s = new Float64Array(4);
  const field = (x: Float64Array, o: number, f: number, out: Float64Array, oo: number): void => {
    const phi = x[o + 2];
    const om = x[o + 3];
    const c = Math.cos(phi);
    const sn = Math.sin(phi);
    const acc =
      (f + CONTAINER * G * sn * c + CONTAINER * L * om * om * sn) /
      (TROLLEY + CONTAINER - CONTAINER * c * c);
    out[oo] = x[o + 1];
    out[oo + 1] = acc;
    out[oo + 2] = om;
    out[oo + 3] = -(acc * c + G * sn) / L;
  };
  return {
    stateSize: 4,
    controlSize: 1,
    step(x, xo, u, uo, count): void {
      for (let i = 0; i < count; i++) {
        const b = xo + 4 * i;
        const f = u[uo + i];
        field(x, b, f, k, 0);
        for (let j = 0; j < 4; j++) s[j] = x[b + j] + 0.5 * DT * k[j];
        field(s, 0, f, k, 4);
        for (let j = 0; j < 4; j++) s[j] = x[b + j] + 0.5 * DT * k[4 + j];
        field(s, 0, f, k, 8);
        for (let j = 0; j < 4; j++) s[j] = x[b + j] + DT * k[8 + j];
        field(s, 0, f, k, 12);
        for (let j = 0; j < 4; j++)
          x[b + j] += (DT / 6) * (k[j] + 2 * k[4 + j] + 2 * k[8 + j] + k[12 + j]);
      }
    },
  };
}

/** Swing-free transfer cost: 0.2 (x − target)² + v² + 300 φ² + 50 ω² + 1e-4 F², terminal ×10. */
export function craneCost(target: number): CostModel {
  const q = (x: Float64Array, b: number): number => {
    const e = x[b] - target;
    return 0.2 * e * e + x[b + 1] * x[b + 1] + 300 * x[b + 2] * x[b + 2] + 50 * x[b + 3] * x[b + 3];
  };
  return {
    stateSize: 4,
    controlSize: 1,
    running(x, xo, u, uo, count, _t, out, oo): void {
      for (let i = 0; i < count; i++)
        out[oo + i] += q(x, xo + 4 * i) + 1e-4 * u[uo + i] * u[uo + i];
    },
    terminal(x, xo, count, out, oo): void {
      for (let i = 0; i < count; i++) out[oo + i] += 10 * q(x, xo + 4 * i);
    },
  };
}

/** Run the crane transfer and report how it settled. */
export function runGantryCrane(options: GantryCraneOptions = {}): GantryCraneResult {
  const distance = options.distance ?? 20;
  const ropeLength = options.ropeLength ?? 15;
  const steps = options.steps ?? 300;
  if (!(ropeLength > 0))
    throw new RecedeError("range", "runGantryCrane", "ropeLength", "> 0", ropeLength);
  const dynamics = craneDynamics(ropeLength);
  const controller = mppi({
    dynamics,
    cost: craneCost(distance),
    horizon: options.horizon ?? 50,
    samples: options.samples ?? 256,
    temperature: 0.5,
    noise: 5,
    correlation: 0.5,
    keepMeanSample: true,
    bounds: { lower: new Float64Array([-FORCE_LIMIT]), upper: new Float64Array([FORCE_LIMIT]) },
    seed: options.seed ?? 1,
  });
  const x = new Float64Array(4);
  const u = new Float64Array(1);
  let maxSway = 0;
  let settledAt = Number.NaN;
  for (let t = 0; t < steps; t++) {
    u[0] = controller.act(x).control[0];
    dynamics.step(x, 0, u, 0, 1, t);
    maxSway = Math.max(maxSway, Math.abs(x[2]));
    const settled = Math.abs(x[0] - distance) < 0.2 && Math.abs(x[2]) < (Math.PI / 180) * 1;
    if (settled && Number.isNaN(settledAt)) settledAt = (t + 1) * DT;
    if (!settled) settledAt = Number.NaN;
  }
  const deg = 180 / Math.PI;
  return {
    positionError: Math.abs(x[0] - distance),
    swayDegrees: Math.abs(x[2]) * deg,
    maxSwayDegrees: maxSway * deg,
    speed: Math.abs(x[1]),
    settledAt,
    success: !Number.isNaN(settledAt) && Math.abs(x[1]) < 0.1,
  };
}

const isMain =
  process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (isMain) {
  const r = runGantryCrane();
  console.log(
    `gantry crane: ${r.success ? "container settled" : "did NOT settle"} — error ${r.positionError.toFixed(3)} m, sway ${r.swayDegrees.toFixed(2)}° (max ${r.maxSwayDegrees.toFixed(1)}°), settled at ${r.settledAt.toFixed(1)} s`,
  );
}
