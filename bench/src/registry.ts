/**
 * The harness's two small contracts — a benchmark problem and a benchmark controller — and the
 * registry that maps a sweep entry (`problem` id or optimizer `kind` plus parameters) to a factory.
 *
 * Everything the library can run appears here through an adapter: the reference problems of
 * `@recede/problems`, the scenarios of bench, the MPC presets and generic controller of
 * `@recede/mpc`, and policies distilled by `@recede/policy-gradient`. Users add their own kinds
 * through a plugin module named in the sweep file (see bench/README.md).
 *
 * @module
 */
import type { ControlBounds, CostModel, Dynamics, Stream } from "@recede/core";
import type { LinearQuadratic } from "@recede/problems";
import type { ParamSchemaMap, ParamValues } from "./params.js";

/** A problem as the harness runs it: the controller's model, the plant, and the scoring rules. */
export interface BenchProblem {
  /** Registry id, e.g. `"pendulum"`. */
  readonly id: string;
  /** State size n. */
  readonly stateSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** Control period in seconds. */
  readonly dt: number;
  /** Episode length in control steps (an episode may end earlier, see `finished`). */
  readonly steps: number;
  /** The dynamics the controller plans with. */
  readonly model: Dynamics;
  /** The cost the controller minimizes; the episode cost is this cost along the realized path. */
  readonly cost: CostModel;
  /** Box bounds on the control. */
  readonly bounds: ControlBounds;
  /** Indices of angle components of the state (errors to them wrap into (−π, π]). */
  readonly angleIndices?: readonly number[];
  /** Names of the state components, for charts and reports. */
  readonly stateNames: readonly string[];
  /** An equilibrium (x*, u*) about which LQR may linearize, when the problem has one. */
  readonly equilibrium?: { readonly state: Float64Array; readonly control: Float64Array };
  /**
   * Linear-quadratic data about the equilibrium (exact or a linearization), for LQR; absent when
   * the problem has none.
   */
  readonly linearQuadratic?: LinearQuadratic;
  /** Initial state of an episode; `rng` is the episode's own stream. */
  initialState(rng: Stream): Float64Array;
  /**
   * Advance the plant one control period in place: x ← f_plant(x, u, t). Defaults to the model
   * when a problem has no mismatch; scenarios add disturbances here, drawn from `rng`.
   */
  plantStep(x: Float64Array, u: Float64Array, t: number, rng: Stream): void;
  /** Constraint violation at (x, u): 0 when satisfied, > 0 by how much otherwise. */
  violation(x: Float64Array, u: Float64Array): number;
  /** True when the episode is over before `steps` (landed, crashed, …); x is the state after step t. */
  finished(x: Float64Array, t: number): boolean;
  /**
   * Judge an episode: `states` holds x_0 … x_{count−1} row-major (n numbers each). Returns the
   * problem's success test and its scenario metrics (e.g. touchdown speed).
   */
  outcome(states: Float64Array, count: number): EpisodeOutcome;
}

/** How an episode ended, as judged by the problem's own success test. */
export interface EpisodeOutcome {
  /** Did the episode meet the problem's success test? */
  readonly success: boolean;
  /** Problem-specific figures, e.g. `{ touchdownSpeed: 0.4, missDistance: 0.12 }`. */
  readonly metrics: Readonly<Record<string, number>>;
}

/** What a controller reports for one control step. */
export interface StepResult {
  /** The control to apply (the controller's own buffer; read before the next `act`). */
  readonly control: Float64Array;
  /** Model rollouts (samples × iterations) used this step; 0 for a policy. */
  readonly samples: number;
}

/** A controller as the harness runs it. */
export interface BenchController {
  /** Choose the control for state x at step t. */
  act(x: Float64Array, t: number): StepResult;
  /** Forget everything learned during an episode (plan warm start, …); optional. */
  reset?(): void;
  /**
   * The learner's own regret series (cumulative, one entry per step), when the controller tracks
   * one with @recede/regret. The harness also computes, for every controller, the regret against
   * the best controller of the sweep in hindsight (see summary.ts).
   */
  regretSeries?(): readonly number[];
}

/** Context handed to factories. */
export interface FactoryContext {
  /** The run's seed; derive all randomness from it. */
  readonly seed: number;
  /** A reduced setting was asked for (`--quick`). */
  readonly quick: boolean;
  /** The registry (to build nested optimizers, e.g. the expert of a distilled policy). */
  readonly registry: Registry;
  /** The optimizer entry of the sweep with this label (for parameters of type "optimizer"). */
  optimizerEntry(
    label: string,
  ): { readonly kind: string; readonly params: ParamValues } | undefined;
}

/** A problem kind the sweep file can name in `problems[i].problem`. */
export interface ProblemDefinition {
  readonly id: string;
  readonly description: string;
  readonly params: ParamSchemaMap;
  create(params: ParamValues, ctx: FactoryContext): BenchProblem;
}

/** An optimizer kind the sweep file can name in `optimizers[i].kind`. */
export interface OptimizerDefinition {
  readonly kind: string;
  readonly description: string;
  readonly params: ParamSchemaMap;
  /**
   * Check the parameters against a concrete problem (sizes, applicability) before any run starts;
   * throw to reject. Optional.
   */
  check?(params: ParamValues, problem: BenchProblem): void;
  /** Build a controller for `problem`; may be async (training a distilled policy). */
  create(
    params: ParamValues,
    problem: BenchProblem,
    ctx: FactoryContext,
  ): BenchController | Promise<BenchController>;
}

/** Maps problem ids and optimizer kinds to their definitions. */
export class Registry {
  private readonly problemDefs = new Map<string, ProblemDefinition>();
  private readonly optimizerDefs = new Map<string, OptimizerDefinition>();

  /** Add (or replace) a problem kind. */
  registerProblem(def: ProblemDefinition): this {
    this.problemDefs.set(def.id, def);
    return this;
  }

  /** Add (or replace) an optimizer kind. */
  registerOptimizer(def: OptimizerDefinition): this {
    this.optimizerDefs.set(def.kind, def);
    return this;
  }

  /** The problem kind `id`, or undefined. */
  problem(id: string): ProblemDefinition | undefined {
    return this.problemDefs.get(id);
  }

  /** The optimizer kind `kind`, or undefined. */
  optimizer(kind: string): OptimizerDefinition | undefined {
    return this.optimizerDefs.get(kind);
  }

  /** All problem ids, sorted. */
  problemIds(): string[] {
    return [...this.problemDefs.keys()].sort();
  }

  /** All optimizer kinds, sorted. */
  optimizerKinds(): string[] {
    return [...this.optimizerDefs.keys()].sort();
  }
}

/** What a plugin module exports: `export function register(registry: Registry): void`. */
export interface PluginModule {
  register(registry: Registry): void | Promise<void>;
}
