/**
 * Matching the resonance peaks of a test curve with those of a simulation.
 *
 * Peaks are picked on each curve by prominence (lib/modal/peaks.ts, on
 * amplitudes: a power quantity's square root) on its own grid. Each test
 * peak is matched to the nearest simulation peak within `tolerancePercent`
 * of its frequency, each simulation peak used once (nearest pairs first).
 * Peaks left over are named on both sides: test-only and simulation-only.
 *
 * **Where a peak lies between lines.** Near a resonance 1/|H|² is a parabola
 * in frequency over the half-power band (single-mode approximation, Ewins,
 * Modal Testing, 2nd ed., 2.2), so the vertex of the parabola through 1/|H|²
 * at the highest line and its two neighbours locates the peak when those
 * three lines lie in the half-power band. The rule: a peak is located between
 * lines only when both neighbours of its highest line are within 3 dB
 * (half power, counted from the highest line) of it, i.e. at least
 * {@linkcode MIN_HALF_POWER_LINES} lines in its half-power band. Otherwise it
 * is **coarse**: the band is narrower than the grid resolves, the parabola
 * would be drawn through points outside it, and both the frequency and the
 * level would be guesses.
 *
 * A matched pair in which either peak is coarse is compared at the
 * resolution of the common grid (the coarser one, align.ts): each curve's
 * peak is the highest line of that curve on the common grid near its own
 * peak, with no interpolation, so two equal curves read a 0 % shift and
 * 0 dB; the pair carries `coarse: true` and a note with the reason.
 *
 * @module
 */
import { formatNumber } from "../format_number.ts";
import { peakVertex } from "../modal/half_power.ts";
import { findPeaks } from "../modal/peaks.ts";

/**
 * The fewest lines (the highest and both neighbours) that must lie in a
 * peak's half-power band for the peak to be located between lines.
 *
 * @example
 * ```ts
 * import { MIN_HALF_POWER_LINES } from "./peak_match.ts";
 * if (MIN_HALF_POWER_LINES !== 3) throw new Error();
 * ```
 */
export const MIN_HALF_POWER_LINES = 3;

/** A matched pair of peaks. */
export interface PeakMatch {
  /** Test peak frequency, Hz. */
  readonly test_hz: number;
  /** Simulation peak frequency, Hz. */
  readonly simulation_hz: number;
  /** 100·(simulation − test)/test. */
  readonly shift_percent: number;
  /** Simulation level minus test level at the peaks, dB; null with `level_note` when not finite. */
  readonly level_difference_db: number | null;
  /** Whether either peak was too narrow for its grid: compared at the lines of the common grid. */
  readonly coarse: boolean;
  /** Lines in the half-power band of the test and the simulation peak (on their own grids). */
  readonly half_power_lines: { readonly test: number; readonly simulation: number };
  /** Why the pair is coarse, or why the level difference is null. */
  readonly note?: string;
}

/** A peak on one side that no peak on the other matches. */
export interface UnmatchedPeak {
  /** Frequency, Hz (between lines, or the highest line when coarse). */
  readonly frequency_hz: number;
  /** Its value, linear, in the curve's unit. */
  readonly value: number;
  /** Lines in its half-power band. */
  readonly half_power_lines: number;
  /** Whether it was located at a line only. */
  readonly coarse: boolean;
  /** Why it is unmatched. */
  readonly reason: string;
}

/** Matched peaks and the peaks of each side left unmatched. */
export interface PeakMatching {
  /** Matched pairs, by test frequency. */
  readonly matched: PeakMatch[];
  /** Test peaks with no simulation peak, by frequency. */
  readonly testOnly: UnmatchedPeak[];
  /** Simulation peaks with no test peak, by frequency. */
  readonly simulationOnly: UnmatchedPeak[];
}

/** Options of {@linkcode matchPeaks}. */
export interface PeakMatchOptions {
  /** Prominence threshold, dB. Default 6. */
  prominenceDb?: number;
  /** Largest frequency difference for a match, % of the test frequency. Default 15. */
  tolerancePercent?: number;
  /** dB per decade of ratio: 20 for amplitudes, 10 for power quantities. Default 20. */
  dbPerDecade?: number;
  /**
   * The common grid and both curves' magnitudes on it (align.ts), where a
   * coarse pair is compared. Default: none (a coarse pair is then compared at
   * the highest lines of the curves' own grids).
   */
  common?: { frequencies: Float64Array; test: Float64Array; simulation: Float64Array };
}

