/**
 * The tones of an averaged density spectrum, each with its TNR, PR and
 * verdict (ECMA-418-1), and the measure of a tone at a given frequency (an
 * order's at an rpm step).
 *
 * @module
 */
import { prominenceRatio } from "./prominence_ratio.ts";
import { MAIN_LOBE_LINES, type ToneMeasure, toneToNoise } from "./tone_to_noise.ts";
import { type Criterion, verdict } from "./tones_criteria.ts";

/** A tone found, measured and judged. */
export interface Tone extends ToneMeasure {
  /** Prominence ratio at the tone's frequency, dB (NaN where its bands do not fit). */
  readonly prDb: number;
  /** Ratio minus the criterion, dB (NaN outside the criteria's range). */
  readonly marginDb: number;
  /** Prominent by the criterion. */
  readonly prominent: boolean;
}

/** Options of {@linkcode findTones}. */
export interface FindTonesOptions {
  /** A peak is a tone when its TNR is at least this, dB. Default 0. */
  readonly minTnrDb?: number;
  /** The criterion the verdict uses. Default "tnr". */
  readonly criterion?: Criterion;
}

/** A tone's PR and verdict added to its measure. */
function judged(
  density: Float64Array,
  df: number,
  m: ToneMeasure,
  criterion: Criterion,
  at = m.frequency,
): Tone {
  const prDb = prominenceRatio(density, df, at);
  return { ...m, prDb, ...verdict(criterion, at, { tnrDb: m.tnrDb, prDb }) };
}

/**
 * The tones of `density` (one-sided, lines `df` apart), rising in
 * frequency. Every local maximum that is the highest line within the Hann
 * main lobe around it is a candidate; the candidates are measured from the
 * highest down, each with the lines of the tones already taken left out of
 * its noise, and kept when their TNR reaches `minTnrDb`. The kept tones are
 * then measured again with every other kept tone left out of their noise.
 *
 * @throws {RangeError} for a bad `df` or threshold.
 *
 * @example
 * ```ts
 * import { findTones } from "./tones_search.ts";
 * const g = new Float64Array(4001).fill(1e-6);
 * g[1999] += 0.01 / 6; g[2000] += 0.04 / 6; g[2001] += 0.01 / 6;
 * const tones = findTones(g, 1);
 * if (tones.length !== 1 || tones[0].frequency !== 2000 || !tones[0].prominent) throw new Error();
 * ```
 */
export function findTones(
  density: Float64Array,
  df: number,
  options: FindTonesOptions = {},
): Tone[] {
  const minTnr = options.minTnrDb ?? 0;
  if (!Number.isFinite(minTnr)) throw new RangeError(`bad TNR threshold ${minTnr}`);
  const criterion = options.criterion ?? "tnr";
  const candidates: number[] = [];
  for (let k = 1; k < density.length - 1; k++) {
    if (!(density[k] > density[k - 1] && density[k] >= density[k + 1])) continue;
    let highest = true;
    for (let j = k - MAIN_LOBE_LINES; j <= k + MAIN_LOBE_LINES && highest; j++) {
      if (j !== k && j >= 0 && j < density.length && density[j] > density[k]) highest = false;
    }
    if (highest) candidates.push(k);
  }
  candidates.sort((a, b) => density[b] - density[a]);
  const taken = new Uint8Array(density.length);
  const kept: ToneMeasure[] = [];
  for (const peak of candidates) {
    if (taken[peak] === 1) continue;
    const m = toneToNoise(density, df, peak, { skip: (k) => taken[k] === 1 });
    if (!(m.tnrDb >= minTnr)) continue;
    kept.push(m);
    taken.fill(1, m.first, m.last + 1);
  }
  const tones: Tone[] = [];
  for (const m of kept) {
    // Measured again with every other tone's lines out of its noise.
    const own = (k: number) => k >= m.first && k <= m.last;
    const again = toneToNoise(density, df, Math.round(m.frequency / df), {
      skip: (k) => taken[k] === 1 && !own(k),
    });
    if (again.tnrDb >= minTnr) tones.push(judged(density, df, again, criterion));
  }
  return tones.sort((a, b) => a.frequency - b.frequency);
}

/**
 * The tone at `frequency` (an order's at an rpm step): measured from the
 * highest line within the main lobe around the frequency's line, its PR and
 * verdict at `frequency` itself. NaN ratios when the bands do not fit.
 *
 * @example
 * ```ts
 * import { toneAt } from "./tones_search.ts";
 * const g = new Float64Array(4001).fill(1e-6);
 * g[799] += 0.01 / 6; g[800] += 0.04 / 6; g[801] += 0.01 / 6;
 * const t = toneAt(g, 1, 801);
 * if (Math.abs(t.tonePower - 0.01) > 1e-12 || t.frequency !== 801) throw new Error();
 * ```
 */
export function toneAt(
  density: Float64Array,
  df: number,
  frequency: number,
  criterion: Criterion = "tnr",
): Tone {
  if (!(frequency > 0) || !Number.isFinite(frequency)) {
    throw new RangeError(`a tone needs a positive frequency, got ${frequency}`);
  }
  const line = Math.round(frequency / df);
  let peak = -1;
  for (let k = line - MAIN_LOBE_LINES; k <= line + MAIN_LOBE_LINES; k++) {
    if (k >= 1 && k < density.length && (peak < 0 || density[k] > density[peak])) peak = k;
  }
  if (peak < 0) {
    return judged(density, df, { ...toneToNoise(density, df, 0), frequency }, criterion, frequency);
  }
  return judged(
    density,
    df,
    { ...toneToNoise(density, df, peak), frequency },
    criterion,
    frequency,
  );
}
