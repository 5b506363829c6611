/**
 * Signal-level warnings that travel with a result: things that do not stop
 * an analysis but can make its numbers wrong.
 *
 * - constant: every sample equal (a dead or disconnected channel);
 * - clipped: 3 or more consecutive samples at the channel's maximum or
 *   minimum, together at least 0.1 % of the record (flat tops at the
 *   converter's limits);
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
  // Runs of equal consecutive values, kept per distinct value: only the final
  // extremes matter, but they are known only at the end.
  #runValue = NaN;
  #runLength = 0;
  readonly #flatRuns = new Map<number, number>();

  /** Adds the next samples. */
  push(x: Float64Array): void {
    for (let i = 0; i < x.length; i++) {
      const v = x[i];
      this.#n++;
      this.#sum += v;
      this.#sumSquares += v * v;
      if (v < this.#min) this.#min = v;
      if (v > this.#max) this.#max = v;
      if (v === this.#runValue) this.#runLength++;
      else {
        this.#closeRun();
        this.#runValue = v;
        this.#runLength = 1;
      }
    }
  }

  #closeRun(): void {
    if (this.#runLength >= 3) {
      this.#flatRuns.set(
        this.#runValue,
        (this.#flatRuns.get(this.#runValue) ?? 0) + this.#runLength,
      );
    }
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
    const runs = new Map(this.#flatRuns);
    if (this.#runLength >= 3) {
      runs.set(this.#runValue, (runs.get(this.#runValue) ?? 0) + this.#runLength);
    }
    const flat = (runs.get(max) ?? 0) + (runs.get(min) ?? 0);
    const warnings: string[] = [];
    if (flat >= Math.max(3, 0.001 * n)) {
      warnings.push(
        `channel "${channel.name}" looks clipped: ${flat} samples sit in flat tops at its extremes (${min}, ${max} ${channel.unit})`,
      );
    }
    const mean = this.#sum / n;
    const sd = Math.sqrt(Math.max(0, this.#sumSquares / n - mean * mean));
    if (Math.abs(mean) > 3 * sd) {
      warnings.push(
        `channel "${channel.name}" has a DC offset of ${
          mean.toPrecision(3)
        } ${channel.unit}, over 3 times its standard deviation (${sd.toPrecision(3)})`,
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

/** Warnings for several channels. */
export function channelsWarnings(channels: readonly Channel[]): string[] {
  return channels.flatMap(channelWarnings);
}
