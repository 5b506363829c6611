/**
 * Signal-level warnings that travel with a result: things that do not stop
 * an analysis but can make its numbers wrong.
 *
 * - constant: every sample equal (a dead or disconnected channel);
 * - clipped: the waveform is cut flat at the channel's extreme values (its
 *   rails). A sample run counts as clipping when it is 3 or more samples
 *   long at the rail and the waveform enters and leaves it continuously:
 *   the samples either side lie within half the channel's range of the
 *   rail. A clean two-level signal (a TTL tacho) jumps onto its levels
 *   instead, so it is not clipping. A rail that holds half the record or
 *   more is a resting level (a force channel on an exact-zero baseline),
 *   not clipping either. The warning needs such runs to make up at least
 *   0.1 % of the record (and 3 samples), and states the true count of
 *   samples at the rails;
 * - DC offset: |mean| above 3 × the standard deviation (an offset large
 *   against the signal; the default mean detrend removes it per segment, but
 *   it often means a wrong zero or a saturated amplifier).
 *
 * Thresholds are common practice, stated here so that a warning can be
 * understood.
 *
 * @module
 */
import type { Channel } from "./recording.ts";
import { formatNumber } from "../format_number.ts";

/** What is known of one rail (the channel's highest or lowest value so far). */
interface Rail {
  /** Samples exactly at the rail. */
  count: number;
  /** Samples in runs of 3 or more at the rail, entered and left continuously. */
  cutSamples: number;
  /** Such runs. */
  cutRuns: number;
}

const emptyRail = (): Rail => ({ count: 0, cutSamples: 0, cutRuns: 0 });

/**
 * Judges a run of at least 3 equal samples that has just ended at the sample
 * `after` (NaN at the record's end): one at a rail, with its neighbours on
 * the same side, cuts the waveform. The range used is the range so far: it
 * only grows, so a run judged early is judged at most more strictly.
 */
function closeRun(
  run: { value: number; length: number; before: number; after: number },
  range: { min: number; max: number; high: Rail; low: Rail },
): void {
  const v = run.value;
  const rail = v === range.max ? range.high : v === range.min ? range.low : undefined;
  if (rail === undefined) return;
  const half = 0.5 * (range.max - range.min);
  const near = (u: number) => Number.isNaN(u) || Math.abs(u - v) < half;
  if (near(run.before) && near(run.after)) {
    rail.cutSamples += run.length;
    rail.cutRuns++;
  }
}

/**
 * Running statistics of one channel over chunks, for the warnings above:
 * feed every chunk in order, then ask for {@linkcode ChannelStatistics.warnings}.
 * A whole record and the same record in chunks give the same warnings.
 */
export class ChannelStatistics {
  #n = 0;
  #sum = 0;
  #sumSquares = 0;
  #min = Infinity;
  #max = -Infinity;
  #high = emptyRail();
  #low = emptyRail();
  // The run of equal values in progress and the sample before it.
  #runValue = NaN;
  #runLength = 0;
  #beforeRun = NaN;

  /** Adds the next samples. */
  push(x: Float64Array): void {
    // The state lives in locals for the loop (fields read and written per sample cost more than
    // the checks themselves) and is stored back at the end.
    let sum = this.#sum, sumSquares = this.#sumSquares, min = this.#min, max = this.#max;
    let high = this.#high, low = this.#low;
    let runValue = this.#runValue, runLength = this.#runLength, beforeRun = this.#beforeRun;
    for (let i = 0; i < x.length; i++) {
      const v = x[i];
      sum += v;
      sumSquares += v * v;
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
      if (v === runValue) runLength++;
      else {
        if (runLength >= 3) {
          closeRun({ value: runValue, length: runLength, before: beforeRun, after: v }, {
            min,
            max,
            high,
            low,
          });
        }
        beforeRun = runValue;
        runValue = v;
        runLength = 1;
      }
    }
    this.#n += x.length;
    this.#sum = sum;
    this.#sumSquares = sumSquares;
    this.#min = min;
    this.#max = max;
    this.#high = high;
    this.#low = low;
    this.#runValue = runValue;
    this.#runLength = runLength;
    this.#beforeRun = beforeRun;
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
    // Close the run in progress on copies, so that more samples can still follow.
    const high = { ...this.#high }, low = { ...this.#low };
    if (this.#runLength >= 3) {
      closeRun(
        { value: this.#runValue, length: this.#runLength, before: this.#beforeRun, after: NaN },
        { min, max, high, low },
      );
    }
    const warnings: string[] = [];
    const clipping = [high, low].filter((r) => r.count < 0.5 * n);
    const cut = clipping.reduce((a, r) => a + r.cutSamples, 0);
    if (cut >= Math.max(3, 0.001 * n)) {
      const atRails = clipping.reduce((a, r) => a + r.count, 0);
      const runs = clipping.reduce((a, r) => a + r.cutRuns, 0);
      warnings.push(
        `channel "${channel.name}" looks clipped: ${atRails} samples (${
          Number((100 * atRails / n).toPrecision(2))
        } %) sit at its extremes (${formatNumber(min)}, ${
          formatNumber(max)
        } ${channel.unit}), ${cut} of them in ${runs} flat run(s) that cut the waveform`,
      );
    }
    const mean = this.#sum / n;
    const sd = Math.sqrt(Math.max(0, this.#sumSquares / n - mean * mean));
    if (Math.abs(mean) > 3 * sd) {
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

/**
 * Warnings for one channel (empty when it looks healthy).
 *
 * @example
 * ```ts
 * import { channelWarnings } from "./signal_checks.ts";
 * const w = channelWarnings({ name: "acc", unit: "V", data: new Float64Array(100).fill(0.2) });
 * if (!w[0].includes("constant")) throw new Error();
 * ```
 */
export function channelWarnings(channel: Channel): string[] {
  const stats = new ChannelStatistics();
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
