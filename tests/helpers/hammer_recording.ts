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

/** One hit of {@linkcode driftingHits}: start time, s, and true peak, N. */
export interface TrueHit {
  readonly time: number;
  readonly peak: number;
}

/**
 * Ten half-sine hits of 2 ms, 1.0 to 10.0 s (plus a fraction of a sample so
 * that no peak falls on a sample; at 8192 Hz the 200 N peaks fall half a
 * sample off, where the largest sample is 0.46 % low: 1 − cos(π/2/16.384)), five of 200 N and five of 20 N, on a
 * force channel that drifts slowly by ±8 N (4 % of the largest peak; one
 * period in 10 s) and carries 0.05 N rms of noise. The truth is analytic:
 * f(t) = P·sin(π(t − t0)/T) for t0 ≤ t ≤ t0 + T peaks at P at t0 + T/2
 * (analytic: sin is 1 at π/2; a half-sine is the usual model of an impact
 * pulse, common practice); the largest sample of one sampled half a sample off the crest
 * is P·cos(π/(2·T·rate)) (analytic). A slow drift of the force baseline
 * between hits (charge amplifier drift, thermal drift) is common practice
 * to expect; its size here is invented for the test.
 */
export function driftingHits(rate = 8192): { recording: Recording; hits: TrueHit[] } {
  const n = Math.round(11.5 * rate);
  const width = 0.002;
  const hits = Array.from({ length: 10 }, (_, k) => ({
    time: 1 + k + [0.308, 0.1, 0.5, 0.308, 0.7, 0.308, 0.9, 0.2, 0.308, 0.6][k] / rate,
    peak: [200, 20, 20, 200, 20, 200, 200, 20, 200, 20][k],
  }));
  const noise = gaussianNoise(2026, n);
  const force = new Float64Array(n).map((_, i) => {
    const t = i / rate;
    let f = 8 * Math.sin(2 * Math.PI * t / 10 + 0.4) + 0.05 * noise[i];
    for (const h of hits) {
      if (t >= h.time && t <= h.time + width) {
        f += h.peak * Math.sin(Math.PI * (t - h.time) / width);
      }
    }
    return f;
  });
  return {
    recording: {
      rate,
      startTime: 0,
      channels: [
        { name: "hammer", unit: "N", data: force },
        {
          name: "tip",
          unit: "m/s^2",
          data: force.map((v, i) => 0.01 * v + 1e-3 * noise[n - 1 - i]),
        },
      ],
    },
    hits,
  };
}
