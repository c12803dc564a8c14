import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/**/*.test.ts"],
    exclude: ["test/browser/**", "node_modules/**"],
    // Generous: CI machines are slow and noisy; speed is measured by `npm run bench`, not here.
    testTimeout: 300_000,
    hookTimeout: 300_000,
    pool: "forks",
  },
});
