/**
 * Text made safe for SVG and HTML: what every picture and page of the report
 * puts around a name or a value read from a file.
 *
 * @module
 */

/**
 * Escapes text for SVG/HTML.
 *
 * @example
 * ```ts
 * import { escapeXml } from "./escape_xml.ts";
 * if (escapeXml("<b>&") !== "&lt;b&gt;&amp;" || escapeXml(5) !== "5" || escapeXml(null) !== "") throw new Error();
 * ```
 */
export function escapeXml(text: unknown): string {
  // Any value from a file (a number, null, an object where a string was expected) is
  // turned into text first, so that nothing reaches the page unescaped.
  return String(text ?? "").replace(
    /[&<>"']/g,
    (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!,
  );
}
