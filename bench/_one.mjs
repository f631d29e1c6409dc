import { createRollout } from "@recede/mpc";
import { bicycle } from "@recede/problems";
const p = bicycle(); const K=64,H=20;
const rollout = createRollout({ dynamics: p.dynamics, cost: p.cost, samples: K, horizon: H, lower: p.bounds.lower, upper: p.bounds.upper });
const buf = new Float64Array(K*H*2).fill(3);
const xs = new Float64Array(4*K); const us = new Float64Array(K*2); const out = new Float64Array(K);
const which = process.argv[2];
function loop(n) { for (let i = 0; i < n; i++) { if (which === "clip") rollout.clip(buf, 0, K); else if (which === "none") {} else p.cost.running(xs, 0, us, 0, K, 0, out, 0); } }
loop(20000); gc();
const h0 = process.memoryUsage().heapUsed; loop(20000); const h1 = process.memoryUsage().heapUsed;
console.log(which, (h1-h0)/20000);
