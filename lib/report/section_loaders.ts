/**
 * THE table of the report's section modules: a command's name to the lazy
 * loader of the module that builds its steps' sections. The report asks
 * only {@linkcode loaderFor}; a command without a section module shows no
 * section (its step is still in the trace).
 *
 * @module
 */
import type { SectionLoader } from "./section.ts";

const LOADERS: Readonly<Record<string, SectionLoader>> = {
  spectrum: () => import("./sections/spectrum.ts"),
  frf: () => import("./sections/frf.ts"),
  hammer: () => import("./sections/hammer.ts"),
  damping: () => import("./sections/damping.ts"),
  paths: () => import("./sections/paths.ts"),
  modal: () => import("./sections/modal.ts"),
  mac: () => import("./sections/mac.ts"),
  bands: () => import("./sections/bands.ts"),
  level: () => import("./sections/level.ts"),
  spectrogram: () => import("./sections/spectrogram.ts"),
  orders: () => import("./sections/orders.ts"),
  compare: () => import("./sections/compare.ts"),
};

/**
 * The loader of the section module for a command, or undefined when the
 * command has none.
 *
 * @example
 * ```ts
 * import { loaderFor } from "./section_loaders.ts";
 * const load = loaderFor("spectrum");
 * if (load === undefined || typeof (await load()).section !== "function") throw new Error();
 * if (loaderFor("toString") !== undefined || loaderFor("nonesuch") !== undefined) throw new Error();
 * ```
 */
export function loaderFor(command: string): SectionLoader | undefined {
  return Object.hasOwn(LOADERS, command) ? LOADERS[command] : undefined;
}
