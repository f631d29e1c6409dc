import { createStream, mahalanobis, RecedeError } from "@recede/core";
import {
  environmentFromProblem,
  fisherGeometry,
  gae,
  linearGaussianPolicy,
  mlpGaussianPolicy,
  policyActor,
  policyOptimizer,
  reinforce,
  type ScoredSamples,
  softmaxPolicy,
  surrogateLoss,
  trainPolicy,
} from "@recede/policy-gradient";
import { doubleIntegrator } from "@recede/problems";
import { catchRecedeError } from "@recede/testkit";
import fc from "fast-check";
import { describe, expect, it } from "vitest";

const problem = doubleIntegrator({ dt: 0.1, q: 1, r: 0.1 });
const env = environmentFromProblem(problem, {
  horizon: 40,
  initialState: new Float64Array(2),
  initialStateStd: 1,
});

function batchFor(
  policy: ReturnType<typeof mlpGaussianPolicy> | ReturnType<typeof linearGaussianPolicy>,
  theta: Float64Array,
  seed: number,
  episodes = 20,
): ScoredSamples {
  const b = env.createBatch(episodes);
  env.collect(policy, theta, createStream(seed), b);
  const s = reinforce({ discount: 0.95 }).score(b);
  // copy: the estimator's buffers are reused by later calls
  return {
    ...s,
    weights: s.weights.slice(),
    states: s.states.slice(),
    actions: s.actions.slice(),
    logProbs: s.logProbs.slice(),
  };
}

describe("policyOptimizer: the update is the geometry's mirror step", () => {
  it("Euclidean geometry: θ⁺ = θ − η ∇L(θ) (vanilla policy gradient)", () => {
    const pi = linearGaussianPolicy({
      stateSize: 2,
      actionSize: 1,
      initialGain: [[1, 1.5]],
      initialStd: 0.5,
    });
    const opt = policyOptimizer({ policy: pi, stepSize: 0.03 });
    const theta = opt.decision().slice();
    const s = batchFor(pi, theta, 1);
    const g = new Float64Array(pi.parameterCount);
    const L = surrogateLoss(pi, theta, s, g);
    opt.update({ samples: s });
    for (let i = 0; i < theta.length; i++)
      expect(opt.decision()[i]).toBeCloseTo(theta[i] - 0.03 * g[i], 14);
    expect(opt.round).toBe(1);
    expect(opt.lastReport?.surrogate).toBeCloseTo(L, 14);
  });

  it("a user-supplied geometry plugs in: a core Mahalanobis metric M gives θ⁺ = θ − η M⁻¹ ∇L(θ)", () => {
    const pi = linearGaussianPolicy({
      stateSize: 2,
      actionSize: 1,
      initialGain: [[1, 1.5]],
      initialStd: 0.5,
    });
    const M = [
      [4, 0, 0, 0],
      [0, 2, 0, 0],
      [0, 0, 1, 0],
      [0, 0, 0, 8],
    ];
    const opt = policyOptimizer({
      policy: pi,
      geometry: mahalanobis({ metric: M }),
      stepSize: 0.1,
    });
    const theta = opt.decision().slice();
    const s = batchFor(pi, theta, 2);
    const g = new Float64Array(4);
    surrogateLoss(pi, theta, s, g);
    opt.update({ samples: s });
    for (let i = 0; i < 4; i++)
      expect(opt.decision()[i]).toBeCloseTo(theta[i] - (0.1 * g[i]) / M[i][i], 14);
  });

  it("Fisher geometry = core Mahalanobis geometry with the dense damped Fisher matrix as metric", () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 1e6 }), (seed) => {
        const pi = mlpGaussianPolicy({
          stateSize: 2,
          actionSize: 1,
          hidden: [4],
          seed,
          outputScale: 1,
          initialStd: 0.7,
        });
        const theta = pi.initialParameters();
        const s = batchFor(pi, theta, seed, 4);
        const d = pi.parameterCount;
        const geo = fisherGeometry(pi, { damping: 1e-2, maxIterations: 200, tolerance: 1e-14 });
        geo.prepare(theta, s.states, 0, s.count);
        // Dense F + ζI from products with the basis vectors.
        const F = new Float64Array(d * d);
        const e = new Float64Array(d);
        const col = new Float64Array(d);
        for (let j = 0; j < d; j++) {
          e.fill(0);
          e[j] = 1;
          geo.apply(e, col);
          for (let i = 0; i < d; i++) F[i * d + j] = col[i];
        }
        const ref = mahalanobis({ metric: { data: F, rows: d, cols: d }, symmetryTolerance: 1e-9 });
        const g = new Float64Array(d);
        surrogateLoss(pi, theta, s, g);
        const a = geo.step(theta, g, 0.1, new Float64Array(d));
        const b = ref.step(theta, g, 0.1, new Float64Array(d));
        let err = 0;
        let sc = 0;
        for (let i = 0; i < d; i++) {
          err = Math.max(err, Math.abs(a[i] - b[i]));
          sc = Math.max(sc, Math.abs(b[i] - theta[i]));
        }
        expect(err).toBeLessThan(1e-7 * (1 + sc));
        // D(x‖y) = ½(x−y)ᵀM(x−y) in both
        // (relative: the divergence reaches 10⁵ for some parameter draws)
        const dGeo = geo.divergence(a, theta);
        const dRef = ref.divergence(a, theta);
        expect(Math.abs(dGeo - dRef)).toBeLessThanOrEqual(1e-10 * (1 + Math.abs(dRef)));
      }),
      { numRuns: 15 },
    );
  });

  it("KL trust region: every accepted step has measured mean KL ≤ δ and lowers the surrogate", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1e-4, max: 0.2, noNaN: true }),
        fc.integer({ min: 0, max: 1e6 }),
        (delta, seed) => {
          const pi = mlpGaussianPolicy({
            stateSize: 2,
            actionSize: 1,
            hidden: [6],
            seed,
            outputScale: 0.5,
            initialStd: 0.6,
          });
          const opt = policyOptimizer({
            policy: pi,
            geometry: "fisher",
            trustRegion: { radius: delta },
          });
          const theta0 = opt.decision().slice();
          const s = batchFor(pi, theta0, seed + 1, 10);
          opt.update({ samples: s });
          const r = opt.lastReport;
          if (r === null) throw new Error("no report");
          const measured = pi.meanKl(theta0, opt.decision(), s.states, 0, s.count);
          expect(measured).toBeLessThanOrEqual(delta);
          expect(measured).toBeCloseTo(r.kl, 14);
          if (r.accepted)
            expect(surrogateLoss(pi, opt.decision(), s, null)).toBeLessThan(r.surrogate);
          else expect(Array.from(opt.decision())).toEqual(Array.from(theta0));
        },
      ),
      { numRuns: 40 },
    );
  });
});

