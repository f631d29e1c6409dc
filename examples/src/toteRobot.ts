/**
 * Example scenario (our own): a warehouse tote robot drives from its charging spot down an aisle
 * between two racks to a pick station while a picker walks across the aisle, controlled by MPPI
 * from @recede/mpc on the kinematic-bicycle model of @recede/problems.
 *
 * The racks are rows of discs (static obstacles of the bicycle problem); the picker is a moving
 * disc with a constant-velocity prediction (`circleObstacles` with a clock, set to the episode time
 * before every control step). Run it: `node examples/dist/toteRobot.js`.
 * Invented data for a demonstration; not a validated robot controller. On real machines: simulate
 * first, enforce actuator limits, keep an independent emergency stop, follow the applicable safety
 * standards.
 *
 * @module
 */
import { pathToFileURL } from "node:url";
import { mppi } from "@recede/mpc";
import { bicycle, type CircleObstacle, circleObstacles, sumCosts } from "@recede/problems";

/** Options of {@link runToteRobot}. */
export interface ToteRobotOptions {
  /** MPPI samples K. @defaultValue 256 */
  readonly samples?: number;
  /** Control steps (0.1 s each). @defaultValue the problem's episode length */
  readonly steps?: number;
  /** Seed. @defaultValue 1 */
  readonly seed?: number;
}

/** What the run reports. */
export interface ToteRobotResult {
  /** Final distance to the pick station, m. */
  readonly distanceToGoal: number;
  /** Smallest clearance to a rack or the picker along the way (surface to robot centre), m. */
  readonly minClearance: number;
  /** Whether the bicycle problem's success test held (at the goal, slow, for its hold time). */
  readonly success: boolean;
  /** Steps simulated. */
  readonly steps: number;
}

/** Racks: two rows of 0.45 m discs along y = ±1.4 m from x = 1.5 m to 7.5 m. */
export const RACKS: readonly CircleObstacle[] = Array.from({ length: 14 }, (_, i) => ({
  x: 1.5 + (i % 7),
  y: i < 7 ? 1.4 : -1.4,
  radius: 0.45,
}));

/** The picker: starts beside the upper rack at x = 5 and walks down across the aisle at 0.4 m/s. */
export const PICKER: CircleObstacle = { x: 5, y: 0.9, radius: 0.35, vx: 0, vy: -0.4 };

const GOAL: readonly [number, number] = [9.5, 0];

/** Run the tote robot to the pick station. */
export function runToteRobot(options: ToteRobotOptions = {}): ToteRobotResult {
  const problem = bicycle({
    goal: GOAL,
    obstacles: RACKS,
    initialState: [0, 0, 0, 0],
    episodeLength: 150,
  });
  const dt = problem.dt;
  const horizon = problem.horizon;
  const picker = circleObstacles({
    stateSize: 4,
    controlSize: 2,
    obstacles: [PICKER],
    dt,
    horizon,
  });
  const controller = mppi({
    dynamics: problem.dynamics,
    cost: sumCosts(problem.cost, picker),
    horizon,
    samples: options.samples ?? 256,
    temperature: 1,
    noise: [0.8, 0.3],
    correlation: 0.5,
    keepMeanSample: true,
    bounds: problem.bounds,
    seed: options.seed ?? 1,
  });
  const steps = options.steps ?? problem.episodeLength;
  const n = problem.stateSize;
  const states = new Float64Array((steps + 1) * n);
  const x = problem.initialState();
  states.set(x, 0);
  const u = new Float64Array(2);
  let minClearance = Number.POSITIVE_INFINITY;
  for (let t = 0; t < steps; t++) {
    picker.setTime(t * dt);
    u.set(controller.act(x).control);
    problem.dynamics.step(x, 0, u, 0, 1, t);
    states.set(x, (t + 1) * n);
    const time = (t + 1) * dt;
    for (const o of [...RACKS, PICKER]) {
      const ox = o.x + (o.vx ?? 0) * time;
      const oy = o.y + (o.vy ?? 0) * time;
      minClearance = Math.min(minClearance, Math.hypot(x[0] - ox, x[1] - oy) - o.radius);
    }
  }
  return {
    distanceToGoal: Math.hypot(x[0] - GOAL[0], x[1] - GOAL[1]),
    minClearance,
    success: problem.success(states, steps + 1),
    steps,
  };
}

const isMain =
  process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (isMain) {
  const r = runToteRobot();
  console.log(
    `tote robot: ${r.success ? "reached the pick station" : "did NOT reach the pick station"} — ${r.distanceToGoal.toFixed(2)} m from it, closest approach to a rack or the picker ${r.minClearance.toFixed(2)} m`,
  );
}
