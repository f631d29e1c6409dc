import { createStream } from "@recede/core";
import { createRollout, exponentialUtility, gaussianPlan, shiftPlan } from "@recede/mpc";
import { bicycle, cartPole } from "@recede/problems";
const model = process.argv[2], which = process.argv[3];
const p = model === "bicycle" ? bicycle() : cartPole();
const K = 64, H = 20, m = p.controlSize;
const { lower, upper } = p.bounds;
const rollout = createRollout({ dynamics: p.dynamics, cost: p.cost, samples: K, horizon: H, lower, upper });
const plan = gaussianPlan({ std: model === "bicycle" ? [0.75, 0.3] : [4] }).create({ horizon: H, controlSize: m, samples: K, lower, upper, caller: "x" });
const loss = exponentialUtility({ temperature: 1 });
const shift = shiftPlan();
const stream = createStream(1);
const buf = new Float64Array(K * H * m); const w = new Float64Array(K);
const x0 = p.initialState(); const xs = new Float64Array(4*K); for (let k=0;k<K;k++) xs.set(x0, 4*k); const us = new Float64Array(K*m).fill(0.3); const out = new Float64Array(K);
plan.sample(stream, 0, K, buf);
const parts = {
  none: () => {},
  sample: () => plan.sample(stream, 0, K, buf),
  clip: () => rollout.clip(buf, 0, K),
  run: () => { rollout.run(x0, buf, 0, K); },
  dyn: () => p.dynamics.step(xs, 0, us, 0, K, 0),
  running: () => p.cost.running(xs, 0, us, 0, K, 0, out, 0),
  terminal: () => p.cost.terminal(xs, 0, K, out, 0),
  weigh: () => { loss.weigh(rollout.costs, K, w); },
  update: () => plan.update(buf, K, w, true, 1),
  shift: () => shift.apply(plan, 1),
  sync: () => plan.sync(),
  copy: () => { const b = plan.blocks[1]; b.data.copyWithin(0, 1, 20); },
  copy2: () => { const b = plan.blocks[0]; b.data.copyWithin(0, 1, 20); },
};
const f = parts[which];
function loop(n) { for (let i = 0; i < n; i++) f(); }
for (let r = 0; r < 20; r++) loop(5000);
const res = [];
for (const N of [20000, 100000]) { gc(); const h0 = process.memoryUsage().heapUsed; loop(N); res.push(process.memoryUsage().heapUsed - h0); }
console.log(model, which, ((res[1] - res[0]) / 80000).toFixed(2));
