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
  const x = channel.data;
  const n = x.length;
  if (n === 0) return [];
  let min = Infinity, max = -Infinity, sum = 0;
  for (let i = 0; i < n; i++) {
    if (x[i] < min) min = x[i];
    if (x[i] > max) max = x[i];
    sum += x[i];
  }
  if (min === max) {
    return [
      `channel "${channel.name}" is constant (${min}) over the whole record: dead or disconnected?`,
    ];
  }
  const warnings: string[] = [];
  let flat = 0;
  for (const limit of [max, min]) {
    let run = 0;
    for (let i = 0; i <= n; i++) {
      if (i < n && x[i] === limit) run++;
      else {
        if (run >= 3) flat += run;
        run = 0;
      }
    }
  }
  if (flat >= Math.max(3, 0.001 * n)) {
    warnings.push(
      `channel "${channel.name}" looks clipped: ${flat} samples sit in flat tops at its extremes (${min}, ${max} ${channel.unit})`,
    );
  }
  const mean = sum / n;
  let variance = 0;
  for (let i = 0; i < n; i++) variance += (x[i] - mean) ** 2;
  const sd = Math.sqrt(variance / n);
  if (Math.abs(mean) > 3 * sd) {
    warnings.push(
      `channel "${channel.name}" has a DC offset of ${
        mean.toPrecision(3)
      } ${channel.unit}, over 3 times its standard deviation (${sd.toPrecision(3)})`,
    );
  }
  return warnings;
}

/** Warnings for several channels. */
export function channelsWarnings(channels: readonly Channel[]): string[] {
  return channels.flatMap(channelWarnings);
}
