import { createStream } from "@recede/core";
import { createRollout, gaussianPlan, eliteFraction, exponentialUtility, shiftPlan, linearDynamics, linearQuadraticCost } from "@recede/mpc";
const dyn = linearDynamics({ a: [[1, 0.1], [0, 1]], b: [[0.005], [0.1]] });
const cost = linearQuadraticCost({ stateSize: 2, controlSize: 1, q: [[1, 0], [0, 1]], r: [[0.1]] });
const K = 64, H = 20;
const lo = Float64Array.of(-3), hi = Float64Array.of(3);
const dist = gaussianPlan({ std: 1, adaptVariance: true, minStd: 0.01 }).create({ horizon: H, controlSize: 1, samples: K, lower: lo, upper: hi, caller: "x" });
const eng = createRollout({ dynamics: dyn, cost, samples: K, horizon: H, lower: lo, upper: hi });
const buf = new Float64Array(K * H);
const st = createStream(1).fork(0);
const w = new Float64Array(K);
const x0 = Float64Array.of(1, 0);
const el = eliteFraction({ fraction: 0.1 });
const eu = exponentialUtility({ temperature: 1 });
const sh = shiftPlan({ spreadFill: "reset" });
const which = process.argv[2];
const N = Number(process.argv[3]);
const parts: Record<string, () => void> = {
  sample: () => dist.sample(st, 0, K, buf),
  run: () => { eng.run(x0, buf, 0, K); },
  el: () => { el.weigh(eng.costs, K, w); },
  eu: () => { eu.weigh(eng.costs, K, w); },
  update: () => dist.update(buf, K, w, true, 1),
  shift: () => sh.apply(dist, 1),
};
for (const f of Object.values(parts)) for (let i = 0; i < 2000; i++) f();
const f = parts[which];
for (let i = 0; i < N; i++) f();
