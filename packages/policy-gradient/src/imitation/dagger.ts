/**
 * Behaviour cloning and DAgger against any expert with `act(state)`.
 *
 * @module
 */
import {
  createStream,
  RecedeError,
  requireInteger,
  requireVector,
  type Stream,
} from "@recede/core";
import type { RolloutEnvironment } from "../environment/environment.js";
import type { EpisodeBatch } from "../environment/episodeBatch.js";
import { requireInterface, requireOptionsObject, requireUnitClosed } from "../internal/validate.js";
import { policyActor } from "../policies/actor.js";
import { type Actor, controlOf, type StochasticPolicy } from "../policies/policy.js";
import type { FitPolicyOptions } from "./fitPolicy.js";
import { type ImitationLearner, imitationLearner } from "./imitationLearner.js";

/**
 * An expert: anything with `act(state)` — an MPC controller, an LQR gain, a human interface.
 * `reset()` (optional) is called before every episode the expert drives or labels (episodes run
 * one at a time, so a stateful expert such as a warm-started MPC controller sees each trajectory in
 * order), and before every query of the cost-to-go rollouts of {@link aggrevated} (which
 * interleave several rollouts). `costToGo` (optional) is used by {@link aggrevated}.
 */
export interface Expert extends Actor {
  /** Called at the start of each episode (e.g. to clear an MPC warm start). */
  reset?(): void;
  /**
   * Q*(s, a): the expert's expected cost of applying `action` in `state` and then following its
   * own policy for the remaining `stepsRemaining − 1` steps (including the terminal cost).
   */
  costToGo?(state: Float64Array, action: Float64Array, stepsRemaining: number): number;
}

/** Mixing schedule β_i of DAgger (probability of the expert's action in round i ≥ 1). */
export type MixingSchedule =
  | "first-round"
  | { readonly decay: number }
  | ((round: number) => number);

/** Options shared by {@link behaviourCloning} and {@link dagger}. */
export interface ImitationOptions {
  /** Where episodes run (its dynamics, costs, bounds, initial-state law and disturbances). */
  readonly environment: RolloutEnvironment;
  /** The expert. */
  readonly expert: Expert;
  /** The learner's policy family. */
  readonly policy: StochasticPolicy;
  /**
   * Seed of the episodes' initial states, disturbances and mixing draws.
   * @defaultValue 0
   */
  readonly seed?: number | string;
  /** Initial θ. @defaultValue `policy.initialParameters()` */
  readonly initial?: Float64Array;
  /** Options of the refit. @defaultValue {} */
  readonly fit?: FitPolicyOptions;
}

/** Options of {@link behaviourCloning}. */
export interface BehaviourCloningOptions extends ImitationOptions {
  /** Expert episodes to record (labels = episodes · T). */
  readonly episodes: number;
}

/** Options of {@link dagger}. */
export interface DaggerOptions extends ImitationOptions {
  /** Rounds N. */
  readonly rounds: number;
  /** Episodes per round (labels = rounds · episodes · T). */
  readonly episodesPerRound: number;
  /**
   * β_i: `"first-round"` (β₁ = 1, then 0 — found best in practice by Ross et al.), `{ decay: p }`
   * (β_i = p^{i−1}) or a function of the round i ≥ 1.
   * @defaultValue "first-round"
   */
  readonly mixing?: MixingSchedule;
  /**
   * Episodes on which every round's refitted policy is scored (closed-loop cost of its mean
   * action, fixed seed); the best is returned, as the DAgger analysis prescribes. 0 returns the
   * last policy.
   * @defaultValue 0
   */
  readonly validationEpisodes?: number;
}

/** One DAgger round. */
export interface DaggerRound {
  /** Round i (1-based). */
  readonly round: number;
  /** β_i. */
  readonly beta: number;
  /** Labels gathered this round. */
  readonly labels: number;
  /** Size of the aggregated data set after the round. */
  readonly totalLabels: number;
  /** ℓ_i(θ_i): imitation loss of the round's learner on the states its mixture visited. */
  readonly roundLoss: number;
  /** Imitation loss on the whole data set after the refit. */
  readonly fitLoss: number;
  /** Mean closed-loop cost of the refitted policy on the validation episodes (NaN when not scored). */
  readonly validationCost: number;
}

