import { defineConfig } from "vitest/config";

// Browser tests: the built demo archive served on 127.0.0.1 and read by
// headless Chromium (Debian's /usr/bin/chromium through playwright-core).
// Kept apart from `npm test` because they need that browser installed;
// `.ci/run` installs it and runs them with `npm run test:browser`.
export default defineConfig({
  test: {
    include: ["test/browser/**/*.test.ts"],
    // Generous: CI machines are slow and noisy; nothing here is timed.
    testTimeout: 300_000,
    hookTimeout: 300_000,
    pool: "forks",
    // One browser at a time on a 2-core machine.
    fileParallelism: false,
  },
});
