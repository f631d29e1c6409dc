import { suite } from "./mpc.ts";
const quick = process.argv.includes("--quick");
const out = await suite.run({ quick, log: (m) => process.stderr.write(m + "\n") });
for (const l of out.lines) console.log(l);
import { writeFileSync } from "node:fs";
writeFileSync("/tmp/mpc-bench.json", JSON.stringify(out.result, null, 1));