/** Result of {@link behaviourCloning} or {@link dagger}. */
export interface ImitationResult {
  /** The chosen θ (the best on validation, or the last). */
  readonly parameters: Float64Array;
  /** The follow-the-leader learner (its data set and last θ). */
  readonly learner: ImitationLearner;
  /** Total expert labels used. */
  readonly labels: number;
  /** Per-round records (one for behaviour cloning). */
  readonly rounds: readonly DaggerRound[];
  /** Index into `rounds` of the chosen policy. */
  readonly chosenRound: number;
}

interface Checked {
  env: RolloutEnvironment;
  expert: Expert;
  policy: StochasticPolicy;
  stream: Stream;
  learner: ImitationLearner;
}

function checkCommon(fn: string, o: ImitationOptions): Checked {
  requireOptionsObject(fn, o);
  const env = o.environment;
  requireInterface(fn, "environment", env, "collectWith", "a RolloutEnvironment");
  const expert = o.expert;
  requireInterface(fn, "expert", expert, "act", "an object with act(state)");
  env.checkPolicy(fn, o.policy);
  const seed = o.seed ?? 0;
  const initial = requireVector(
    fn,
    "initial",
    o.initial ?? o.policy.initialParameters(),
    o.policy.parameterCount,
  );
  const learner = imitationLearner({ policy: o.policy, initial, fit: o.fit ?? {} });
  return { env, expert, policy: o.policy, stream: createStream(seed), learner };
}

/**
 * Write the label of an expert control for the learner: the control itself (Gaussian learner), or
 * the index of the nearest row of the environment's control table (categorical learner).
 */
function labelOf(
  env: RolloutEnvironment,
  control: ArrayLike<number>,
  out: Float64Array,
  oo: number,
): void {
  const m = env.controlSize;
  const table = env.discreteControls;
  if (table === null) {
    for (let j = 0; j < m; j++) out[oo + j] = control[j];
    return;
  }
  let best = 0;
  let bestD = Number.POSITIVE_INFINITY;
  for (let a = 0; a < env.actionCount; a++) {
    let d = 0;
    for (let j = 0; j < m; j++) d += (table[a * m + j] - control[j]) ** 2;
    if (d < bestD) {
      bestD = d;
      best = a;
    }
  }
  out[oo] = best;
}

/**
 * Run `episodes` episodes one at a time (so a stateful expert sees each trajectory in order)
 * under the mixture "expert with probability β, else the learner's mean action", labelling every
 * visited state with the expert's action. Returns the states and labels.
 */
function mixtureRollouts(
  c: Checked,
  theta: Float64Array,
  beta: number,
  episodes: number,
  batch: EpisodeBatch,
): { states: Float64Array; labels: Float64Array; count: number } {
  const { env, expert, policy, stream } = c;
  const n = env.stateSize;
  const a = policy.actionSize;
  const T = env.horizon;
  const states = new Float64Array(episodes * T * n);
  const labels = new Float64Array(episodes * T * a);
  const s = new Float64Array(n);
  let k = 0;
  for (let e = 0; e < episodes; e++) {
    expert.reset?.();
    env.collectWith(
      {
        decide(_e, _t, st, so, act, ao, str): number {
          for (let i = 0; i < n; i++) s[i] = st[so + i];
          const u = controlOf(expert.act(s));
          labelOf(env, u, labels, k * a);
          for (let i = 0; i < n; i++) states[k * n + i] = s[i];
          if (beta >= 1 || (beta > 0 && str.uniform() < beta)) {
            for (let j = 0; j < a; j++) act[ao + j] = labels[k * a + j];
          } else policy.mean(theta, st, so, act, ao);
          k++;
          return Number.NaN;
        },
      },
      stream,
      batch,
    );
  }
  return { states, labels, count: k };
}

function betaOf(fn: string, mixing: MixingSchedule, i: number): number {
  let b: number;
  if (mixing === "first-round") b = i === 1 ? 1 : 0;
  else if (typeof mixing === "function") b = mixing(i);
  else b = mixing.decay ** (i - 1);
  return requireUnitClosed(fn, `mixing(${i})`, b);
}

/**
 * Behaviour cloning (MATH.md §6.1): record `episodes` expert episodes, label every visited state
 * with the expert's action and fit the policy once, θ̂ = argmin_θ E_{s∼d_π*}[ℓ(s, θ)] (squared
 * action error; see {@link fitPolicy}). The supervised baseline of S. Ross, J. A. Bagnell,
 * "Efficient Reductions for Imitation Learning", AISTATS, 2010 — its closed-loop error can grow
 * as T²ε because the learner's mistakes take it to states the expert never showed.
 *
 * @example
 * ```ts
 * const bc = behaviourCloning({ environment: env, expert, policy: pi, episodes: 20 });
 * const actor = policyActor(pi, bc.parameters);
 * ```
 */
