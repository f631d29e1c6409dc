import { createStream } from "@recede/core";
import { createRollout, gaussianPlan, linearDynamics, linearQuadraticCost } from "@recede/mpc";
const dyn = linearDynamics({ a: [[1, 0.1], [0, 1]], b: [[0.005], [0.1]] });
const cost = linearQuadraticCost({ stateSize: 2, controlSize: 1, q: [[1, 0], [0, 1]], r: [[0.1]] });
const K = 2000, H = 50, S = 64, NS = Math.ceil(K / S);
const lo = Float64Array.of(-3), hi = Float64Array.of(3);
const dist = gaussianPlan({ std: 1 }).create({ horizon: H, controlSize: 1, samples: K, lower: lo, upper: hi, caller: "x" });
const eng = createRollout({ dynamics: dyn, cost, samples: K, horizon: H, lower: lo, upper: hi });
const buf = new Float64Array(K * H);
const streams = Array.from({ length: NS }, (_, s) => createStream(1).fork(s));
const x0 = Float64Array.of(1, 0);
const which = process.argv[2];
const N = Number(process.argv[3]);
const parts: Record<string, () => void> = {
  fill: () => { for (let s = 0; s < NS; s++) streams[s].fillNormal(buf, s * S * H, Math.min(S, K - s * S) * H); },
  sample: () => { for (let s = 0; s < NS; s++) dist.sample(streams[s], s * S, Math.min(S, K - s * S), buf); },
  clip: () => { for (let s = 0; s < NS; s++) eng.clip(buf, s * S, Math.min(S, K - s * S)); },
  run: () => { for (let s = 0; s < NS; s++) eng.run(x0, buf, s * S, Math.min(S, K - s * S)); },
};
for (const f of Object.values(parts)) for (let i = 0; i < 100; i++) f();
const f = parts[which];
for (let i = 0; i < N; i++) f();
const gc = (globalThis as any).gc as (() => void) | undefined;
if (gc) for (const [name, g] of Object.entries(parts)) for (let w = 0; w < 2; w++) {
  gc();
  const h0 = process.memoryUsage().heapUsed;
  for (let i = 0; i < 200; i++) g();
  console.log(name, ((process.memoryUsage().heapUsed - h0) / 200).toFixed(1), "B/call");
}
if (gc) for (let w = 0; w < 3; w++) {
  gc();
  const h0 = process.memoryUsage().heapUsed;
  for (let i = 0; i < 200; i++) for (let s = 0; s < NS; s++) eng.clip(buf, s * S, 64);
  const h1 = process.memoryUsage().heapUsed;
  for (let i = 0; i < 200; i++) for (let s = 0; s < NS; s++) eng.run(x0, buf, s * S, 64);
  const h2 = process.memoryUsage().heapUsed;
  for (let i = 0; i < 200; i++) { }
  const h3 = process.memoryUsage().heapUsed;
  console.log("direct clip", ((h1 - h0) / 200).toFixed(1), "run", ((h2 - h1) / 200).toFixed(1), "empty", ((h3 - h2) / 200).toFixed(1));
}
