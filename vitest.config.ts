/**
 * Vitest settings. CI runs on a loaded 2-core machine, where a subprocess
 * test that takes 2 s on an idle one can take 20: the timeouts below are
 * there so that no test depends on speed. They are limits for a hang, not
 * expectations of how long a test takes.
 */
import { defineConfig } from "vitest/config";

export default defineConfig({
  resolve: {
    // The library imports its npm packages as `npm:name@version`, so that a Deno script
    // outside the project can import mod.ts by path; Vite resolves them by name from
    // node_modules, where the same versions are installed.
    alias: [{ find: /^npm:((?:@[^/@]+\/)?[^/@]+)@[^/]+(\/.*)?$/, replacement: "$1$2" }],
  },
  test: {
    include: ["tests/**/*.test.ts"],
    testTimeout: 240_000,
    hookTimeout: 300_000,
  },
});
