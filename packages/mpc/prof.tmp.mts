const __now = performance.now.bind(performance); if (process.argv[4] === "stub") (performance as any).now = () => 0;
import { mppi, cem, linearDynamics, linearQuadraticCost } from "@recede/mpc";
const dyn = linearDynamics({ a: [[1, 0.1], [0, 1]], b: [[0.005], [0.1]] });
const cost = linearQuadraticCost({ stateSize: 2, controlSize: 1, q: [[1, 0], [0, 1]], r: [[0.1]] });
const which = process.argv[2] ?? "mppi";
const ctrl = which === "mppi" ? mppi({ dynamics: dyn, cost, horizon: 20, samples: 64, seed: 1, bounds: { lower: Float64Array.of(-3), upper: Float64Array.of(3) } })
  : cem({ dynamics: dyn, cost, horizon: 20, samples: 64, seed: 1, iterations: 2 });
const x = Float64Array.of(1, 0);
for (let i = 0; i < 2000; i++) ctrl.act(x);
const gc = (globalThis as any).gc as () => void;
gc();
const h0 = process.memoryUsage().heapUsed;
const N = Number(process.argv[3] ?? 100000);
for (let i = 0; i < N; i++) ctrl.act(x);
const h1 = process.memoryUsage().heapUsed;
console.log(which, ((h1 - h0) / N).toFixed(2), "B/step (heap growth; scavenges may hide)");
