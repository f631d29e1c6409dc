/**
 * Summaries per (problem, optimizer) over seeds, computed from run records in a fixed order so the
 * result does not depend on the order runs finished in, on the number of workers or on how the
 * sweep was sharded: records are sorted by (problem, optimizer, seed, episode) first.
 *
 * Seeds are the independent replications: the episodes of one seed are averaged first, then the
 * mean and 95% Student-t interval are taken over seeds (see stats.ts for the source).
 *
 * The summary has two parts: `outcomes` (costs, success, violations, samples, metrics, curves) is a
 * deterministic function of the seeds; `timing` holds measured wall times, which differ from one
 * execution to the next.
 *
 * @module
 */
import type { RunRecord } from "./run.js";
import { type Interval, meanInterval, quantile } from "./stats.js";

/** Outcome figures of one (problem, optimizer) group. */
export interface GroupOutcome {
  readonly problem: string;
  readonly optimizer: string;
  /** Seeds that finished without error. */
  readonly seeds: number;
  /** Runs that failed with an error. */
  readonly failures: number;
  /** Episode cost: mean over seeds with its 95% interval. */
  readonly cost: Interval;
  /** Successful episodes / episodes. */
  readonly successRate: number;
  /** Successful episodes. */
  readonly successes: number;
  /** Episodes. */
  readonly episodes: number;
  /** Steps with a constraint violated, mean per episode. */
  readonly violations: number;
  /** Model rollouts per control step, mean. */
  readonly samplesPerStep: number;
  /** Scenario metrics: mean over seeds with 95% interval, by name. */
  readonly metrics: Readonly<Record<string, Interval>>;
  /** Cumulative cost after each step: mean over seeds with 95% interval (episodes padded with 0 cost after they end). */
  readonly costCurve: readonly Interval[];
  /**
   * Regret against the best optimizer of the sweep in hindsight on the same problem and seed:
   * R_t = Σ_{s≤t} c_s(this) − Σ_{s≤t} c_s(B*), with B* the optimizer of least episode cost on that
   * seed (a finite comparator set; Cesa-Bianchi & Lugosi, "Prediction, Learning, and Games", 2006,
   * ch. 2). Mean over seeds with 95% interval, per step.
   */
  readonly regretCurve: readonly Interval[];
  /** The controller's own tracked regret (cumulative), mean over seeds, when it reports one. */
  readonly trackedRegret?: readonly Interval[];
}

/** Timing figures of one (problem, optimizer) group (measured; not reproducible bit for bit). */
export interface GroupTiming {
  readonly problem: string;
  readonly optimizer: string;
  /** Median over runs of the per-run median control-step time, ms. */
  readonly computeMedianMs: number;
  /** Median over runs of the per-run 95th-percentile control-step time, ms. */
  readonly computeP95Ms: number;
  /** Median setup time per run (e.g. training a distilled policy), ms. */
  readonly setupMs: number;
}

/** The summary of a sweep. */
export interface SweepSummary {
  /** Number of run records summarized. */
  readonly runs: number;
  /** Deterministic outcome figures, sorted by (problem, optimizer). */
  readonly outcomes: readonly GroupOutcome[];
  /** Measured timings, sorted by (problem, optimizer). */
  readonly timing: readonly GroupTiming[];
}

