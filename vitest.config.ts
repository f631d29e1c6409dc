import { defineConfig } from "vitest/config";

// Tests import workspace packages by name; the "recede-source" export condition maps them to
// their TypeScript sources so the suite needs no prior build.
export default defineConfig({
  resolve: { conditions: ["recede-source", "module", "node", "default"] },
  ssr: { resolve: { conditions: ["recede-source", "module", "node", "default"] } },
  test: {
    include: ["packages/*/src/**/*.test.ts", "bench/src/**/*.test.ts", "examples/src/**/*.test.ts"],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: "forks",
    setupFiles: ["./vitest.setup.ts"],
  },
});
