/**
 * The tone-to-noise ratio of one tone in an averaged density spectrum
 * (ECMA-418-1's TNR method): the tone's power over the power of the masking
 * noise in the critical band centred on it.
 *
 * The tone's lines: the Hann window's main lobe around the peak (±2 lines,
 * Harris 1978), widened while the next line still stands more than 3 dB
 * above the noise (a tone that moved within the averaging time, as an order
 * in a run-up), up to three eighths of the critical band either side. Summed over
 * the whole lobe, a Hann-windowed density holds a tone's whole mean square
 * (Parseval), where the standard's reading between the tone's −3 dB points
 * (from memory) depends on where the tone falls between lines.
 *
 * The masking noise: the mean density of the critical band's lines outside
 * the tone (and outside other tones named by `skip`), times the critical
 * bandwidth; the standard's correction Δf_c/(Δf_c − Δf_t) of the band's
 * noise for the tone's own width (from memory) is this mean. The noise
 * under the tone's lines is taken off the tone (our choice: it is not tone;
 * for a prominent tone the difference is below 0.1 dB).
 *
 * @module
 */
import { bandPower, criticalBand, criticalBandwidth } from "./critical_band.ts";

/** Half-width of the Hann window's main lobe, lines (Harris 1978, Table 1: 4 bins wide). */
export const MAIN_LOBE_LINES = 2;

/** A line stays in the tone while it stands this many times above the noise (3 dB). */
const WIDEN_RATIO = 2;

/** One tone's measure. */
export interface ToneMeasure {
  /** The tone's frequency: the centroid of its power over its lines, Hz. */
  readonly frequency: number;
  /** The tone's mean square, unit² (the noise under its lines taken off). */
  readonly tonePower: number;
  /** The masking noise's mean square in the critical band, unit². */
  readonly noisePower: number;
  /** 10·lg(tonePower / noisePower), dB; NaN when either cannot be had. */
  readonly tnrDb: number;
  /** The critical bandwidth at the peak, Hz. */
  readonly criticalBandwidth: number;
  /** The tone's bandwidth: its lines' span, Hz. */
  readonly toneBandwidth: number;
  /** The tone's first and last line. */
  readonly first: number;
  readonly last: number;
}

/** Options of {@linkcode toneToNoise}. */
export interface ToneOptions {
  /** Lines that belong to other tones: neither this tone nor noise. Default: none. */
  readonly skip?: (line: number) => boolean;
}

const NOT_MEASURED = (peak: number, df: number): ToneMeasure => ({
  frequency: peak * df,
  tonePower: NaN,
  noisePower: NaN,
  tnrDb: NaN,
  criticalBandwidth: peak > 0 ? criticalBandwidth(peak * df) : NaN,
  toneBandwidth: NaN,
  first: peak,
  last: peak,
});

/**
 * The TNR of the tone whose highest line is `peak` in the one-sided
 * density `density` (lines `df` apart). NaN (with the band's numbers) when
 * the critical band does not fit between 0 Hz and the last line, or has no
 * noise line left.
 *
 * @throws {RangeError} for a peak outside the spectrum or a bad `df`.
 *
 * @example
 * ```ts
 * import { toneToNoise } from "./tone_to_noise.ts";
 * import { criticalBandwidth } from "./critical_band.ts";
 * // White noise of 1e-6 unit²/Hz, lines 1 Hz apart, and a tone of mean square 0.01 at 1000 Hz
 * // (as the Hann window spreads it: 1/6, 2/3, 1/6 of it on three lines, density in unit²/Hz).
 * const g = new Float64Array(4001).fill(1e-6);
 * g[999] += 0.01 / 6; g[1000] += 0.01 * 4 / 6; g[1001] += 0.01 / 6;
 * const t = toneToNoise(g, 1, 1000);
 * const expected = 10 * Math.log10(0.01 / (1e-6 * criticalBandwidth(1000)));
 * if (Math.abs(t.tnrDb - expected) > 1e-9) throw new Error(String(t.tnrDb));
 * ```
 */
export function toneToNoise(
  density: Float64Array,
  df: number,
  peak: number,
  options: ToneOptions = {},
): ToneMeasure {
  if (!(df > 0) || !Number.isFinite(df)) throw new RangeError(`bad line spacing ${df}`);
  if (!Number.isInteger(peak) || peak < 0 || peak >= density.length) {
    throw new RangeError(`line ${peak} is outside the spectrum of ${density.length} lines`);
  }
  if (peak === 0) return NOT_MEASURED(peak, df);
  const f0 = peak * df;
  const band = criticalBand(f0);
  if (band.low < 0 || band.high > (density.length - 0.5) * df) return NOT_MEASURED(peak, df);
  const skip = options.skip ?? (() => false);
  // The tone may widen over up to three quarters of its critical band.
  const reach = Math.max(MAIN_LOBE_LINES, Math.floor(3 * criticalBandwidth(f0) / (8 * df)));
  let first = Math.max(1, peak - MAIN_LOBE_LINES);
  let last = Math.min(density.length - 1, peak + MAIN_LOBE_LINES);
  const noiseDensity = () => {
    const { power, skipped } = bandPower(
      density,
      df,
      band,
      (k) => (k >= first && k <= last) || skip(k),
    );
    const width = band.high - band.low - skipped;
    return width > 1e-9 * df ? power / width : NaN;
  };
  // The lobe widens against the band's median line (a smeared tone lifts the mean, not the
  // median), then against the mean of the lines outside it, until it no longer grows.
  let noise = medianLine(density, df, band, (k) => (k >= first && k <= last) || skip(k));
  if (!(noise >= 0)) return NOT_MEASURED(peak, df);
  for (let pass = 0; pass < 8; pass++) {
    const above = (k: number) =>
      k >= 1 && k < density.length && Math.abs(k - peak) <= reach && !skip(k) &&
      density[k] > WIDEN_RATIO * noise;
    const before = last - first;
    while (above(first - 1)) first--;
    while (above(last + 1)) last++;
    noise = noiseDensity();
    if (!(noise >= 0)) return NOT_MEASURED(peak, df);
    if (last - first === before && pass > 0) break;
  }
  let tone = 0, moment = 0;
  for (let k = first; k <= last; k++) {
    if (skip(k)) continue;
    const excess = (density[k] - noise) * df;
    tone += excess;
    moment += excess * k * df;
  }
  const noisePower = noise * (band.high - band.low);
  return {
    frequency: tone > 0 ? moment / tone : f0,
    tonePower: tone,
    noisePower,
    tnrDb: tone > 0 && noisePower > 0 ? 10 * Math.log10(tone / noisePower) : NaN,
    criticalBandwidth: band.high - band.low,
    toneBandwidth: (last - first + 1) * df,
    first,
    last,
  };
}

/** The median density of the band's lines whose centres lie inside it, `skip` left out. */
function medianLine(
  density: Float64Array,
  df: number,
  band: { low: number; high: number },
  skip: (k: number) => boolean,
): number {
  const values: number[] = [];
  for (let k = Math.ceil(band.low / df); k * df <= band.high && k < density.length; k++) {
    if (k >= 0 && !skip(k)) values.push(density[k]);
  }
  if (values.length === 0) return NaN;
  values.sort((a, b) => a - b);
  const mid = values.length >> 1;
  return values.length % 2 === 1 ? values[mid] : (values[mid - 1] + values[mid]) / 2;
}
