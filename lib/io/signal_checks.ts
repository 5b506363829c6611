/**
 * Signal-level warnings that travel with a result: things that do not stop
 * an analysis but can make its numbers wrong.
 *
 * - constant: every sample equal (a dead or disconnected channel);
 * - clipped at the converter's full scale: when the converter's rails are
 *   known (an integer PCM WAV channel: the lowest and highest codes of its
 *   bit depth, in the channel's unit after the set-up, a sample within a
 *   quarter step of one being at it; a CSV column in volts whose set-up
 *   gives `full_scale_volts`: ±that range, within 1e-9 of it), 2 or more
 *   successive samples at a rail. A single sample at a rail can be a clean peak that
 *   just reaches full scale; two in a row cannot, unless the waveform was
 *   cut there (common practice: a sample at the top code is the converter's
 *   overload sign);
 * - clipped (by shape, with or without known rails): the waveform is cut flat
 *   at the channel's extreme values. A run of 3 or more equal samples at the
 *   extreme counts when (1) the waveform enters and leaves it continuously
 *   (the samples either side lie within half the channel's range of it; a
 *   clean two-level signal such as a TTL tacho jumps onto its levels
 *   instead) and (2) the waveform falls away steeply: 2 samples beyond each
 *   end of the run it lies more than {@linkcode CLIP_DROP_STEPS} quantisation
 *   steps below the run. Condition (2) is what tells a cut from the flat top
 *   a quantised smooth peak has: equal samples lie within one step q of the
 *   apex, so a parabolic top holding 3 of them (apex within 1.5 samples of
 *   its far end) falls by at most (3.5/1.5)²·q + q ≈ 6.4·q at 2 samples
 *   beyond either end (analytic; a sine falls less than its parabola). The
 *   step q is the converter's when known, otherwise the grid of the samples
 *   so far: the greatest common step of the differences between successive
 *   samples, within a relative 1e-9 of the largest magnitude, refined until
 *   it falls below 1e-8 of it (the last digit of a CSV, a WAV's LSB; on
 *   unquantised data it is negligible, and any
 *   exactly flat run at an extreme that the waveform leaves steeply is a
 *   cut). A signal with an extreme that holds half the record
 *   or more rests there: it is a pulse train (a narrow-pulse tacho, a force
 *   channel on an exact-zero baseline between hits), and flat tops at its
 *   other extreme are its pulses, not clipping (the hammer analysis judges
 *   each hit's top itself). The warning needs such runs to make up at least 0.1 % of the
 *   record (and 3 samples), and states the true count of samples at the
 *   extremes;
 * - DC offset: |mean| above 3 × the standard deviation (an offset large
 *   against the signal; the default mean detrend removes it per segment, but
 *   it often means a wrong zero or a saturated amplifier). Not judged for a
 *   signal that rests at one of its extremes for half the record or more (a
 *   narrow-pulse tacho, a force between hits): its mean is set by the duty
 *   cycle, not by an offset.
 *
 * Thresholds other than the analytic one are common practice, stated here so
 * that a warning can be understood.
 *
 * @module
 */
import type { Channel, ConverterScale } from "./recording.ts";
import { formatNumber } from "../format_number.ts";

/**
 * How far (in quantisation steps) the waveform must fall within 2 samples of
 * either end of a flat run at its extreme for the run to count as a cut: a
 * smooth quantised peak falls at most about 6.4 steps there (see the module).
 */
export const CLIP_DROP_STEPS = 8;

/**
 * Relative tolerance (of the largest magnitude so far) within which a step
 * is a whole multiple of the grid: far above the rounding of decimal or
 * scaled integer samples (about 1e-16), far below any real step.
 */
const GRID_TOLERANCE = 1e-9;

/**
 * A grid finer than this share of the largest magnitude is taken as no grid
 * (unquantised data) and no longer refined: a 24-bit LSB is 1.2e-7 of full
 * scale, so every integer converter's grid lies above it.
 */
const GRID_FLOOR = 1e-8;