export function behaviourCloning(options: BehaviourCloningOptions): ImitationResult {
  const fn = "behaviourCloning";
  const c = checkCommon(fn, options);
  const episodes = requireInteger(fn, "episodes", options.episodes, 1);
  const batch = c.env.createBatch(1, c.policy.actionSize);
  const data = mixtureRollouts(c, c.learner.decision(), 1, episodes, batch);
  c.learner.update(data);
  const round: DaggerRound = {
    round: 1,
    beta: 1,
    labels: data.count,
    totalLabels: c.learner.dataset.size,
    roundLoss: c.learner.lastRoundLoss,
    fitLoss: c.learner.lastFit?.loss ?? Number.NaN,
    validationCost: Number.NaN,
  };
  return {
    parameters: c.learner.decision().slice(),
    learner: c.learner,
    labels: data.count,
    rounds: [round],
    chosenRound: 0,
  };
}

/**
 * DAgger — dataset aggregation (S. Ross, G. J. Gordon, J. A. Bagnell, "A Reduction of Imitation
 * Learning and Structured Prediction to No-Regret Online Learning", AISTATS, 2011; MATH.md §6.2):
 * for i = 1..N: run π_i = β_i π* + (1 − β_i) π̂_i (per step: the expert's action with probability
 * β_i, else the learner's mean action) for `episodesPerRound` episodes; label every visited state
 * with π*(s); aggregate D ← D ∪ {(s, π*(s))}; refit π̂_{i+1} = argmin Σ_D ℓ (follow the leader,
 * {@link imitationLearner}). Returns the best π̂_i on validation episodes when asked, else the last.
 * Symbols ↔ options: N ↔ `rounds`, β_i ↔ `mixing`.
 *
 * @example
 * ```ts
 * const res = dagger({ environment: env, expert, policy: pi, rounds: 8, episodesPerRound: 4 });
 * ```
 */
export function dagger(options: DaggerOptions): ImitationResult {
  const fn = "dagger";
  const c = checkCommon(fn, options);
  const rounds = requireInteger(fn, "rounds", options.rounds, 1);
  const per = requireInteger(fn, "episodesPerRound", options.episodesPerRound, 1);
  const mixing = options.mixing ?? "first-round";
  if (mixing !== "first-round" && typeof mixing !== "function") {
    if (typeof mixing !== "object" || mixing === null) {
      throw new RecedeError("type", fn, "mixing", '"first-round", { decay } or a function', mixing);
    }
    requireUnitClosed(fn, "mixing.decay", mixing.decay);
  }
  const valEpisodes = requireInteger(fn, "validationEpisodes", options.validationEpisodes ?? 0, 0);
  const batch = c.env.createBatch(1, c.policy.actionSize);
  const records: DaggerRound[] = [];
  let best = -1;
  let bestCost = Number.POSITIVE_INFINITY;
  let bestTheta = c.learner.decision().slice();
  let labels = 0;
  for (let i = 1; i <= rounds; i++) {
    const beta = betaOf(fn, mixing, i);
    const data = mixtureRollouts(c, c.learner.decision(), beta, per, batch);
    labels += data.count;
    c.learner.update(data);
    let val = Number.NaN;
    if (valEpisodes > 0) {
      const actor = policyActor(c.policy, c.learner.decision(), {
        controls:
          c.env.discreteControls === null
            ? undefined
            : { data: c.env.discreteControls, rows: c.env.actionCount, cols: c.env.controlSize },
      });
      val = c.env.evaluate(
        actor,
        valEpisodes,
        createStream(`${options.seed ?? 0}/validation`),
      ).mean;
      if (val < bestCost || best < 0) {
        bestCost = val;
        best = i - 1;
        bestTheta = c.learner.decision().slice();
      }
    }
    records.push({
      round: i,
      beta,
      labels: data.count,
      totalLabels: c.learner.dataset.size,
      roundLoss: c.learner.lastRoundLoss,
      fitLoss: c.learner.lastFit?.loss ?? Number.NaN,
      validationCost: val,
    });
  }
  if (valEpisodes === 0) {
    best = rounds - 1;
    bestTheta = c.learner.decision().slice();
  }
  return { parameters: bestTheta, learner: c.learner, labels, rounds: records, chosenRound: best };
}