describe("policyOptimizer: failures and state", () => {
  const pi = linearGaussianPolicy({
    stateSize: 2,
    actionSize: 1,
    initialGain: [[1, 1.5]],
    initialStd: 0.5,
  });

  for (const mode of ["fixed", "trust"] as const) {
    it(`${mode}: a batch with a non-finite weight is a typed error and leaves θ, the round and the report untouched`, () => {
      const opt = policyOptimizer({
        policy: pi,
        geometry: "fisher",
        stepSize: 0.05,
        trustRegion: mode === "trust",
      });
      opt.update({ samples: batchFor(pi, opt.decision(), 3) });
      const before = opt.snapshot();
      const bad = batchFor(pi, opt.decision(), 4);
      bad.weights[5] = Number.NaN;
      const err = catchRecedeError(() => opt.update({ samples: bad }), {
        code: "non-finite",
        fn: "PolicyOptimizer.update",
        arg: "feedback.samples",
      });
      expect(err).toBeInstanceOf(RecedeError);
      expect(Array.from(opt.decision())).toEqual(Array.from(before.decision));
      expect(opt.round).toBe(1);
      expect(opt.lastReport).toBe(before.lastReport);
    });
  }

  it("snapshot/restore and reset", () => {
    const opt = policyOptimizer({ policy: pi, geometry: "fisher", stepSize: 0.05 });
    const s1 = batchFor(pi, opt.decision(), 5);
    opt.update({ samples: s1 });
    const snap = opt.snapshot();
    const s2 = batchFor(pi, opt.decision(), 6);
    opt.update({ samples: s2 });
    const after2 = opt.decision().slice();
    opt.restore(snap);
    expect(opt.round).toBe(1);
    opt.update({ samples: s2 });
    expect(Array.from(opt.decision())).toEqual(Array.from(after2));
    opt.reset();
    expect(opt.round).toBe(0);
    expect(Array.from(opt.decision())).toEqual(Array.from(pi.initialParameters()));
  });

  it("same seeds → bit-identical parameter traces (collection, GAE fit, CG, line search)", () => {
    const run = () => {
      const opt = policyOptimizer({ policy: pi, geometry: "fisher", trustRegion: true });
      const est = gae({ discount: 0.95 });
      const b = env.createBatch(10);
      const st = createStream(21);
      const trace: number[] = [];
      for (let k = 0; k < 5; k++) {
        env.collect(pi, opt.decision(), st, b);
        opt.update({ samples: est.score(b) });
        trace.push(...opt.decision());
      }
      return trace;
    };
    expect(run()).toEqual(run());
  });

  it("observers receive one record per round with the played θ", () => {
    const opt = policyOptimizer({ policy: pi, stepSize: 0.01 });
    const seen: number[][] = [];
    const off = opt.observe((r) => seen.push(Array.from(r.decision)));
    const theta0 = Array.from(opt.decision());
    opt.update({ samples: batchFor(pi, opt.decision(), 8) });
    off();
    opt.update({ samples: batchFor(pi, opt.decision(), 9) });
    expect(seen).toEqual([theta0]);
  });

  it("option errors name the function, the option, the expectation and the value", () => {
    catchRecedeError(() => policyOptimizer({ policy: pi, trustRegion: { radius: -1 } }), {
      fn: "policyOptimizer",
      arg: "trustRegion.radius",
      message: "-1",
    });
    catchRecedeError(
      () => policyOptimizer({ policy: pi, geometry: mahalanobis({ metric: [[1]] }) }),
      { fn: "policyOptimizer", arg: "geometry.dimension" },
    );
    catchRecedeError(() => policyOptimizer({ policy: pi, initial: new Float64Array(2) }), {
      fn: "policyOptimizer",
      arg: "initial",
    });
    catchRecedeError(() => fisherGeometry(pi, { damping: -1 }), {
      fn: "fisherGeometry",
      arg: "damping",
    });
    const geo = fisherGeometry(pi);
    catchRecedeError(
      () => geo.step(new Float64Array(4), new Float64Array(4), 1, new Float64Array(4)),
      { code: "state" },
    );
  });
});

