import { mppi } from "@recede/mpc";
import { bicycle, cartPole } from "@recede/problems";
const [model, timing] = [process.argv[2], process.argv[3] === "1"];
const p = model === "bicycle" ? bicycle() : cartPole();
const ctrl = mppi({ dynamics: p.dynamics, cost: p.cost, horizon: 20, samples: 64, noise: model === "bicycle" ? [0.75, 0.3] : [4], bounds: p.bounds, seed: 3, timing });
const x0 = p.initialState(); const x = p.initialState();
const step = (s) => { if (s % 200 === 0) x.set(x0); const { control } = ctrl.act(x); p.dynamics.step(x, 0, control, 0, 1, 0); };
for (let s = 0; s < 5000; s++) step(s);
const res = [];
for (const N of [10000, 40000, 10000, 40000]) {
  gc(); gc();
  const h0 = process.memoryUsage().heapUsed;
  for (let s = 0; s < N; s++) step(s);
  const h1 = process.memoryUsage().heapUsed;
  res.push([N, h1 - h0]);
}
const slope = ((res[1][1] - res[0][1]) + (res[3][1] - res[2][1])) / 2 / 30000;
console.log(model, "timing", timing, res.map(r => (r[1]/r[0]).toFixed(1)).join(" "), "slope", slope.toFixed(2), "B/step");
