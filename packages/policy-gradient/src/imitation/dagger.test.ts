import { createStream, RecedeError } from "@recede/core";
import {
  behaviourCloning,
  dagger,
  type Expert,
  environmentFromProblem,
  fitPolicy,
  ImitationDataset,
  imitationLearner,
  linearGaussianPolicy,
  mlpGaussianPolicy,
  policyActor,
  softmaxPolicy,
} from "@recede/policy-gradient";
import { doubleIntegrator, pendulum } from "@recede/problems";
import { catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";

// An energy-shaping swing-up with a PD catch near the top, for the torque-limited pendulum
// (θ = 0 hanging, θ = π upright; MATH.md §7.2, the energy-pumping idea of Åström & Furuta,
// "Swinging Up a Pendulum by Energy Control", Automatica, 2000): u = b θ̇ + k θ̇ (E* − E) far from
// the top, u = −25 φ − 7 θ̇ when |φ| = |wrap(θ − π)| < 0.5 and |θ̇| < 3, clipped to ±5 N·m.
// A nonlinear, switching expert: exactly the kind of controller one distils into a small network.
const wrap = (a: number) => a - 2 * Math.PI * Math.floor((a + Math.PI) / (2 * Math.PI));
const swingUpExpert: Expert = {
  act(s) {
    const phi = wrap(s[0] - Math.PI);
    const w = s[1];
    let u: number;
    if (Math.abs(phi) < 0.5 && Math.abs(w) < 3) u = -25 * phi - 7 * w;
    else {
      const E = 0.5 * w * w - 9.81 * Math.cos(s[0]);
      u = 0.1 * w + 2 * w * (9.81 - E);
    }
    return [Math.max(-5, Math.min(5, u))];
  },
};

describe("DAgger vs behaviour cloning on a task where cloning drifts (compounding error)", () => {
  // Pendulum swing-up (defaults of @recede/problems: m = l = 1, b = 0.1, g = 9.81, |u| ≤ 5,
  // Δt = 0.05), 160-step episodes from θ₀ ∼ N(0, 0.1²), θ̇₀ ∼ N(0, 0.1²), velocity disturbance
  // σ = 0.02 per step. Learner: tanh MLP, one hidden layer of 16, fitted by full-batch Adam
  // (300 steps, rate 0.02) on the squared action error. Both methods get exactly 8 episodes ×
  // 160 = 1280 expert labels: BC from 8 expert episodes, DAgger from 8 rounds × 1 episode
  // (β₁ = 1, then 0). Cloning learns only the expert's narrow swing-up tube; once its small errors
  // push it off the tube, it meets states with no labels and keeps erring (Ross & Bagnell 2010).
  // Closed-loop cost of the mean action on 20 evaluation episodes (seed 99), measured:
  //   expert 2595;  seed 1: BC 6342, DAgger 3304;  seed 3: BC 6460, DAgger 3080
  //   (doing nothing, hanging: ≈ 15 800). BC's training loss (mean squared action error on its own
  //   data) is 0.36 / 0.43, while the same learner's loss on the states it visits itself — DAgger's
  //   round-2 loss ℓ₂(θ₂) — is 40 / 33.
  const env = environmentFromProblem(pendulum(), {
    horizon: 160,
    initialStateStd: new Float64Array([0.1, 0.1]),
    disturbanceStd: new Float64Array([0, 0.02]),
  });
  const fit = { iterations: 300, learningRate: 0.02 };
  const evaluate = (p: ReturnType<typeof mlpGaussianPolicy>, theta: Float64Array) =>
    env.evaluate(policyActor(p, theta), 20, createStream(99)).mean;

  for (const seed of [1, 3]) {
    it(`seed ${seed}: DAgger's closed-loop cost is below 75% of BC's with the same 1280 labels`, () => {
      const policy = mlpGaussianPolicy({
        stateSize: 2,
        actionSize: 1,
        hidden: [16],
        seed,
        outputScale: 0.1,
      });
      const bc = behaviourCloning({
        environment: env,
        expert: swingUpExpert,
        policy,
        episodes: 8,
        seed,
        fit,
      });
      const dg = dagger({
        environment: env,
        expert: swingUpExpert,
        policy,
        rounds: 8,
        episodesPerRound: 1,
        seed,
        fit,
      });
      expect(bc.labels).toBe(1280);
      expect(dg.labels).toBe(1280);
      expect(dg.rounds[0].beta).toBe(1);
      expect(dg.rounds[1].beta).toBe(0);
      const cBc = evaluate(policy, bc.parameters);
      const cDg = evaluate(policy, dg.parameters);
      expect(cDg).toBeLessThan(0.75 * cBc);
      // Cloning fits its own data well — the failure is the distribution shift, not the fit:
      // its training loss is small next to DAgger's first on-policy round loss (the drift shows).
      expect(bc.rounds[0].fitLoss).toBeLessThan(dg.rounds[1].roundLoss);
    });
  }
});

describe("imitation building blocks", () => {
  it("linear least-squares refit recovers a linear expert exactly (realizable case)", () => {
    const p = doubleIntegrator({ dt: 0.1 });
    const env = environmentFromProblem(p, {
      horizon: 50,
      initialStateStd: 0.5,
      disturbanceStd: 0.01,
    });
    const K = [2.5857008966598656, 3.443435917845341]; // DARE gain of the fixture's double integrator
    const expert: Expert = { act: (s) => [-(K[0] * s[0] + K[1] * s[1])] };
    const policy = linearGaussianPolicy({ stateSize: 2, actionSize: 1 });
    const bc = behaviourCloning({
      environment: env,
      expert,
      policy,
      episodes: 3,
      seed: 2,
      fit: { ridge: 0 },
    });
    expect(bc.parameters[0]).toBeCloseTo(K[0], 6);
    expect(bc.parameters[1]).toBeCloseTo(K[1], 6);
    expect(bc.parameters[2]).toBeCloseTo(0, 6); // bias
    expect(bc.rounds[0].fitLoss).toBeLessThan(1e-12);
  });

  it("an expert shaped like an MPC controller (act → { control, report }, reset) plugs in as it is", () => {
    const p = doubleIntegrator({ dt: 0.1 });
    const env = environmentFromProblem(p, { horizon: 25, initialStateStd: 0.5 });
    let resets = 0;
    const buf = new Float64Array(1);
    const mpcLike = {
      reset() {
        resets++;
      },
      act(s: Float64Array) {
        buf[0] = -(2 * s[0] + 3 * s[1]); // the controller reuses its buffer between calls
        return { control: buf, report: { iterations: 1 } };
      },
    };
    const policy = linearGaussianPolicy({ stateSize: 2, actionSize: 1 });
    const res = dagger({
      environment: env,
      expert: mpcLike,
      policy,
      rounds: 3,
      episodesPerRound: 2,
      seed: 1,
      fit: { ridge: 0 },
    });
    expect(resets).toBe(6); // once per episode
    expect(res.parameters[0]).toBeCloseTo(2, 8);
    expect(res.parameters[1]).toBeCloseTo(3, 8);
    const evaluation = env.evaluate(mpcLike, 3, createStream(2));
    expect(resets).toBe(9);
    expect(Number.isFinite(evaluation.mean)).toBe(true);
  });

  it("exponential mixing β_i = p^{i−1}; validation picks the best round", () => {
    const p = doubleIntegrator({ dt: 0.1 });
    const env = environmentFromProblem(p, { horizon: 30, initialStateStd: 0.5 });
    const expert: Expert = { act: (s) => [Math.max(-1, Math.min(1, -(2 * s[0] + 3 * s[1])))] };
    const policy = linearGaussianPolicy({ stateSize: 2, actionSize: 1 });
    const res = dagger({
      environment: env,
      expert,
      policy,
      rounds: 4,
      episodesPerRound: 2,
      mixing: { decay: 0.5 },
      validationEpisodes: 5,
      seed: 4,
    });
    expect(res.rounds.map((r) => r.beta)).toEqual([1, 0.5, 0.25, 0.125]);
    const costs = res.rounds.map((r) => r.validationCost);
    expect(costs[res.chosenRound]).toBe(Math.min(...costs));
    expect(res.rounds.map((r) => r.totalLabels)).toEqual([60, 120, 180, 240]);
  });

  it("categorical learners get the index of the nearest discrete control as the label", () => {
    const p = doubleIntegrator({ dt: 0.1 });
    const controls = [[-1], [0], [1]];
    const env = environmentFromProblem(p, { horizon: 40, initialStateStd: 0.5, controls });
    const expert: Expert = { act: (s) => [Math.max(-1, Math.min(1, -(2 * s[0] + 3 * s[1])))] };
    const policy = softmaxPolicy({ stateSize: 2, actionCount: 3 });
    const res = dagger({
      environment: env,
      expert,
      policy,
      rounds: 3,
      episodesPerRound: 2,
      seed: 5,
      fit: { iterations: 200, learningRate: 0.1 },
    });
    const labels = res.learner.dataset.labels.subarray(0, res.learner.dataset.size);
    expect(labels.every((a) => a === 0 || a === 1 || a === 2)).toBe(true);
    const learned = env.evaluate(
      policyActor(policy, res.parameters, { controls }),
      10,
      createStream(6),
    ).mean;
    const idle = env.evaluate({ act: () => [0] }, 10, createStream(6)).mean;
    expect(learned).toBeLessThan(0.5 * idle);
  });

  it("the follow-the-leader learner reports ℓ_i(θ_i) before refitting, and a failed round changes nothing", () => {
    const policy = linearGaussianPolicy({ stateSize: 1, actionSize: 1 });
    const learner = imitationLearner({ policy, fit: { ridge: 0 } });
    const seen: number[] = [];
    learner.observe((r) => seen.push(r.loss));
    learner.update({
      states: new Float64Array([1, 2]),
      labels: new Float64Array([-2, -4]),
      count: 2,
    });
    // θ₁ = 0 ⇒ ℓ₁ = mean((0 − a)²) = (4 + 16)/2 = 10; the refit gives K = 2, b = 0.
    expect(seen).toEqual([10]);
    expect(learner.decision()[0]).toBeCloseTo(2, 8);
    const snap = learner.snapshot();
    catchRecedeError(
      () =>
        learner.update({
          states: new Float64Array([1]),
          labels: new Float64Array([Number.NaN]),
          count: 1,
        }),
      { code: "non-finite" },
    );
    expect(learner.snapshot()).toEqual(snap);
    expect(learner.dataset.size).toBe(2);
    learner.update({ states: new Float64Array([3]), labels: new Float64Array([-6]), count: 1 });
    expect(learner.dataset.size).toBe(3);
    learner.restore(snap);
    expect(learner.dataset.size).toBe(2);
    expect(learner.round).toBe(1);
  });

  it("fitPolicy: MLP regression drives the squared error down; bad input is a typed error", () => {
    const policy = mlpGaussianPolicy({ stateSize: 1, actionSize: 1, hidden: [8], seed: 1 });
    const data = new ImitationDataset(1, 1);
    for (let i = 0; i < 50; i++) {
      const x = -2 + (4 * i) / 49;
      data.add(new Float64Array([x]), 0, [Math.sin(x)]);
    }
    const theta = policy.initialParameters();
    const r = fitPolicy(policy, theta, data, { iterations: 1500, learningRate: 0.02 });
    expect(r.method).toBe("adam");
    expect(r.loss).toBeLessThan(2e-3); // mean of sin² over the grid ≈ 0.5 before fitting
    const wrong = new ImitationDataset(2, 1);
    const e = catchRecedeError(() => fitPolicy(policy, theta, wrong), {
      fn: "fitPolicy",
      arg: "data",
    });
    expect(e).toBeInstanceOf(RecedeError);
    catchRecedeError(
      () =>
        dagger({
          environment: {} as never,
          expert: swingUpExpert,
          policy,
          rounds: 1,
          episodesPerRound: 1,
        }),
      { fn: "dagger", arg: "environment" },
    );
  });
});