/**
 * The greatest common step of `a` and `b` within `tolerance` (Euclid's
 * algorithm on floats): the quantisation grid of the samples so far. On
 * unquantised data it falls to the order of the tolerance.
 */
function gridGcd(a: number, b: number, tolerance: number): number {
  let x = Math.max(a, b), y = Math.min(a, b);
  while (y > tolerance) {
    let r = x % y;
    if (y - r <= tolerance) r = 0;
    x = y;
    y = r;
  }
  return x;
}

/**
 * Whether `d` lies more than `tolerance` from every whole multiple of `step`
 * (`step` > 10 × `tolerance`, as the grid's floor ensures). `d − n·step`
 * with n the nearest whole number is within a few ulps of `d` of the exact
 * distance, far below the tolerance, so only a distance near the tolerance
 * needs the exact remainder (`%`: a library call, the slowest test of the
 * checks on quantised samples, which refine the grid at every new value).
 *
 * @example
 * ```ts ignore
 * offGrid(3 * 2 ** -15, 2 ** -15, 1e-9) === false; offGrid(0.5 * 2 ** -15, 2 ** -15, 1e-9) === true;
 * ```
 */
function offGrid(d: number, step: number, tolerance: number): boolean {
  const e = d - Math.round(d / step) * step;
  const distance = e < 0 ? -e : e;
  if (distance < 0.5 * tolerance) return false;
  if (distance > 2 * tolerance) return true;
  const r = d % step;
  return r > tolerance && step - r > tolerance;
}

/** What is known of one rail (the channel's highest or lowest value so far). */
interface Rail {
  /** Samples exactly at the rail. */
  count: number;
  /** Samples in runs of 3 or more at the rail that cut the waveform. */
  cutSamples: number;
  /** Such runs. */
  cutRuns: number;
}

const emptyRail = (): Rail => ({ count: 0, cutSamples: 0, cutRuns: 0 });

/** A run of 3 or more equal samples that has ended, with its neighbours (NaN: none). */
interface Run {
  value: number;
  length: number;
  /** The 2 samples before the run, nearest first. */
  before1: number;
  before2: number;
  /** The 2 samples after the run, nearest first. */
  after1: number;
  after2: number;
}

/**
 * Judges a run that has ended: one at a rail, entered and left continuously
 * and falling away steeply on both sides, cuts the waveform. The range used
 * is the range so far and the step the smallest seen so far: the range only
 * grows and the step only shrinks, so a run judged early is judged at most
 * more strictly.
 */
function closeRun(
  run: Run,
  range: { min: number; max: number; high: Rail; low: Rail; step: number },
): void {
  const v = run.value;
  const rail = v === range.max ? range.high : v === range.min ? range.low : undefined;
  if (rail === undefined) return;
  const sign = rail === range.high ? 1 : -1;
  const half = 0.5 * (range.max - range.min);
  const near = (u: number) => Number.isNaN(u) || Math.abs(u - v) < half;
  if (!near(run.before1) || !near(run.after1)) return;
  const steep = CLIP_DROP_STEPS * range.step;
  const falls = (u: number) => Number.isNaN(u) || sign * (v - u) > steep;
  if (Number.isNaN(run.before2) && Number.isNaN(run.after2)) return;
  if (falls(run.before2) && falls(run.after2)) {
    rail.cutSamples += run.length;
    rail.cutRuns++;
  }
}

/**
 * Running statistics of one channel over chunks, for the warnings above:
 * feed every chunk in order, then ask for {@linkcode ChannelStatistics.warnings}.
 * A whole record and the same record in chunks give the same warnings.
 *
 * @example
 * ```ts
 * import { ChannelStatistics } from "./signal_checks.ts";
 * // A 16-bit converter's rails (unit: fractions of full scale); a tone cut at them.
 * const s = new ChannelStatistics({ low: -1, high: 32767 / 32768, step: 1 / 32768 });
 * s.push(new Float64Array(4800).map((_, i) => Math.max(-1, Math.min(32767 / 32768, 2 * Math.sin(i / 10)))));
 * if (!s.warnings({ name: "mic", unit: "FS" }).join().includes("converter's full scale")) throw new Error();
 * ```
 */