interface Located {
  /** Index of the highest line. */
  readonly index: number;
  readonly frequencyHz: number;
  /** Amplitude (square root of a power quantity). */
  readonly amplitude: number;
  readonly halfPowerLines: number;
  readonly coarse: boolean;
}

interface CurveIn {
  frequencies: Float64Array;
  magnitude: Float64Array;
}

/** Lines of the contiguous run around `k` at or above half the power of line k. */
function halfPowerRun(amplitude: Float64Array, k: number): { lines: number; both: boolean } {
  const floor = amplitude[k] / Math.SQRT2;
  let lo = k, hi = k;
  while (lo > 0 && amplitude[lo - 1] >= floor) lo--;
  while (hi < amplitude.length - 1 && amplitude[hi + 1] >= floor) hi++;
  return { lines: hi - lo + 1, both: lo < k && hi > k };
}

function locatePeaks(curve: CurveIn, amplitude: Float64Array, prominenceDb?: number): Located[] {
  const f = curve.frequencies;
  return findPeaks(f, amplitude, { prominenceDb }).map(({ index }) => {
    const run = halfPowerRun(amplitude, index);
    if (!run.both) {
      return {
        index,
        frequencyHz: f[index],
        amplitude: amplitude[index],
        halfPowerLines: run.lines,
        coarse: true,
      };
    }
    const v = peakVertex(f, amplitude, index);
    return {
      index,
      frequencyHz: v.frequencyHz,
      amplitude: v.magnitude,
      halfPowerLines: run.lines,
      coarse: false,
    };
  });
}

/** The highest line of `values` among the local maxima nearest `hz` on grid `f`. */
function lineNear(f: Float64Array, values: Float64Array, hz: number): number {
  let k = 0;
  for (let i = 1; i < f.length; i++) if (Math.abs(f[i] - hz) < Math.abs(f[k] - hz)) k = i;
  // Climb to the local maximum: the nearest line may sit on the peak's flank.
  for (;;) {
    if (k > 0 && values[k - 1] > values[k]) k--;
    else if (k < values.length - 1 && values[k + 1] > values[k]) k++;
    else return k;
  }
}

/**
 * Matched peaks of two magnitude curves (each on its own grid), and the
 * peaks of each that the other lacks.
 *
 * @example
 * ```ts
 * import { matchPeaks } from "./peak_match.ts";
 * const f = new Float64Array(400).map((_, k) => k * 0.25);
 * const peak = (f0: number) => f.map((v) => 1 / Math.hypot(1 - (v / f0) ** 2, 0.04 * v / f0));
 * const { matched: [m] } = matchPeaks({ frequencies: f, magnitude: peak(50) }, { frequencies: f, magnitude: peak(48.5) });
 * if (Math.abs(m.shift_percent + 3) > 0.05 || m.coarse) throw new Error();
 * ```
 */
