/**
 * Every ```ts block in README.md and docs/guides/*.md runs as written: each block is written to a
 * module next to this file and imported (the workspace packages resolve to their sources).
 */
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { afterAll, describe, expect, it } from "vitest";

const root = fileURLToPath(new URL("../../", import.meta.url));
const outDir = fileURLToPath(new URL("./.snippets/", import.meta.url));

function blocks(file: string): string[] {
  const text = readFileSync(join(root, file), "utf8");
  const out: string[] = [];
  const re = /```ts\n([\s\S]*?)```/g;
  for (let m = re.exec(text); m !== null; m = re.exec(text)) out.push(m[1]);
  return out;
}

const files = [
  "README.md",
  ...readdirSync(join(root, "docs/guides")).map((f) => `docs/guides/${f}`),
]
  .filter((f) => f.endsWith(".md"))
  .sort();

const cases: Array<[string, number, string]> = [];
for (const f of files) {
  blocks(f).forEach((code, i) => {
    cases.push([f, i, code]);
  });
}

describe("documentation snippets", () => {
  mkdirSync(outDir, { recursive: true });
  afterAll(() => rmSync(outDir, { recursive: true, force: true }));

  it("finds snippets in the README", () => {
    expect(cases.filter(([f]) => f === "README.md").length).toBeGreaterThanOrEqual(2);
  });

  for (const [file, index, code] of cases) {
    it(`${file} block ${index + 1} runs`, async () => {
      const path = join(outDir, `${file.replace(/[^a-z0-9]/gi, "_")}_${index}.ts`);
      writeFileSync(path, `${code}\nexport {};\n`);
      const logs: unknown[][] = [];
      const orig = console.log;
      console.log = (...args: unknown[]) => {
        logs.push(args);
      };
      try {
        await import(pathToFileURL(path).href);
      } finally {
        console.log = orig;
      }
      for (const line of logs) {
        for (const v of line) if (typeof v === "number") expect(Number.isFinite(v)).toBe(true);
      }
    });
  }
});
