import { mppi, startRolloutWorkers } from "@recede/mpc";
import { bicycle } from "@recede/problems";
const K = +process.argv[2] || 2000, H = +process.argv[3] || 50;
async function make(workers) {
  const pool = await startRolloutWorkers({ model: { module: "@recede/problems", factory: "bicycle", args: [{}] }, workers, minWork: 0 });
  const ctrl = mppi({ dynamics: pool.dynamics, cost: pool.cost, workers: pool, horizon: H, samples: K, noise: [0.75, 0.3], seed: 5, bounds: bicycle().bounds, timing: false });
  const x = new Float64Array(4);
  const run = (n) => { for (let s = 0; s < n; s++) { const { control } = ctrl.act(x); pool.dynamics.step(x, 0, control, 0, 1, 0); } };
  run(5);
  return { pool, run };
}
const a = await make(0), b = await make(1);
const n = Math.max(5, Math.round(4e6 / K / H));
const ra = [], rb = [];
for (let r = 0; r < 7; r++) {
  let t = performance.now(); a.run(n); ra.push(n * 1000 / (performance.now() - t));
  t = performance.now(); b.run(n); rb.push(n * 1000 / (performance.now() - t));
}
const med = (v) => [...v].sort((p, q) => p - q)[v.length >> 1];
console.log(`K=${K} H=${H} 1 thread ${med(ra).toFixed(1)} steps/s, 2 threads ${med(rb).toFixed(1)}, speed-up ${(med(rb) / med(ra)).toFixed(2)}`, ra.map(v=>v.toFixed(0)).join(","), "|", rb.map(v=>v.toFixed(0)).join(","));
await a.pool.close(); await b.pool.close();
