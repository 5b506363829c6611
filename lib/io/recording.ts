/**
 * The recording: what every reader produces and every analysis consumes.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";

/**
 * What a channel measures, as the channel set-up declares it.
 *
 * @example
 * ```ts
 * import { CHANNEL_ROLES } from "./recording.ts";
 * if (!CHANNEL_ROLES.includes("force")) throw new Error();
 * ```
 */
export const CHANNEL_ROLES = [
  "force",
  "response",
  "microphone",
  "tacho",
  "other",
] as const;

/** One of {@linkcode CHANNEL_ROLES}. */
export type ChannelRole = typeof CHANNEL_ROLES[number];

/** One measured signal. */
export interface Channel {
  /** Channel name, unique within the recording. */
  readonly name: string;
  /** Engineering unit of the samples (e.g. `m/s^2`, `Pa`, `N`), "" if unknown. */
  readonly unit: string;
  /** Samples at the recording's rate. */
  readonly data: Float64Array;
  /** What the channel measures, when a set-up says so. */
  readonly role?: ChannelRole;
  /**
   * The converter's rails (and step) in the channel's unit, when known:
   * integer PCM WAV, or a CSV column whose set-up gives `full_scale_volts`.
   */
  readonly fullScale?: ConverterScale;
}

/**
 * An integer converter's lowest and highest codes and its step, in the
 * channel's unit: samples at `low` or `high` are at full scale.
 */
export interface ConverterScale {
  /** The lowest code's value. */
  readonly low: number;
  /** The highest code's value. */
  readonly high: number;
  /** One code's step (the LSB), when known (integer PCM; not for a CSV column's range). */
  readonly step?: number;
}

/** A multi-channel time history at one sample rate. */
export interface Recording {
  /** Sample rate in Hz. */
  readonly rate: number;
  /** Time of the first sample in seconds (0 when the file has no time column). */
  readonly startTime: number;
  /** The channels, all of the same length. */
  readonly channels: readonly Channel[];
}

/**
 * Looks up channels by name, in the order asked, or all channels when
 * `names` is undefined.
 *
 * @throws {QuiverError} (usage) naming the unknown channel and the known ones.
 *
 * @example
 * ```ts
 * import { selectChannels } from "./recording.ts";
 * const rec = { rate: 1, startTime: 0, channels: [{ name: "a", unit: "", data: new Float64Array(1) }] };
 * if (selectChannels(rec, ["a"])[0].name !== "a") throw new Error();
 * ```
 */
export function selectChannels(
  recording: Recording,
  names?: readonly string[],
): Channel[] {
  return channelIndices(recording.channels, names).map((i) => recording.channels[i]);
}

/**
 * Indices of channels by name, in the order asked, or all when `names` is
 * undefined (the same rule and message as {@linkcode selectChannels}).
 *
 * @example
 * ```ts
 * import { channelIndices } from "./recording.ts";
 * if (channelIndices([{ name: "a" }, { name: "b" }], ["b"])[0] !== 1) throw new Error();
 * ```
 */
export function channelIndices(
  channels: readonly { name: string }[],
  names?: readonly string[],
): number[] {
  if (names === undefined) return channels.map((_, i) => i);
  return names.map((name) => {
    const index = channels.findIndex((c) => c.name === name);
    if (index < 0) {
      throw new QuiverError(
        `no channel named "${name}"; the recording has ${
          channels.map((c) => `"${c.name}"`).join(", ")
        }`,
        {},
        "usage",
      );
    }
    return index;
  });
}

/** Number of samples per channel. */
export function recordingLength(recording: Recording): number {
  return recording.channels[0]?.data.length ?? 0;
}
