import { defineConfig } from "vitest/config";
import path from "node:path";

// One runner for every layer: unit (pure), integration (real PostgreSQL, real SSH)
// and e2e (playwright-core driving Debian's chromium against the built app).
export default defineConfig({
  resolve: { alias: { "@": path.resolve(import.meta.dirname) } },
  test: {
    environment: "node",
    testTimeout: 60_000,
    hookTimeout: 120_000,
    // server-only throws outside a React Server environment; tests import lib/ directly.
    alias: { "server-only": path.resolve(import.meta.dirname, "tests/support/empty.ts") },
    projects: [
      { extends: true, test: { name: "unit", include: ["tests/unit/**/*.test.ts"] } },
      { extends: true, test: { name: "integration", include: ["tests/integration/**/*.test.ts"], fileParallelism: false } },
      { extends: true, test: { name: "e2e", include: ["tests/e2e/**/*.test.ts"], fileParallelism: false } },
    ],
  },
});
