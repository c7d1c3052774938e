import os from "node:os";
import path from "node:path";
import { defineConfig } from "vitest/config";
import base from "./vitest.config.mjs";

// The tests `npm run mutation` runs against each mutant (stryker.config.json): the unit tests of
// lib/math, of the engine's statistics, objective, fit and advice, of the summary's assembly, of the
// readers (whole files in each format too) and the encoder, of the input rules (tokens, quoting,
// sizes, order, options, given weights) and the row store and its memory limit, of the input
// errors' layout and the default thread counts, of the advice's figures, of the layout generators, and the focused
// tests of the digests and the simulation, which need no database and take seconds (the layout
// planner's own tests and the digests' equality test run whole analyses and are left out).
// Modules that run inside worker threads are not mutated: a mutant is
// switched on in the test's thread only, so a worker would compute with the original code.
export default defineConfig({
  ...base,
  test: {
    ...base.test,
    // Python references start slowly on a busy machine.
    testTimeout: 180_000,
    // Each reference is computed once per scoring run, not once per mutant (run-python.ts).
    env: { PARTITA_REFERENCE_DIR: path.join(os.tmpdir(), "partita-mutation-references") },
    include: [
      "tests/lib/math/**/*.test.ts",
      "tests/lib/analysis/advice.test.ts",
      "tests/lib/analysis/skew.test.ts",
      "tests/lib/analysis/heterogeneity.test.ts",
      "tests/lib/analysis/feature-shift.test.ts",
      "tests/lib/analysis/fit.test.ts",
      "tests/lib/analysis/loss-only-pass.test.ts",
      "tests/lib/analysis/objective-pass.test.ts",
      "tests/lib/analysis/assemble-summary.test.ts",
      "tests/lib/analysis/encode-design.test.ts",
      "tests/lib/analysis/decode-text.test.ts",
      "tests/lib/analysis/csv-reader.test.ts",
      "tests/lib/analysis/column-accumulator.test.ts",
      "tests/lib/analysis/partition-map.test.ts",
      "tests/lib/analysis/count-shards.test.ts",
      "tests/lib/analysis/count-rows.test.ts",
      "tests/lib/analysis/ingestion.test.ts",
      "tests/lib/analysis/tokens.test.ts",
      "tests/lib/analysis/quote-value.test.ts",
      "tests/lib/analysis/memory-size.test.ts",
      "tests/lib/analysis/code-point-order.test.ts",
      "tests/lib/analysis/parse-options.test.ts",
      "tests/lib/analysis/reference-weights.test.ts",
      "tests/lib/analysis/memory-limit.test.ts",
      "tests/lib/analysis/chunked-arrays.test.ts",
      "tests/lib/analysis/row-store.test.ts",
      "tests/lib/analysis/errors.test.ts",
      "tests/lib/analysis/choose-threads.test.ts",
      "tests/lib/analysis/table-reader.test.ts",
      "tests/lib/analysis/table-formats.test.ts",
      "tests/lib/analysis/parquet-reader.test.ts",
      "tests/lib/uploads/table-preview.test.ts",
      "tests/lib/analysis/read-dataset.test.ts",
      "tests/lib/analysis/dataset-rows.test.ts",
      "tests/lib/analysis/layouts/generators.test.ts",
      "tests/lib/analysis/layouts/generator-specs.test.ts",
      "tests/lib/analysis/layouts/group-balanced.test.ts",
      "tests/lib/analysis/layouts/layout-pieces.test.ts",
      "tests/lib/analysis/layouts/lloyd-iterations.test.ts",
      "tests/lib/analysis/layouts/seed-centres.test.ts",
      "tests/lib/analysis/digests/histogram-deciles.test.ts",
      "tests/lib/analysis/digests/schema-digest.test.ts",
      "tests/lib/analysis/digests/merge-schemas.test.ts",
      "tests/lib/analysis/digests/gradient-digest.test.ts",
      "tests/lib/analysis/digests/merge-gradients.test.ts",
      "tests/lib/analysis/digests/fit-pooled-optimum.test.ts",
      "tests/lib/analysis/digests/combine-parts.test.ts",
      "tests/lib/analysis/digests/digest-format.test.ts",
      "tests/lib/analysis/simulation-batch-gradient.test.ts",
      "tests/lib/analysis/simulation-run-algorithm.test.ts",
      "tests/lib/analysis/simulation-cost.test.ts",
      "tests/lib/analysis/simulation-schedule.test.ts",
      "tests/lib/analysis/identities.test.ts",
      "tests/lib/analysis/noise-and-feature-shift.test.ts",
      "tests/lib/analysis/label-bins.test.ts",
      "tests/lib/analysis/reference-model.test.ts",
      "tests/lib/analysis/digests/equality.test.ts",
      "tests/lib/analysis/text-input.test.ts",
      "tests/lib/analysis/analyze-design.test.ts",
      "tests/lib/analysis/simulation-plan.test.ts",
      "tests/lib/reports/bound-curves.test.ts",
      "tests/lib/reports/regime-map.test.ts",
    ],
  },
});
