/**
 * `pnpm demo`: the rooftop parcel drone in gusts. Runs MPPI, CEM, a derived variant (step size
 * γ < 1 with covariance adaptation), LQR about hover and a policy distilled from the MPPI expert by
 * DAgger over a handful of seeds, prints the summary table and writes out/demo/.
 *
 * @module
 */
import { rmSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { createStream } from "@recede/core";
import { writeSweepOutputs } from "../outputs.js";
import { currentMeta, fmt, summaryTable, textTable } from "../report.js";
import { summarize } from "../summary.js";
import { runSweep } from "../sweep.js";
import { gustChart, landingChart, touchdownChart } from "./charts.js";
import {
  DRONE_PARAMETERS,
  DRONE_THRESHOLDS,
  DRONE_WEIGHTS,
  drawWind,
  droneParams,
} from "./drone.js";

/** Column titles of the scenario metrics. */
const METRIC_LABELS: Readonly<Record<string, string>> = {
  landed: "seeds landed",
  landingTime: "landing time (s)",
  missDistance: "miss distance (m)",
  touchdownSpeed: "touchdown speed (m/s)",
  touchdownTilt: "touchdown tilt (°)",
};

/** Options of {@link runDemo}. */
export interface DemoOptions {
  /** Output folder. @defaultValue "out/demo" */
  readonly outDir?: string;
  /** Reduced setting for CI: 2 seeds, shorter horizons, fewer samples. @defaultValue false */
  readonly quick?: boolean;
  /** Worker threads. @defaultValue all cores */
  readonly workers?: number;
  /** Command line for the report's meta block. */
  readonly command?: string;
  /** Print the summary table to stdout. @defaultValue true */
  readonly print?: boolean;
}

/** Files the demo writes (paths). */
export interface DemoFiles {
  readonly reportHtml: string;
  readonly reportMd: string;
  readonly resultsJsonl: string;
  readonly sweepJson: string;
  readonly charts: readonly string[];
}

/** Control steps each sampling controller runs at setup before its episode (see `warmup`). */
const WARMUP_STEPS = 10;

/**
 * The demo's sweep, as a sweep file would state it.
 *
 * Why these settings (full setting; `quick` shrinks samples, seeds and flight for CI). The numbers
 * behind each choice are in the report's "Why these settings" section (`TUNING_NOTES` below).
 * - K = 1024 samples for MPPI and the variant, 3 × 512 for CEM: with fewer, CEM in particular
 *   missed more seeds; 1024 cost about 6 ms per control step on one core, an eighth of the 50 ms
 *   control period.
 * - Horizon H = 30 (1.5 s): long enough to see the touchdown from the last metre and a half, where
 *   the landing is decided.
 * - Temperature λ = 10 with white noise σ = 2 N per rotor: one of the two pairings that landed
 *   every seed in the tuning runs, and the one that landed sooner; time-correlated noise banks
 *   hard.
 * - CEM: σ = 3 N, elite fraction 0.1, 3 iterations, the spread reset to σ after each shift.
 * - The variant: MPPI's loss with γ = 0.7 and the covariance adapted by the same step, floor
 *   0.3 N.
 * - Every sampling controller is warmed up for 10 control steps at setup, so compute times show
 *   the steady state (the flight itself is unchanged).
 * - LQR: the DARE gain about hover tracking a glide path (a moving setpoint with a simple
 *   reference governor), saturated to the thrust limits.
 * - DAgger: an affine policy, expert MPPI (labelling with K = 256 to keep training short), 4 rounds
 *   of 2 episodes on the wind-free model with a small random state disturbance (std 0.03 per
 *   component and step), so the learner also sees, and is taught to correct, states off the
 *   expert's own path.
 */
export function demoSweep(quick: boolean): Record<string, unknown> {
  const samples = quick ? 192 : 1024;
  const horizon = quick ? 20 : 30;
  const warmup = quick ? 2 : WARMUP_STEPS;
  return {
    $comment:
      "The rooftop parcel drone demo (pnpm demo). Run it yourself with: recede-bench sweep out/demo/sweep.json",
    name: "parcel-drone-demo",
    problems: [{ problem: "parcel-drone", ...(quick ? { steps: 120 } : {}) }],
    optimizers: [
      {
        label: "MPPI",
        kind: "mppi",
        samples,
        horizon,
        temperature: 10,
        noise: [2, 2],
        warmup,
      },
      {
        label: "CEM",
        kind: "cem",
        samples: samples / 2,
        horizon,
        eliteFraction: 0.1,
        iterations: 3,
        noise: [3, 3],
        spreadFill: "initial",
        warmup,
      },
      {
        label: "MPPI γ=0.7 + cov. adapt.",
        kind: "variant",
        samples,
        horizon,
        loss: "exponential",
        temperature: 10,
        stepSize: 0.7,
        adaptCovariance: true,
        minStd: 0.3,
        noise: [2, 2],
        warmup,
      },
      { label: "LQR (hover gain, glide path)", kind: "lqr", track: true },
      {
        label: "DAgger policy",
        kind: "distilled",
        expert: "MPPI",
        expertSamples: quick ? 96 : 256,
        rounds: quick ? 2 : 4,
        trainingNoise: 0.03,
      },
    ],
    seeds: { first: 1, count: quick ? 2 : 5 },
    episodes: 1,
  };
}

/** Run the demo and write its report. */
export async function runDemo(options: DemoOptions = {}): Promise<DemoFiles> {
  const outDir = options.outDir ?? join("out", "demo");
  const quick = options.quick ?? false;
  const raw = demoSweep(quick);
  // A demo always starts fresh (a sweep resumes; the demo shows a complete run).
  rmSync(join(outDir, "results.jsonl"), { force: true });
  const outcome = await runSweep(
    { raw, dir: resolve(outDir) },
    // The demo's reduced setting is in its sweep (demoSweep(quick)), not a sweep smoke run.
    { outDir, workers: options.workers, quick: false, keepTrajectory: true },
  );
  const sweepJson = join(outDir, "sweep.json");
  writeFileSync(sweepJson, `${JSON.stringify(raw, null, 2)}\n`);

  const optimizers = outcome.spec.optimizers.map((o) => o.label);
  const problem = outcome.spec.problems[0];
  const dt = problem.params.dt as number;
  const steps = problem.params.steps as number;
  const gusts: { seed: number; time: number; force: number }[] = [];
  for (const seed of outcome.spec.seeds) {
    const wind = drawWind(
      createStream(`plant:${seed}`).fork(0).fork(1),
      {
        steady: problem.params.gustSteady as number,
        amplitude: [problem.params.gustMin as number, problem.params.gustMax as number],
        count: problem.params.gusts as number,
      },
      steps * dt,
    );
    for (let t = 0; t <= steps; t += 2)
      gusts.push({ seed, time: t * dt, force: wind.force(t * dt) });
  }
  const summary = summarize(outcome.records);
  const th = DRONE_THRESHOLDS;
  const W = DRONE_WEIGHTS;
  const deg = (r: number): string => `${fmt((r * 180) / Math.PI)}°`;
  const mppiEntry = (raw.optimizers as Record<string, unknown>[])[0];
  const horizon = mppiEntry.horizon as number;
  const warmup = mppiEntry.warmup as number;
  const files = await writeSweepOutputs(
    outDir,
    outcome.records,
    currentMeta(options.command ?? `pnpm demo${quick ? " --quick" : ""}`),
    "Rooftop parcel drone in gusts",
    {
      markdownName: "report.md",
      metricLabels: METRIC_LABELS,
      shares: ["landed"],
      chartDir: "",
      charts: [
        await landingChart(outcome.records, optimizers),
        await touchdownChart(outcome.records, optimizers),
        await gustChart(gusts),
      ],
      intro: [
        "A planar quadrotor carrying a parcel descends onto a rooftop landing pad while sideways gusts, unknown to the controllers' model, push it. Five controllers from recede fly the same gusts on each seed: three sampling MPC planners, an LQR tracking a glide path, and a policy distilled from MPPI.",
        `${outcome.spec.seeds.length} seeds${quick ? " (quick setting)" : ""}. Costs are means over seeds with 95% Student-t confidence intervals. This is an invented scenario for demonstration, not a validated flight controller: simulate first, enforce actuator limits and keep an independent emergency stop on real machines.`,
      ],
      sections: [
        {
          heading: "Scenario and success test",
          items: [
            [
              "Drone",
              `mass ${DRONE_PARAMETERS.mass} kg with parcel, arm ${DRONE_PARAMETERS.arm} m, roll inertia ${DRONE_PARAMETERS.inertia} kg m², drag ${DRONE_PARAMETERS.drag} N s/m; two rotors, thrust each in [0, ${DRONE_PARAMETERS.maxThrust}] N.`,
            ],
            [
              "Start and goal",
              `start near p_x = ${droneParams.startOffset.default} m, ${droneParams.startHeight.default} m above the roof (±0.5 m per seed); pad centre at p_x = 0 on the roof (p_z = 0). Control period ${dt} s, at most ${steps} steps (${fmt(steps * dt)} s).`,
            ],
            [
              "Gusts",
              `steady side force up to ±${problem.params.gustSteady} N plus ${problem.params.gusts} '1 − cos' gusts of ${problem.params.gustMin}–${problem.params.gustMax} N lasting 0.8–2 s, drawn per seed; the controllers' model has no wind.`,
            ],
            [
              "Landing success",
              `touchdown (p_z reaches 0) with miss distance |p_x| ≤ ${th.missDistance} m, touchdown speed ‖v‖ ≤ ${th.touchdownSpeed} m/s and tilt |θ| ≤ ${deg(th.tilt)}.`,
            ],
            [
              "Constraint violation",
              `a control step with tilt |θ| > ${deg(th.tiltLimit)} (the parcel must not swing hard).`,
            ],
            [
              "Cost (what the planners minimize; the episode cost in the table is the same cost along the flown path)",
              `in the air, per step ${W.position}·p_x² + ${W.height}·(p_z + ${-W.aimHeight})² + ${W.tilt}·θ² + ${W.velocity}·‖v‖² + ${W.rate}·ω² + ${W.thrust}·‖u − u_hover‖² + ${W.envelope}·(descent faster than ${W.envelopeBase} + ${W.envelopeSlope}·p_z m/s)² + ${W.cone}·(|p_x| beyond ${W.coneBase} + ${W.coneSlope}·p_z m)² + ${W.bank}·(|θ| beyond ${deg(W.bankAngle)})² + ${W.airborne}; the state part ×${W.terminal} at the end of a horizon still in the air. The planners' model includes the roof: touchdown is an absorbing state, scored per remaining step (and ×${W.terminal} at the end of the horizon, or of the flight) by ${W.touchdown}·Σ aᵢ² + ${W.touchdownExcess}·Σ max(0, aᵢ − ${W.touchdownMargin})², where a = (miss, speed, tilt) at touchdown divided by their success thresholds. So a planned sequence that lands is judged on its touchdown, and the steep part keeps a margin of ${100 - 100 * W.touchdownMargin}% to each threshold. The model still knows nothing of the wind.`,
            ],
            [
              "Reading the table",
              `Success counts episodes that met all landing thresholds. Miss distance, touchdown speed, touchdown tilt and landing time are averaged over the seeds that landed (so their intervals can rest on few seeds); 'seeds landed' counts any touchdown. Samples / step is the number of model rollouts of ${horizon} steps per control step (K × iterations). Compute / step is the wall time of one control step (median and 95th percentile over the flight's steps): each sampling controller first runs ${warmup} control steps at setup and then resets its plan and random streams (the flight is bit-identical to one without), so the JavaScript engine has compiled the hot loops and the percentiles show the steady state; that warm-up and the DAgger training are setup time, not in the table. Times are wall-clock on the machine named below, with runs sharing its cores.`,
            ],
          ],
        },
        {
          heading: "Why these settings",
          items: TUNING_NOTES.map((t) => [t[0], t[1]] as [string, string]),
        },
        {
          heading: "Controllers",
          items: describeOptimizers(raw),
        },
      ],
    },
  );
  if (options.print ?? true) {
    process.stdout.write(`\n${textTable(summaryTable(summary, METRIC_LABELS, ["landed"]))}\n\n`);
    process.stdout.write(
      `wrote ${files.reportHtml}, ${files.summaryMd}, ${files.charts.length} charts, ${outcome.resultsPath}\n`,
    );
  }
  return {
    reportHtml: files.reportHtml,
    reportMd: files.summaryMd,
    resultsJsonl: outcome.resultsPath,
    sweepJson,
    charts: files.charts,
  };
}

const KIND_TEXT: Readonly<Record<string, string>> = {
  mppi: "MPPI (Williams et al. 2017): exponential-utility weights of sampled thrust sequences, γ = 1, fixed sampling noise.",
  cem: "Cross-entropy method (Rubinstein 1999): refit mean and variance to the elite samples, several iterations per step.",
  variant:
    "A variant derived from the generic controller: MPPI's loss with a partial mirror step γ < 1 and the sampling covariance adapted by the same step.",
  lqr: "LQR: the DARE gain K of the model linearized about hover, with the quadratic part of the cost as Q and R, tracking a moving setpoint r_t: u = clip(u_hover − K(x − r_t)) to the thrust limits. The setpoint glides from the start position straight to a gate 1 m above the pad at 1.2 m/s, then descends at 0.4 m/s through the roof, and waits whenever the drone lags more than 0.6 m behind (a simple reference governor). Regulating straight to the pad from 8 m away instead saturates the thrust and dives at about 11 m/s. It sees neither the wind nor the descent envelope; it costs one matrix-vector product per step.",
  distilled:
    "An affine policy u = Kx + b distilled from the MPPI expert by DAgger (Ross, Gordon & Bagnell 2011) on the wind-free model with a small random state disturbance, trained per seed (the expert labels with 256 samples to keep training short; training episodes end at touchdown; the round with the best validation cost is kept); flying it costs one matrix-vector product per step. Training time is setup time, not in the table.",
};

/**
 * What was measured to choose the demo's settings (20 seeds unless stated, gusts as in the demo,
 * on this scenario's cost); kept in the report so a reader can see why, and redo it with a sweep.
 */
const TUNING_NOTES: readonly (readonly [string, string])[] = [
  [
    "Roof and touchdown in the model",
    "Before, the planners' model had no roof and the cost only aimed below it, so a plan never saw its own touchdown: over these 5 seeds MPPI landed within the thresholds on 3, CEM on 2, the variant on 3, all with 10–14 steps per flight banked beyond 30°. With touchdown as an absorbing state scored against the thresholds and a steep bank term above 15°, and nothing else changed (K = 256, λ = 1), they landed on 19, 16 and 20 of 20 seeds, with 2 steps beyond 30° in all 60 flights.",
  ],
  [
    "Final settings over 20 seeds",
    "MPPI (K = 1024), the variant (K = 1024), CEM (3 × 512) and the tracking LQR each landed within the thresholds on 20 of 20 seeds (1–20), with no step beyond 30°; worst miss distance 0.38 m, worst touchdown speed 0.73 m/s, worst touchdown tilt 9.7° (all four together). The DAgger policy landed within them on 11 of 20.",
  ],
  [
    "Samples",
    "During tuning K = 256 landed MPPI on 19–20 of 20 seeds but CEM (3 × 256) on 15–16, so CEM got 3 × 512 and MPPI 1024. 1024 samples of 30 steps take about 6 ms per control step on one idle core of this machine, 12% of the 50 ms control period; with other jobs sharing the cores, as in the table, two to four times that.",
  ],
  [
    "Temperature and noise",
    "At K = 256 (20 seeds) λ = 1 landed 19 seeds and λ = 5 or 20 all 20; at K = 1024 (16 seeds) λ = 10 with σ = 2 N and λ = 100 with σ = 1 N landed all 16, the other two pairings 15. We kept λ = 10, σ = 2 N, which landed sooner (6.1 s against 7.3 s). The effective sample size of the weights stays small (measured: 1.0 of 1024 at the start with λ = 1; 1.1 at the start and 1.7 near the pad with λ = 10) because random sequences that bank hard cost tens of thousands, so the update is close to the best sample, smoothed over steps by the warm-started plan. Time-correlated noise (a = 0.6) landed only 8–9 of 20 seeds: a lasting difference between the two rotors is a lasting torque, i.e. hard banking.",
  ],
  [
    "Cost weights",
    "Raising the position weight from 1 to 4 and the touchdown weight from 2 to 10 brought MPPI's mean miss distance from about 0.23 to 0.16 m and its mean touchdown speed from 0.43 to 0.21 m/s (K = 1024, 20 seeds). The touchdown term also enters the terminal cost ×10, so the episode cost in the table charges a hard or off-pad landing.",
  ],
  [
    "LQR",
    "The hover LQR regulating straight to the pad crashed on every seed (touchdown at about 11 m/s, 2.4 m off the pad): from 8 m away the feedback saturates the thrust. The same gain tracking the glide path landed on 20 of 20 seeds at about 0.42 m/s, in about 9.4 s against MPPI's 7.0 s; its episode cost is the highest because the cost prices time in the air.",
  ],
  [
    "DAgger",
    "In tuning runs (10 seeds, before the last change to the terminal cost) the affine policy landed within the thresholds on 4 of 10 seeds when trained on the expert's own, undisturbed states (4 or 6 rounds alike), on 7 of 10 with a state disturbance of std 0.03 in training (4 at 0.02, 6 at 0.05, 1 at 0.1); with the final settings, on 11 of 20. The policy class, not the number of rounds, is the limit: one affine law cannot be both the steep descent from 8 m and the careful flare over the pad.",
  ],
];

function describeOptimizers(raw: Record<string, unknown>): [string, string][] {
  const list = raw.optimizers as Record<string, unknown>[];
  return list.map((o) => {
    const { label, kind, ...rest } = o;
    return [
      String(label),
      `${KIND_TEXT[String(kind)] ?? ""} Sweep entry: kind "${kind}", ${JSON.stringify(rest)}.`,
    ];
  });
}
