/**
 * The `distilled` optimizer kind: a cheap policy distilled from an expert controller of the same
 * sweep by DAgger (`@recede/policy-gradient`), then flown as a fixed policy.
 *
 * Training (per run, seeded by the run's seed, counted in the run's setup time, not in its
 * per-step compute time): episodes on the controller's *model* (the plant's disturbances are not
 * available to training), from the problem's initial-state law, with an optional Gaussian state
 * disturbance, each ending where the problem ends the plant's (`finished`, e.g. touchdown);
 * `rounds` DAgger rounds of `episodesPerRound` episodes, β₁ = 1 then 0, the expert labelling every
 * visited state; the policy of the round with the lowest validation cost is kept. `expertSamples`
 * labels with a copy of the expert that draws fewer samples, to keep training short.
 *
 * Source: S. Ross, G. J. Gordon, J. A. Bagnell, "A Reduction of Imitation Learning and Structured
 * Prediction to No-Regret Online Learning", AISTATS 2011.
 *
 * @module
 */
import {
  dagger,
  linearGaussianPolicy,
  mlpGaussianPolicy,
  policyActor,
  rolloutEnvironment,
  type StochasticPolicy,
} from "@recede/policy-gradient";
import type {
  BenchController,
  BenchProblem,
  FactoryContext,
  OptimizerDefinition,
} from "../registry.js";

/** The `distilled` kind. */
export const distilledDefinition: OptimizerDefinition = {
  kind: "distilled",
  description:
    "A policy distilled from another optimizer of the sweep (the expert) by DAgger (Ross, Gordon & Bagnell 2011), trained on the model per seed.",
  params: {
    expert: {
      type: "optimizer",
      description: "label of the expert optimizer entry (e.g. an MPPI entry)",
    },
    policy: {
      type: "string",
      values: ["linear", "mlp"],
      default: "linear",
      description:
        "policy class: affine feedback u = Kx + b (least-squares fit) or a tanh MLP (Adam fit)",
    },
    hidden: {
      type: "integer",
      min: 1,
      default: 32,
      description: "width of each of the MLP's two hidden layers",
    },
    expertSamples: {
      type: "integer",
      min: 1,
      description:
        "label with the expert's configuration but this many samples K (a cheaper expert for training); default: the expert's own",
    },
    rounds: { type: "integer", min: 1, default: 4, description: "DAgger rounds" },
    episodesPerRound: {
      type: "integer",
      min: 1,
      default: 2,
      description: "expert-labelled episodes per round",
    },
    validationEpisodes: {
      type: "integer",
      min: 0,
      default: 2,
      description: "episodes scoring each round's policy (the best is kept; 0 keeps the last)",
    },
    fitIterations: {
      type: "integer",
      min: 1,
      default: 300,
      description: "Adam steps per refit (MLP)",
    },
    trainingNoise: {
      type: "number",
      min: 0,
      default: 0,
      description: "std of a Gaussian state disturbance added in training episodes",
    },
  },
  check(params) {
    if (params.expert === undefined)
      throw new Error('distilled: "expert" (an optimizer label) is required');
  },
  async create(params, problem: BenchProblem, ctx: FactoryContext): Promise<BenchController> {
    const label = params.expert as string | undefined;
    const entry = label === undefined ? undefined : ctx.optimizerEntry(label);
    if (!entry) throw new Error(`distilled: no expert optimizer "${label}" in the sweep`);
    const expertDef = ctx.registry.optimizer(entry.kind);
    if (!expertDef) throw new Error(`distilled: unknown expert kind "${entry.kind}"`);
    const expertParams =
      params.expertSamples === undefined
        ? entry.params
        : { ...entry.params, samples: params.expertSamples as number };
    const expert = await expertDef.create(expertParams, problem, ctx);
    const n = problem.stateSize;
    const m = problem.controlSize;
    let step = 0;
    const scratch = new Float64Array(n);
    const environment = rolloutEnvironment({
      dynamics: problem.model,
      cost: problem.cost,
      bounds: problem.bounds,
      horizon: problem.steps,
      initialState: (stream, out, offset) => {
        out.set(problem.initialState(stream), offset);
      },
      disturbanceStd: params.trainingNoise as number,
      // Training episodes end where the problem's own test ends the plant's (e.g. touchdown), so
      // the expert labels flight states, not the frozen states after the end. (`finished` is
      // called with t = −1: training episodes keep their own step count.)
      terminate: (states, offset) => {
        for (let i = 0; i < n; i++) scratch[i] = states[offset + i];
        return problem.finished(scratch, -1);
      },
    });
    const policy: StochasticPolicy =
      params.policy === "mlp"
        ? mlpGaussianPolicy({
            stateSize: n,
            actionSize: m,
            hidden: [params.hidden as number, params.hidden as number],
            seed: ctx.seed,
          })
        : linearGaussianPolicy({ stateSize: n, actionSize: m, bias: true });
    const result = dagger({
      environment,
      expert: {
        act(state) {
          return expert.act(state, step++).control;
        },
        reset() {
          step = 0;
          expert.reset?.();
        },
      },
      policy,
      rounds: params.rounds as number,
      episodesPerRound: params.episodesPerRound as number,
      validationEpisodes: params.validationEpisodes as number,
      fit: { iterations: params.fitIterations as number },
      seed: `distill:${ctx.seed}`,
    });
    const actor = policyActor(policy, result.parameters);
    const u = new Float64Array(m);
    return {
      act(x) {
        actor.act(x, u);
        return { control: u, samples: 0 };
      },
    };
  },
};
