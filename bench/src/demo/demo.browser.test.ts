import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { chromium } from "playwright-core";
import { describe, expect, it } from "vitest";
import { readResults } from "../results.js";
import { runDemo } from "./demo.js";

// The demo end to end in its reduced setting, then its report in a real headless Chromium
// (Debian's package). Outputs stay under out/ for people to look at.
const outDir = resolve("out", "test-demo");
const CHROMIUM = "/usr/bin/chromium";
const haveChromium = existsSync(CHROMIUM);
const inCi = process.env.CI === "true";

const promisedCharts = [
  "landing-trajectories.svg",
  "touchdowns.svg",
  "gusts.svg",
  "cost-parcel-drone.svg",
  "regret-parcel-drone.svg",
  "tracked-regret-parcel-drone.svg",
  "compute-parcel-drone.svg",
  "samples-cost-parcel-drone.svg",
];

let demo: Awaited<ReturnType<typeof runDemo>> | undefined;
async function demoFiles(): Promise<Awaited<ReturnType<typeof runDemo>>> {
  if (!demo) {
    rmSync(outDir, { recursive: true, force: true });
    demo = await runDemo({
      outDir,
      quick: true,
      print: false,
      command: "pnpm demo --quick (test)",
    });
  }
  return demo;
}

describe("pnpm demo --quick", () => {
  it("writes every file it promises", async () => {
    const files = await demoFiles();
    for (const f of ["report.html", "report.md", "results.jsonl", "sweep.json", ...promisedCharts])
      expect(existsSync(join(outDir, f)), f).toBe(true);
    expect(files.charts.map((c) => c.split("/").pop()).sort()).toEqual([...promisedCharts].sort());
    const records = readResults(files.resultsJsonl);
    // 5 optimizers × 2 seeds, none failed, each with a trajectory and scenario metrics.
    expect(records).toHaveLength(10);
    expect(new Set(records.map((r) => r.optimizer)).size).toBe(5);
    for (const r of records) {
      expect(r.error, r.key).toBeUndefined();
      expect(r.trajectory!.length).toBe(r.steps + 1);
      expect(Object.keys(r.metrics).sort()).toEqual(
        ["landed", "landingTime", "missDistance", "touchdownSpeed", "touchdownTilt"].sort(),
      );
    }
    const md = readFileSync(files.reportMd, "utf8");
    for (const o of ["MPPI", "CEM", "γ=0.7", "LQR (hover gain, glide path)", "DAgger policy"])
      expect(md).toContain(o);
    expect(md).toContain("touchdown speed");
    for (const c of promisedCharts) {
      const svg = readFileSync(join(outDir, c), "utf8");
      expect(svg.startsWith("<svg")).toBe(true);
      expect(svg).toContain("<path"); // something was drawn
    }
  });

  it.skipIf(!haveChromium && !inCi)(
    "report.html opens in headless Chromium with no console errors and every chart visible",
    async () => {
      if (!haveChromium)
        throw new Error(
          `Chromium not found at ${CHROMIUM}: install Debian's package (apt-get install -y chromium); CI must have it`,
        );
      const files = await demoFiles();
      const profile = mkdtempSync(join(tmpdir(), "recede-chromium-"));
      const context = await chromium.launchPersistentContext(profile, {
        executablePath: CHROMIUM,
        headless: true,
        args: [
          "--headless",
          "--no-sandbox",
          "--disable-gpu",
          "--disable-quic",
          "--no-first-run",
          "--disable-background-networking",
          "--disable-component-update",
          "--disable-sync",
        ],
        viewport: { width: 1280, height: 900 },
      });
      try {
        const page = await context.newPage();
        const problems: string[] = [];
        page.on("console", (m) => {
          if (m.type() === "error") problems.push(`console error: ${m.text()}`);
        });
        page.on("pageerror", (e) => problems.push(`page error: ${e.message}`));
        page.on("request", (r) => {
          if (!r.url().startsWith("file:")) problems.push(`network request: ${r.url()}`);
        });
        await page.goto(pathToFileURL(files.reportHtml).href, { waitUntil: "load" });
        const charts = page.locator("figure.chart svg");
        expect(await charts.count()).toBe(promisedCharts.length);
        for (let i = 0; i < promisedCharts.length; i++) {
          const chart = charts.nth(i);
          await chart.scrollIntoViewIfNeeded();
          expect(await chart.isVisible()).toBe(true);
          const box = await chart.boundingBox();
          expect(box!.width).toBeGreaterThan(200);
          expect(box!.height).toBeGreaterThan(100);
        }
        expect(await page.locator("table tbody tr").count()).toBe(5);
        await page.screenshot({ path: join(outDir, "report-screenshot.png"), fullPage: true });
        expect(problems).toEqual([]);
      } finally {
        await context.close();
        rmSync(profile, { recursive: true, force: true });
      }
    },
  );
});
