/**
 * The report's section modules come from the analyses' descriptors (each
 * descriptor's `report`): a command's name to the lazy loader of the module
 * that builds its steps' sections. The report asks only
 * {@linkcode loaderFor}; a command without a section module shows no
 * section (its step is still in the trace).
 *
 * @module
 */
import { ANALYSES, type AnalysisTable } from "../analyses.ts";
import type { SectionLoader } from "./section.ts";

/**
 * The loader of the section module for a command, or undefined when the
 * command has none.
 *
 * @param command A step's command.
 * @param table The analyses (default: quiver's).
 *
 * @example
 * ```ts
 * import { loaderFor } from "./section_loaders.ts";
 * const load = loaderFor("spectrum");
 * if (load === undefined || typeof (await load()).section !== "function") throw new Error();
 * if (loaderFor("toString") !== undefined || loaderFor("nonesuch") !== undefined) throw new Error();
 * ```
 */
export function loaderFor(
  command: string,
  table: AnalysisTable = ANALYSES,
): SectionLoader | undefined {
  return table.get(command)?.report;
}