function compareStr(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Sort records by (problem, optimizer, seed, episode); a copy. */
export function sortRecords(records: readonly RunRecord[]): RunRecord[] {
  return [...records].sort(
    (a, b) =>
      compareStr(a.problem, b.problem) ||
      compareStr(a.optimizer, b.optimizer) ||
      a.seed - b.seed ||
      a.episode - b.episode,
  );
}

/** Per-seed cumulative cost curve of length `len` (padded with the final value). */
function cumulative(series: readonly number[], len: number): Float64Array {
  const out = new Float64Array(len);
  let acc = 0;
  for (let t = 0; t < len; t++) {
    if (t < series.length) acc += series[t];
    out[t] = acc;
  }
  return out;
}

function curveIntervals(curves: readonly Float64Array[], len: number): Interval[] {
  const out: Interval[] = [];
  for (let t = 0; t < len; t++) out.push(meanInterval(curves.map((c) => c[t])));
  return out;
}

/** Mean of the episodes of one seed, component-wise, for curves. */
function meanCurve(curves: readonly Float64Array[], len: number): Float64Array {
  const out = new Float64Array(len);
  for (const c of curves) for (let t = 0; t < len; t++) out[t] += c[t] / curves.length;
  return out;
}

/** Summarize run records (any order; duplicates by key: the last one wins). */
export function summarize(records: readonly RunRecord[]): SweepSummary {
  const byKey = new Map<string, RunRecord>();
  for (const r of records) byKey.set(r.key, r);
  const sorted = sortRecords([...byKey.values()]);
  const groups = new Map<string, RunRecord[]>();
  for (const r of sorted) {
    const g = `${r.problem}\u0000${r.optimizer}`;
    const list = groups.get(g);
    if (list) list.push(r);
    else groups.set(g, [r]);
  }

  // Best optimizer in hindsight per (problem, seed, episode), and the curve length per problem.
  const lenByProblem = new Map<string, number>();
  const best = new Map<string, RunRecord>();
  for (const r of sorted) {
    if (r.error) continue;
    lenByProblem.set(r.problem, Math.max(lenByProblem.get(r.problem) ?? 0, r.costSeries.length));
    const k = `${r.problem}\u0000${r.seed}\u0000${r.episode}`;
    const b = best.get(k);
    if (!b || r.cost < b.cost || (r.cost === b.cost && r.optimizer < b.optimizer)) best.set(k, r);
  }

  const outcomes: GroupOutcome[] = [];
  const timing: GroupTiming[] = [];
  for (const list of groups.values()) {
    const { problem, optimizer } = list[0];
    const ok = list.filter((r) => !r.error);
    const len = lenByProblem.get(problem) ?? 0;
    const seedList = [...new Set(ok.map((r) => r.seed))].sort((a, b) => a - b);
    const perSeed = seedList.map((s) => ok.filter((r) => r.seed === s));
    const seedMean = (f: (r: RunRecord) => number): number[] =>
      perSeed.map((rs) => rs.reduce((acc, r) => acc + f(r), 0) / rs.length);

    const metricNames = [...new Set(ok.flatMap((r) => Object.keys(r.metrics)))].sort();
    const metrics: Record<string, Interval> = {};
    for (const name of metricNames)
      metrics[name] = meanInterval(
        perSeed
          .map((rs) => rs.filter((r) => Number.isFinite(r.metrics[name])))
          .filter((rs) => rs.length > 0)
          .map((rs) => rs.reduce((a, r) => a + r.metrics[name], 0) / rs.length),
      );

    const costCurves = perSeed.map((rs) =>
      meanCurve(
        rs.map((r) => cumulative(r.costSeries, len)),
        len,
      ),
    );
    const regretCurves = perSeed.map((rs) =>
      meanCurve(
        rs.map((r) => {
          const b = best.get(`${r.problem}\u0000${r.seed}\u0000${r.episode}`)!;
          const mine = cumulative(r.costSeries, len);
          const theirs = cumulative(b.costSeries, len);
          for (let t = 0; t < len; t++) mine[t] -= theirs[t];
          return mine;
        }),
        len,
      ),
    );
    const tracked = ok.filter((r) => r.regret && r.regret.length > 0);
    let trackedRegret: Interval[] | undefined;
    if (tracked.length > 0) {
      const tl = Math.max(...tracked.map((r) => r.regret!.length));
      const curves = tracked.map((r) => {
        const c = new Float64Array(tl);
        const reg = r.regret!;
        for (let t = 0; t < tl; t++) c[t] = reg[Math.min(t, reg.length - 1)];
        return c;
      });
      trackedRegret = curveIntervals(curves, tl);
    }

    const successes = ok.filter((r) => r.success).length;
    outcomes.push({
      problem,
      optimizer,
      seeds: seedList.length,
      failures: list.length - ok.length,
      cost: meanInterval(seedMean((r) => r.cost)),
      successRate: list.length > 0 ? successes / list.length : 0,
      successes,
      episodes: list.length,
      violations: ok.length > 0 ? ok.reduce((a, r) => a + r.violations, 0) / ok.length : 0,
      samplesPerStep: ok.length > 0 ? ok.reduce((a, r) => a + r.samplesPerStep, 0) / ok.length : 0,
      metrics,
      costCurve: curveIntervals(costCurves, len),
      regretCurve: curveIntervals(regretCurves, len),
      ...(trackedRegret ? { trackedRegret } : {}),
    });
    timing.push({
      problem,
      optimizer,
      computeMedianMs: quantile(
        ok.map((r) => r.computeMedianMs),
        0.5,
      ),
      computeP95Ms: quantile(
        ok.map((r) => r.computeP95Ms),
        0.5,
      ),
      setupMs: quantile(
        list.map((r) => r.setupMs),
        0.5,
      ),
    });
  }
  return { runs: sorted.length, outcomes, timing };
}
