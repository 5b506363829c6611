/**
 * The scripts inlined into the report: the vendored chart library (uPlot,
 * with its licence notice), the script that draws the interactive charts,
 * and the script of the report's own views.
 *
 * @module
 */
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";

/** A file of the vendored chart library (lib/report/vendor/uplot/). */
export function vendorFile(file: string): string {
  return readFileSync(fileURLToPath(new URL(`./vendor/uplot/${file}`, import.meta.url)), "utf8");
}

/** The inlined chart library with its licence notice, and the script that draws the charts. */
export function chartScripts(): string {
  const client = readFileSync(fileURLToPath(new URL("./chart_client.js", import.meta.url)), "utf8");
  const views = readFileSync(fileURLToPath(new URL("./views_client.js", import.meta.url)), "utf8");
  // "</" inside inlined code could close the script element; none may appear.
  const library = vendorFile("uPlot.iife.min.js");
  for (const code of [library, client, views]) {
    if (code.includes("</script")) throw new Error("inlined script holds </script");
  }
  return `<!-- uPlot 1.6.32, MIT licence:\n${
    vendorFile("LICENSE").replace(/--/g, "- -")
  }\n-->\n<script>${library}</script>\n<script>${client}</script>\n<script>${views}</script>`;
}