export class ChannelStatistics {
  readonly #converter: ConverterScale | undefined;
  #n = 0;
  #sum = 0;
  #sumSquares = 0;
  #min = Infinity;
  #max = -Infinity;
  #high = emptyRail();
  #low = emptyRail();
  // The grid of the samples so far (greatest common step of successive differences).
  #step = Infinity;
  // Whether the grid is still above GRID_FLOOR (refined further); never with a converter's step,
  // which is used instead (closeRun, warnings).
  #refining: boolean;
  // The two samples before the current one.
  #last1 = NaN;
  #last2 = NaN;
  // The run of equal values in progress and the two samples before it.
  #runValue = NaN;
  #runLength = 0;
  #runBefore1 = NaN;
  #runBefore2 = NaN;
  // A run of 3 or more that ended at the previous sample, waiting for its second sample after.
  #pending: Run | undefined = undefined;
  // Samples at the converter's rails, and those in runs of 2 or more.
  #fsCount = 0;
  #fsRun = 0;
  #fsCut = 0;
  #fsRuns = 0;

  /**
   * @param converter the converter's rails and step in the channel's unit,
   * when known (integer PCM); clipping at them is then judged too.
   * @throws {RangeError} for rails out of order or a step that is not positive.
   */
  constructor(converter?: ConverterScale) {
    if (
      converter !== undefined &&
      !(converter.low < converter.high &&
        (converter.step === undefined ||
          (converter.step > 0 && Number.isFinite(converter.step))))
    ) {
      throw new RangeError(
        `converter rails must satisfy low < high with a positive step, got ${converter.low}, ${converter.high}, ${converter.step}`,
      );
    }
    this.#converter = converter;
    this.#refining = converter?.step === undefined;
  }

