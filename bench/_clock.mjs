const buf = new Float64Array(4);
function stamp(out, i) { out[i] = performance.now(); }
function stampDate(out, i) { out[i] = Date.now(); }
const { hrtime } = process;
const which = process.argv[2];
function loop(n) { for (let i = 0; i < n; i++) { if (which === "perf") stamp(buf, 0); else if (which === "date") stampDate(buf, 1); else if (which==="direct") buf[2] = performance.now(); } }
for (let r=0;r<5;r++) loop(20000);
const res=[];
for (const N of [20000, 80000]) { gc(); const h0 = process.memoryUsage().heapUsed; loop(N); res.push(process.memoryUsage().heapUsed - h0); }
console.log(which, ((res[1]-res[0])/60000).toFixed(2));
