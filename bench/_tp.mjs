import { mppi } from "@recede/mpc";
import { bicycle, cartPole } from "@recede/problems";
const res = {};
for (const name of ["bicycle", "cart-pole"]) {
  const p = name === "bicycle" ? bicycle() : cartPole();
  const ctrl = mppi({ dynamics: p.dynamics, cost: p.cost, horizon: 50, samples: 2000, noise: name === "bicycle" ? [0.75, 0.3] : [4], bounds: p.bounds, seed: 7 });
  const x = p.initialState();
  const go = (n) => { for (let s = 0; s < n; s++) { const { control } = ctrl.act(x); p.dynamics.step(x, 0, control, 0, 1, 0); } };
  go(5);
  const r = [];
  for (let i = 0; i < 7; i++) { const c0 = process.cpuUsage(); go(10); const c = process.cpuUsage(c0); r.push(10 / ((c.user + c.system) / 1e6)); }
  r.sort((a, b) => a - b);
  res[name] = { median: r[3].toFixed(1), best: r[6].toFixed(1), plan: Array.from(ctrl.plan().slice(0, 3)) };
}
console.log(JSON.stringify(res));
