/**
 * Vitest settings. CI runs on a loaded 2-core machine, where a subprocess
 * test that takes 2 s on an idle one can take 20: the timeouts below are
 * there so that no test depends on speed. They are limits for a hang, not
 * expectations of how long a test takes.
 */
import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["tests/**/*.test.ts"],
    testTimeout: 240_000,
    hookTimeout: 300_000,
  },
});
