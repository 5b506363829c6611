/**
 * `lazyImport`: a module loaded when it is first asked for, out of sight of
 * Deno's module graph.
 *
 * Deno builds the graph of every `import("./literal.ts")` it can read in the
 * code at start-up, whether or not the import ever runs: with the table of
 * analyses naming every command, report section and metadata schema that
 * way, `quiver --version` read and parsed the whole program (measured: a
 * never-called `import("../../cli/run.ts")` cost about 150 ms of CPU). A
 * specifier made at run time is resolved only when the import runs. The
 * caller names the module's type with `typeof import(…)`, which Deno's
 * type checker follows and `deno run` does not load.
 *
 * @module
 */

/**
 * Imports `specifier`, relative to `base` (the caller's `import.meta.url`),
 * when called.
 *
 * @example
 * ```ts
 * import { lazyImport } from "./lazy_import.ts";
 * const m = await lazyImport<typeof import("./version.ts")>("./version.ts", import.meta.url);
 * if (!/^\d+\.\d+\.\d+/.test(m.QUIVER_VERSION)) throw new Error(m.QUIVER_VERSION);
 * ```
 */
export function lazyImport<M>(specifier: string, base: string): Promise<M> {
  return import(/* @vite-ignore */ new URL(specifier, base).href);
}
