import path from "node:path";
import { defineConfig } from "vitest/config";

// Browser tests against a running app (E2E_BASE_URL, set by scripts/test.ts). One file at a time:
// they share one server and its database, and each drives a real Chromium.
export default defineConfig({
  resolve: {
    alias: {
      "@": path.resolve(import.meta.dirname),
      "server-only": path.resolve(import.meta.dirname, "tests/support/server-only-stub.ts"),
    },
  },
  test: {
    environment: "node",
    include: ["tests/e2e/**/*.test.ts"],
    setupFiles: ["tests/e2e/support/fresh-client-budgets.ts"],
    fileParallelism: false,
    testTimeout: 120_000,
    hookTimeout: 120_000,
  },
});
