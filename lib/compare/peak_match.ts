/**
 * Matching the resonance peaks of a test curve with those of a simulation.
 *
 * Peaks are picked on each curve by prominence (lib/modal/peaks.ts) and
 * located between lines by the vertex of the parabola through 1/|H|² at the
 * three lines around each maximum. Each test peak is matched to the nearest
 * simulation peak within `tolerancePercent` of its frequency, each
 * simulation peak used once (nearest pairs first).
 *
 * @module
 */
import { peakVertex } from "../modal/half_power.ts";
import { findPeaks } from "../modal/peaks.ts";

/** A matched pair of peaks. */
export interface PeakMatch {
  /** Test peak frequency, Hz. */
  readonly test_hz: number;
  /** Simulation peak frequency, Hz. */
  readonly simulation_hz: number;
  /** 100·(simulation − test)/test. */
  readonly shift_percent: number;
  /** Simulation level minus test level at the peaks, dB. */
  readonly level_difference_db: number;
}

/** Options of {@linkcode matchPeaks}. */
export interface PeakMatchOptions {
  /** Prominence threshold, dB. Default 6. */
  prominenceDb?: number;
  /** Largest frequency difference for a match, % of the test frequency. Default 15. */
  tolerancePercent?: number;
  /** dB per decade of ratio: 20 for amplitudes, 10 for power quantities. Default 20. */
  dbPerDecade?: number;
}

/**
 * Matched peaks of two magnitude curves (each on its own grid).
 *
 * @example
 * ```ts
 * import { matchPeaks } from "./peak_match.ts";
 * const f = new Float64Array(400).map((_, k) => k * 0.25);
 * const peak = (f0: number) => f.map((v) => 1 / Math.hypot(1 - (v / f0) ** 2, 0.04 * v / f0));
 * const [m] = matchPeaks({ frequencies: f, magnitude: peak(50) }, { frequencies: f, magnitude: peak(48.5) });
 * if (Math.abs(m.shift_percent + 3) > 0.05) throw new Error();
 * ```
 */
export function matchPeaks(
  testCurve: { frequencies: Float64Array; magnitude: Float64Array },
  simulation: { frequencies: Float64Array; magnitude: Float64Array },
  options: PeakMatchOptions = {},
): PeakMatch[] {
  const { frequencies: testFrequencies, magnitude: testMagnitude } = testCurve;
  const { frequencies: simFrequencies, magnitude: simMagnitude } = simulation;
  const tolerance = (options.tolerancePercent ?? 15) / 100;
  const perDecade = options.dbPerDecade ?? 20;
  const locate = (f: Float64Array, m: Float64Array) =>
    findPeaks(f, m, { prominenceDb: options.prominenceDb }).map((p) => peakVertex(f, m, p.index));
  const test = locate(testFrequencies, testMagnitude);
  const sim = locate(simFrequencies, simMagnitude);
  const candidates: { t: number; s: number; distance: number }[] = [];
  test.forEach((tp, t) =>
    sim.forEach((sp, s) => {
      const distance = Math.abs(sp.frequencyHz - tp.frequencyHz) / tp.frequencyHz;
      if (distance <= tolerance) candidates.push({ t, s, distance });
    })
  );
  candidates.sort((a, b) => a.distance - b.distance);
  const usedT = new Set<number>();
  const usedS = new Set<number>();
  const matches: PeakMatch[] = [];
  for (const c of candidates) {
    if (usedT.has(c.t) || usedS.has(c.s)) continue;
    usedT.add(c.t);
    usedS.add(c.s);
    const tp = test[c.t], sp = sim[c.s];
    matches.push({
      test_hz: tp.frequencyHz,
      simulation_hz: sp.frequencyHz,
      shift_percent: (100 * (sp.frequencyHz - tp.frequencyHz)) / tp.frequencyHz,
      level_difference_db: perDecade * Math.log10(sp.magnitude / tp.magnitude),
    });
  }
  return matches.sort((a, b) => a.test_hz - b.test_hz);
}
