/** Shape sets whose MACs are set by construction, for the ambiguous-pair tests. */
import { parseShapes } from "../../lib/modal/shapes.ts";

/**
 * Four-point shapes of our own with MACs set by construction: a real shape (cos θ, sin θ, 0, 0)
 * against (1, 0, 0, 0) has MAC cos²θ (Allemang & Brown 1982, for real vectors).
 */
export function ambiguousSets(secondMac: number, firstMac = 0.954) {
  const a = Math.acos(Math.sqrt(firstMac)), b = Math.acos(Math.sqrt(secondMac));
  const row = (mode: number, hz: number, v: readonly number[]) =>
    v.map((x, p) => `${mode},${hz},P${p + 1},+z,${x}`).join("\n");
  const test = parseShapes(
    "mode,frequency_hz,point,direction,value\n" +
      [row(1, 40, [1, 0, 0, 0]), row(2, 90, [0, 0, 0, 1])].join("\n") + "\n",
  );
  const simulation = parseShapes(
    "mode,frequency_hz,point,direction,value\n" + [
      row(1, 41, [Math.cos(a), Math.sin(a), 0, 0]),
      row(2, 44, [Math.cos(b), 0, Math.sin(b), 0]),
      row(3, 93, [0, 0, 0.1, 1]),
    ].join("\n") + "\n",
  );
  return { test, simulation };
}