describe("trainPolicy", () => {
  it("runs the collect–score–step loop deterministically and lowers the cost", () => {
    const pi = linearGaussianPolicy({
      stateSize: 2,
      actionSize: 1,
      initialGain: [[0.5, 0.5]],
      initialStd: 0.5,
    });
    const run = () =>
      trainPolicy({
        environment: env,
        optimizer: policyOptimizer({
          policy: pi,
          geometry: "fisher",
          trustRegion: { radius: 0.05 },
        }),
        estimator: gae({ discount: 0.95 }),
        rounds: 15,
        episodesPerRound: 40,
        seed: 5,
      });
    const a = run();
    const b = run();
    expect(Array.from(a.parameters)).toEqual(Array.from(b.parameters));
    expect(a.rounds).toHaveLength(15);
    expect(a.rounds[14].meanCost).toBeLessThan(a.rounds[0].meanCost);
    catchRecedeError(
      () =>
        trainPolicy({
          environment: env,
          optimizer: {} as never,
          estimator: gae(),
          rounds: 1,
          episodesPerRound: 1,
        }),
      { fn: "trainPolicy", arg: "optimizer" },
    );
  });
});

describe("discrete actions: softmax policy with a control table", () => {
  it("the KL-trust-region update lowers the closed-loop cost of a bang-zero-bang policy", () => {
    // Double integrator with three accelerations {−2, 0, 2}, quadratic cost, x₀ ∼ N((1, 0), 0.1²I).
    const denv = environmentFromProblem(problem, {
      horizon: 60,
      initialStateStd: 0.1,
      controls: [[-2], [0], [2]],
    });
    const pi = softmaxPolicy({ stateSize: 2, actionCount: 3 });
    const opt = policyOptimizer({ policy: pi, geometry: "fisher", trustRegion: { radius: 0.05 } });
    const batch = denv.createBatch(60);
    const stream = createStream(11);
    const est = reinforce({ discount: 0.98 });
    const costs: number[] = [];
    for (let k = 0; k < 30; k++) {
      denv.collect(pi, opt.decision(), stream, batch);
      costs.push(batch.meanCost());
      opt.update({ samples: est.score(batch) });
    }
    const actor = policyActor(pi, opt.decision(), { controls: [[-2], [0], [2]] });
    const greedy = denv.evaluate(actor, 20, createStream(12)).mean;
    // Measured (seeds 11/12): batch mean cost 324.6 under the uniform policy of round 1, 20.2 at
    // round 30; the arg-max deployment of the final policy costs 18.9.
    expect(costs[29]).toBeLessThan(0.2 * costs[0]);
    expect(greedy).toBeLessThan(costs[29]);
  });
});
