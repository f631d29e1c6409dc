import { mppi, linearDynamics, linearQuadraticCost } from "@recede/mpc";
import { cartPole } from "@recede/problems";
const gc = (globalThis as any).gc as () => void;
const dyn = linearDynamics({ a: [[1, 0.1], [0, 1]], b: [[0.005], [0.1]] });
const cost = linearQuadraticCost({ stateSize: 2, controlSize: 1, q: [[1, 0], [0, 1]], r: [[0.1]] });
const cp = cartPole();
const which = process.argv[2];
const [d, c, b] = which === "linear" ? [dyn, cost, { lower: Float64Array.of(-3), upper: Float64Array.of(3) }] : [cp.dynamics, cp.cost, cp.bounds];
const ctrl = mppi({ dynamics: d, cost: c, horizon: 50, samples: 2000, seed: 1, bounds: b, timing: false, sliceSize: Number(process.argv[3] ?? 64) });
const x = new Float64Array(d.stateSize);
for (let i = 0; i < 100; i++) ctrl.act(x);
for (let w = 0; w < 3; w++) {
  gc();
  const h0 = process.memoryUsage().heapUsed;
  for (let i = 0; i < 100; i++) ctrl.act(x);
  console.log(which, ((process.memoryUsage().heapUsed - h0) / 100).toFixed(1), "B/step");
}
