import { createStream } from "@recede/core";
import { createRollout, gaussianPlan, exponentialUtility, eliteFraction, shiftPlan, linearDynamics, linearQuadraticCost } from "@recede/mpc";
const gc = (globalThis as any).gc as () => void;
const dyn = linearDynamics({ a: [[1, 0.1], [0, 1]], b: [[0.005], [0.1]] });
const cost = linearQuadraticCost({ stateSize: 2, controlSize: 1, q: [[1, 0], [0, 1]], r: [[0.1]] });
const K = 256, H = 50;
const lo = Float64Array.of(-3), hi = Float64Array.of(3);
const dist = gaussianPlan({ std: 1, adaptVariance: true }).create({ horizon: H, controlSize: 1, samples: K, lower: lo, upper: hi, caller: "x" });
const eng = createRollout({ dynamics: dyn, cost, samples: K, horizon: H, lower: lo, upper: hi });
const buf = new Float64Array(K * H);
const streams = Array.from({ length: 4 }, (_, s) => createStream(1).fork(s));
const w = new Float64Array(K);
const x0 = Float64Array.of(1, 0);
const eu = exponentialUtility({ temperature: 1 }), el = eliteFraction({ fraction: 0.1 });
const sh = shiftPlan();
const parts: Record<string, () => void> = {
  sample: () => { for (let s = 0; s < 4; s++) dist.sample(streams[s], s * 64, 64, buf); },
  clip: () => { for (let s = 0; s < 4; s++) eng.clip(buf, s * 64, 64); },
  run: () => { for (let s = 0; s < 4; s++) eng.run(x0, buf, s * 64, 64); },
  eu: () => { eu.weigh(eng.costs, K, w); },
  el: () => { el.weigh(eng.costs, K, w); },
  update: () => { dist.update(buf, K, w, true, 1); },
  shift: () => { sh.apply(dist, 1); },
  now: () => { performance.now(); },
  empty: () => {},
};
for (let i = 0; i < 200; i++) for (const f of Object.values(parts)) f();
for (const [name, f] of Object.entries(parts)) {
  gc();
  const h0 = process.memoryUsage().heapUsed;
  for (let i = 0; i < 20000; i++) f();
  const h1 = process.memoryUsage().heapUsed;
  console.log(name, ((h1 - h0) / 20000).toFixed(1), "B/call");
}