  /** Adds the next samples. */
  push(x: Float64Array): void {
    // The state lives in locals for the loop (fields read and written per sample cost more than
    // the checks themselves) and is stored back at the end.
    let sum = this.#sum, sumSquares = this.#sumSquares, min = this.#min, max = this.#max;
    let high = this.#high, low = this.#low, step = this.#step, refining = this.#refining;
    let last1 = this.#last1, last2 = this.#last2;
    let runValue = this.#runValue, runLength = this.#runLength;
    let runBefore1 = this.#runBefore1, runBefore2 = this.#runBefore2;
    let pending = this.#pending;
    let fsCount = this.#fsCount, fsRun = this.#fsRun, fsCut = this.#fsCut, fsRuns = this.#fsRuns;
    const converter = this.#converter;
    // A value within a quarter step of a rail is at it (the set-up's factor is applied in floats);
    // without a known step, within 1e-9 of the range.
    const railTolerance = converter === undefined
      ? 0
      : converter.step !== undefined
      ? converter.step / 4
      : 1e-9 * (converter.high - converter.low);
    const fsHigh = converter === undefined ? Infinity : converter.high - railTolerance;
    const fsLow = converter === undefined ? -Infinity : converter.low + railTolerance;
    // No closure over the loop's locals: a captured variable lives in a context, read slowly.
    const knownStep = converter?.step ?? 0;
    // Two fast paths do exactly what the full body below would do in the two common cases, with
    // fewer tests per sample (the body's tests cost more than the sums themselves): a new value
    // strictly inside the range so far (`plain`: nothing pending, no run of 3 to close, no grid
    // to refine, not at a rail before; `upper`/`lower` fold the range and the rails), and the
    // same value again (`runValue` always equals `last1`, the previous sample: so the step to it
    // is 0, and it was at a rail when `fsRun` > 0). Anything else (a new extreme, a run to close,
    // NaN) takes the full body, which then sets them again. A converter's known step makes the
    // grid unneeded: it is not refined then. While the grid is refined, a plain value whose step
    // from the last is clearly on the grid (within half the tolerance, by the nearest multiple:
    // see offGrid) changes nothing there either and stays on the fast path; any other goes
    // through the full body, which refines.
    let plain = false, upper = -Infinity, lower = Infinity, onGrid = 0, perStep = 1 / step;
    for (let i = 0; i < x.length; i++) {
      const v = x[i];
      sum += v;
      sumSquares += v * v;
      if (v !== runValue) {
        if (plain && v < upper && v > lower) {
          if (refining) {
            const d = v > last1 ? v - last1 : last1 - v;
            const e = d - Math.round(d * perStep) * step; // NaN while there is no step yet
            if (!((e < 0 ? -e : e) < onGrid)) plain = false;
          }
        }
        if (plain && v < upper && v > lower) {
          runBefore1 = last1;
          runBefore2 = last2;
          runValue = v;
          runLength = 1;
          last2 = last1;
          last1 = v;
          continue;
        }
      } else if (pending === undefined) {
        if (v === max) high.count++;
        if (v === min) low.count++;
        if (fsRun > 0) {
          fsCount++;
          fsRun++;
        }
        runLength++;
        last2 = last1;
        last1 = v;
        plain = false; // the run may be long enough to judge when it ends
        continue;
      }
      if (v > max) {
        max = v;
        high = emptyRail();
      }
      if (v < min) {
        min = v;
        low = emptyRail();
      }
      if (v === max) high.count++;
      if (v === min) low.count++;
      if (refining) {
        const d = v > last1 ? v - last1 : last1 - v;
        if (d > 0) {
          if (step === Infinity) step = d;
          else {
            // Most steps are whole multiples of the grid: one remainder shows it. Below
            // GRID_FLOOR the data are unquantised for this purpose: the grid is left alone.
            const scale = max > -min ? max : -min;
            const tolerance = GRID_TOLERANCE * scale;
            if (offGrid(d, step, tolerance)) {
              step = gridGcd(step, d, tolerance);
              refining = step > GRID_FLOOR * scale;
            }
          }
        }
      }
      if (pending !== undefined) {
        pending.after2 = v;
        closeRun(pending, { min, max, high, low, step: knownStep > 0 ? knownStep : step });
        pending = undefined;
      }
      if (v >= fsHigh || v <= fsLow) {
        fsCount++;
        fsRun++;
      } else if (fsRun > 0) {
        if (fsRun >= 2) {
          fsCut += fsRun;
          fsRuns++;
        }
        fsRun = 0;
      }
      if (v === runValue) runLength++;
      else {
        if (runLength >= 3) {
          pending = {
            value: runValue,
            length: runLength,
            before1: runBefore1,
            before2: runBefore2,
            after1: v,
            after2: NaN,
          };
        }
        runBefore1 = last1;
        runBefore2 = last2;
        runValue = v;
        runLength = 1;
      }
      last2 = last1;
      last1 = v;
      plain = pending === undefined && runLength < 3 && fsRun === 0;
      onGrid = 0.5 * GRID_TOLERANCE * (max > -min ? max : -min);
      perStep = 1 / step; // a multiplication in the fast path, not a division
      upper = max < fsHigh ? max : fsHigh;
      lower = min > fsLow ? min : fsLow;
    }
    this.#n += x.length;
    this.#sum = sum;
    this.#sumSquares = sumSquares;
    this.#min = min;
    this.#max = max;
    this.#high = high;
    this.#low = low;
    this.#step = step;
    this.#refining = refining;
    this.#last1 = last1;
    this.#last2 = last2;
    this.#runValue = runValue;
    this.#runLength = runLength;
    this.#runBefore1 = runBefore1;
    this.#runBefore2 = runBefore2;
    this.#pending = pending;
    this.#fsCount = fsCount;
    this.#fsRun = fsRun;
    this.#fsCut = fsCut;
    this.#fsRuns = fsRuns;
  }

  /**
   * The smallest and largest sample pushed, when there was at least one and
   * all were finite (a finite sum proves it: NaN or ±Infinity would have
   * made the sum NaN or infinite); undefined otherwise.
   */
  get extent(): readonly [number, number] | undefined {
    return this.#n > 0 && Number.isFinite(this.#sum) ? [this.#min, this.#max] : undefined;
  }