export function matchPeaks(
  testCurve: CurveIn,
  simulationCurve: CurveIn,
  options: PeakMatchOptions = {},
): PeakMatching {
  const tolerance = (options.tolerancePercent ?? 15) / 100;
  const perDecade = options.dbPerDecade ?? 20;
  // Peaks are found and located on amplitudes; a power quantity is |H|².
  const amplitudeOf = (m: Float64Array) => perDecade === 10 ? m.map(Math.sqrt) : m;
  const valueOf = (a: number) => perDecade === 10 ? a * a : a;
  const testAmplitude = amplitudeOf(testCurve.magnitude);
  const simAmplitude = amplitudeOf(simulationCurve.magnitude);
  const test = locatePeaks(testCurve, testAmplitude, options.prominenceDb);
  const sim = locatePeaks(simulationCurve, simAmplitude, options.prominenceDb);
  const candidates: { t: number; s: number; distance: number }[] = [];
  test.forEach((tp, t) =>
    sim.forEach((sp, s) => {
      const distance = Math.abs(sp.frequencyHz - tp.frequencyHz) / tp.frequencyHz;
      if (distance <= tolerance) candidates.push({ t, s, distance });
    })
  );
  candidates.sort((a, b) => a.distance - b.distance);
  const pairOfT = new Map<number, number>();
  const pairOfS = new Map<number, number>();
  for (const c of candidates) {
    if (pairOfT.has(c.t) || pairOfS.has(c.s)) continue;
    pairOfT.set(c.t, c.s);
    pairOfS.set(c.s, c.t);
  }
  const matched: PeakMatch[] = [];
  for (const [t, s] of pairOfT) {
    const tp = test[t], sp = sim[s];
    let testHz = tp.frequencyHz, simHz = sp.frequencyHz;
    let testA = tp.amplitude, simA = sp.amplitude;
    const coarse = tp.coarse || sp.coarse;
    const notes: string[] = [];
    if (coarse) {
      const which = tp.coarse && sp.coarse
        ? "both peaks have"
        : tp.coarse
        ? "the test peak has"
        : "the simulation peak has";
      const lines = tp.coarse ? tp.halfPowerLines : sp.halfPowerLines;
      const grid = options.common;
      if (grid !== undefined) {
        const kt = lineNear(grid.frequencies, grid.test, tp.frequencyHz);
        const ks = lineNear(grid.frequencies, grid.simulation, sp.frequencyHz);
        testHz = grid.frequencies[kt];
        simHz = grid.frequencies[ks];
        testA = amplitudeOf(grid.test.subarray(kt, kt + 1))[0];
        simA = amplitudeOf(grid.simulation.subarray(ks, ks + 1))[0];
      } else {
        testHz = testCurve.frequencies[tp.index];
        simHz = simulationCurve.frequencies[sp.index];
        testA = testAmplitude[tp.index];
        simA = simAmplitude[sp.index];
      }
      notes.push(
        `coarse: ${which} fewer than ${MIN_HALF_POWER_LINES} lines in the half-power band (${lines}); compared at the highest lines of the ${
          grid !== undefined ? "common" : "own"
        } grid without interpolation, so the shift is known only to a line and both levels may read low`,
      );
    }
    const difference = perDecade * Math.log10(valueOf(simA) / valueOf(testA));
    if (!Number.isFinite(difference)) {
      notes.push(
        `level difference not finite: test ${formatNumber(valueOf(testA))}, simulation ${
          formatNumber(valueOf(simA))
        } at the peaks`,
      );
    }
    matched.push({
      test_hz: testHz,
      simulation_hz: simHz,
      shift_percent: (100 * (simHz - testHz)) / testHz,
      level_difference_db: Number.isFinite(difference) ? difference : null,
      coarse,
      half_power_lines: { test: tp.halfPowerLines, simulation: sp.halfPowerLines },
      ...(notes.length > 0 ? { note: notes.join("; ") } : {}),
    });
  }
  const unmatched = (own: Located[], other: Located[], paired: Map<number, number>, side: string) =>
    own.flatMap((p, i): UnmatchedPeak[] => {
      if (paired.has(i)) return [];
      let nearest: Located | undefined;
      for (const q of other) {
        const d = Math.abs(q.frequencyHz - p.frequencyHz);
        if (nearest === undefined || d < Math.abs(nearest.frequencyHz - p.frequencyHz)) {
          nearest = q;
        }
      }
      const within = nearest !== undefined &&
        Math.abs(nearest.frequencyHz - p.frequencyHz) / p.frequencyHz <= tolerance;
      const reason = nearest === undefined
        ? `the ${side} has no peak`
        : within
        ? `the nearest ${side} peak (${
          formatNumber(nearest.frequencyHz)
        } Hz) is matched to a nearer one`
        : `no ${side} peak within ${formatNumber(100 * tolerance)} % (nearest ${
          formatNumber(nearest.frequencyHz)
        } Hz)`;
      return [{
        frequency_hz: p.frequencyHz,
        value: valueOf(p.amplitude),
        half_power_lines: p.halfPowerLines,
        coarse: p.coarse,
        reason,
      }];
    });
  return {
    matched: matched.sort((a, b) => a.test_hz - b.test_hz),
    testOnly: unmatched(test, sim, pairOfT, "simulation"),
    simulationOnly: unmatched(sim, test, pairOfS, "test"),
  };
}
