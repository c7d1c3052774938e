import { defineConfig } from "vitest/config";
import base from "./vitest.config.mjs";

// The tests `npm run mutation` runs against each mutant (stryker.config.json): the unit tests of
// lib/math, of the engine's statistics, fit and advice, and of the advice's figures, which need no
// database and take seconds. Modules that run inside worker threads are not mutated: a mutant is
// switched on in the test's thread only, so a worker would compute with the original code.
export default defineConfig({
  ...base,
  test: {
    ...base.test,
    // Python references start slowly on a busy machine.
    testTimeout: 180_000,
    include: [
      "tests/lib/math/**/*.test.ts",
      "tests/lib/analysis/advice.test.ts",
      "tests/lib/analysis/skew.test.ts",
      "tests/lib/analysis/heterogeneity.test.ts",
      "tests/lib/analysis/feature-shift.test.ts",
      "tests/lib/analysis/fit.test.ts",
      "tests/lib/reports/bound-curves.test.ts",
      "tests/lib/reports/regime-map.test.ts",
    ],
  },
});