  /** The warnings for the samples pushed so far. */
  warnings(channel: { name: string; unit: string }): string[] {
    const n = this.#n;
    if (n === 0) return [];
    const min = this.#min, max = this.#max;
    if (min === max) {
      return [
        `channel "${channel.name}" is constant (${min}) over the whole record: dead or disconnected?`,
      ];
    }
    const warnings: string[] = [];
    const converter = this.#converter;
    const fsCut = this.#fsCut + (this.#fsRun >= 2 ? this.#fsRun : 0);
    const fsRuns = this.#fsRuns + (this.#fsRun >= 2 ? 1 : 0);
    if (converter !== undefined && fsRuns > 0) {
      warnings.push(
        `channel "${channel.name}" is clipped at the converter's full scale (${converter.low}, ${converter.high} ${channel.unit}): ${this.#fsCount} samples (${
          percent(this.#fsCount, n)
        } %) at the rails, ${fsCut} of them in ${fsRuns} run(s) of 2 or more`,
      );
    }
    // Close the runs still open on copies, so that more samples can still follow.
    const high = { ...this.#high }, low = { ...this.#low };
    const step = converter?.step ?? this.#step;
    const range = { min, max, high, low, step };
    if (this.#pending !== undefined) closeRun({ ...this.#pending }, range);
    if (this.#runLength >= 3) {
      closeRun({
        value: this.#runValue,
        length: this.#runLength,
        before1: this.#runBefore1,
        before2: this.#runBefore2,
        after1: NaN,
        after2: NaN,
      }, range);
    }
    // A signal that rests at one extreme is a pulse train: flat tops at the other are its pulses.
    const resting = high.count >= 0.5 * n || low.count >= 0.5 * n;
    const clipping = resting ? [] : [high, low];
    const cut = clipping.reduce((a, r) => a + r.cutSamples, 0);
    if (cut >= Math.max(3, 0.001 * n)) {
      const atRails = clipping.reduce((a, r) => a + r.count, 0);
      const runs = clipping.reduce((a, r) => a + r.cutRuns, 0);
      warnings.push(
        `channel "${channel.name}" looks clipped: ${atRails} samples (${
          percent(atRails, n)
        } %) sit at its extremes (${formatNumber(min)}, ${
          formatNumber(max)
        } ${channel.unit}), ${cut} of them in ${runs} flat run(s) that cut the waveform (it falls more than ${CLIP_DROP_STEPS} quantisation steps of ${
          formatNumber(step)
        } ${channel.unit} within 2 samples of each end)`,
      );
    }
    const mean = this.#sum / n;
    const sd = Math.sqrt(Math.max(0, this.#sumSquares / n - mean * mean));
    if (!resting && Math.abs(mean) > 3 * sd) {
      warnings.push(
        `channel "${channel.name}" has a DC offset of ${
          formatNumber(mean, 3)
        } ${channel.unit}, over 3 times its standard deviation (${
          formatNumber(sd, 3)
        } ${channel.unit})`,
      );
    }
    return warnings;
  }
}

/** A share in per cent, two significant figures. */
const percent = (count: number, n: number) => Number((100 * count / n).toPrecision(2));

/**
 * Warnings for one channel (empty when it looks healthy); its converter's
 * rails are used when the channel carries them.
 *
 * @example
 * ```ts
 * import { channelWarnings } from "./signal_checks.ts";
 * const w = channelWarnings({ name: "acc", unit: "V", data: new Float64Array(100).fill(0.2) });
 * if (!w[0].includes("constant")) throw new Error();
 * ```
 */
export function channelWarnings(channel: Channel): string[] {
  const stats = new ChannelStatistics(channel.fullScale);
  stats.push(channel.data);
  return stats.warnings(channel);
}

/** Warnings for several channels. *
 * @example
 * ```ts
 * import { channelsWarnings } from "./signal_checks.ts";
 * const w = channelsWarnings([{ name: "dead", unit: "V", data: new Float64Array(10) }]);
 * if (w.length !== 1 || !w[0].includes("constant")) throw new Error();
 * ```
 */
export function channelsWarnings(channels: readonly Channel[]): string[] {
  return channels.flatMap(channelWarnings);
}
