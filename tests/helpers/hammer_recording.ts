/** A synthesised impact test on our own two-mode bracket (invented for the tests). */
import { maxOf } from "../../lib/extent.ts";
import { writeFile } from "node:fs/promises";
import type { Recording } from "../../lib/io/recording.ts";
import { type CliResult, runQuiver } from "./cli.ts";
import { recordingCsv } from "./csv.ts";
import { gaussianNoise } from "./random.ts";
import { type Mode, simulateReceptance } from "./modal.ts";

// Our own test structure: a bracket with two modes seen at two points.
export const RATE = 4096;
export const MODES_A: Mode[] = [
  { frequencyHz: 42.5, damping: 0.02, residue: 4.0 },
  { frequencyHz: 117.3, damping: 0.015, residue: 2.5 },
];
export const MODES_B: Mode[] = [
  { frequencyHz: 42.5, damping: 0.02, residue: 1.5 },
  { frequencyHz: 117.3, damping: 0.015, residue: -3.0 },
];

/** Adds a half-sine force pulse of `width` seconds and `peak` N at time `t`. */
function addPulse(force: Float64Array, t: number, peak: number, width = 0.0025): void {
  const start = Math.round(t * RATE);
  const samples = Math.round(width * RATE);
  for (let i = 0; i < samples; i++) {
    force[start + i] += peak * Math.sin(Math.PI * (i + 0.5) / samples);
  }
}

/** Six hits 2 s apart: hit 3 rebounds 15 ms later, hit 5 is clipped at 300 N. */
export function sixHits(): Recording {
  const force = new Float64Array(13 * RATE);
  const peaks = [240, 260, 250, 230, 420, 255];
  peaks.forEach((peak, i) => addPulse(force, 1 + 2 * i, peak));
  addPulse(force, 1 + 2 * 2 + 0.015, 90); // the rebound of hit 3
  const noise = gaussianNoise(77, force.length);
  // The converter clips the measured force (noise included) at 300 N; the structure feels the real force.
  const measured = force.map((v, i) => Math.min(v + 0.05 * noise[i], 300));
  const a = simulateReceptance(MODES_A, force, RATE);
  const b = simulateReceptance(MODES_B, force, RATE);
  const na = gaussianNoise(78, force.length);
  const scale = 1e-4 * maxOf(a.map(Math.abs));
  return {
    rate: RATE,
    startTime: 0,
    channels: [
      { name: "hammer", unit: "N", data: measured },
      { name: "bracket_a", unit: "m", data: a.map((v, i) => v + scale * na[i]) },
      {
        name: "bracket_b",
        unit: "m",
        data: b.map((v, i) => v + scale * na[(i + 999) % na.length]),
      },
    ],
  };
}

/**
 * Writes the six-hit recording as CSV into `dir` and returns a runner of
 * `quiver hammer` on it with more arguments (for CLI tests).
 */
export async function sixHitsCli(dir: string): Promise<(args: string[]) => CliResult> {
  await writeFile(`${dir}/impact.csv`, recordingCsv(sixHits()));
  return (args) =>
    runQuiver([
      "hammer",
      `${dir}/impact.csv`,
      "--rate",
      String(RATE),
      "--force",
      "hammer",
      ...args,
    ]);
}
