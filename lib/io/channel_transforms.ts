/**
 * What a channel set-up does to the channels of a recording
 * ({@linkcode ChannelTransform}: new name, unit, role, the factor on the
 * samples), and the conversion of every channel to its SI base unit
 * (units.ts), with or without a set-up. The set-up file itself (its zod
 * schema, parsing, reading) is channel_setup.ts, which re-exports these:
 * every reading applies transforms, only a reading with a set-up loads the
 * schema.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { Channel, ChannelRole, ConverterScale, Recording } from "./recording.ts";
import { FULL_SCALE_UNIT } from "./wav.ts";
import { baseUnit, sameQuantity } from "./units.ts";
import { didYouMean } from "../nearest_name.ts";
import type { ChannelSetup } from "./channel_setup.ts";

/** What a set-up does to one channel: its new name, unit and role, and the factor on its samples. */
export interface ChannelTransform {
  readonly name: string;
  readonly unit: string;
  readonly role?: ChannelRole;
  readonly factor: number;
  /** The converter's rails in the new unit, when the set-up gives a CSV column's range. */
  readonly fullScale?: ConverterScale;
}

/**
 * The transform of every channel (by name and unit as read from the file).
 *
 * @throws {QuiverError} for an entry that names no channel of the recording
 * or whose conversion cannot be made from the file's units.
 *
 * @example
 * ```ts
 * import { setupTransforms } from "./channel_transforms.ts";
 * const [t] = setupTransforms([{ name: "acc", unit: "mV" }], { channels: { acc: { unit: "m/s^2", sensitivity_mv_per_unit: 10 } } });
 * if (t.factor !== 0.1 || t.unit !== "m/s^2") throw new Error();
 * ```
 */
export function setupTransforms(
  channels: readonly { name: string; unit: string; role?: ChannelRole }[],
  setup: ChannelSetup,
  file?: string,
): ChannelTransform[] {
  const fail = (detail: string): never => {
    throw new QuiverError(detail, { file });
  };
  const known = new Set(channels.map((c) => c.name));
  const entryOf = (name: string) =>
    Object.hasOwn(setup.channels, name) ? setup.channels[name] : undefined;
  for (const key of Object.keys(setup.channels)) {
    if (!known.has(key)) {
      fail(
        `the set-up names channel "${key}"${
          didYouMean(key, [...known])
        }, which the recording does not have (it has ${[...known].join(", ")})`,
      );
    }
  }
  const transforms = channels.map((channel): ChannelTransform => {
    const entry = entryOf(channel.name);
    const keep = {
      name: channel.name,
      unit: channel.unit,
      factor: 1,
      ...(channel.role !== undefined ? { role: channel.role } : {}),
    };
    if (entry === undefined) return inBaseUnit(keep);
    const where = `set-up entry "${channel.name}"`;
    let volts: number | undefined;
    if (channel.unit === FULL_SCALE_UNIT) {
      if (entry.input_unit !== undefined) {
        fail(`${where}: input_unit is for CSV columns; for WAV give full_scale_volts`);
      }
      volts = entry.full_scale_volts;
    } else {
      if (
        entry.input_unit !== undefined && channel.unit !== "" && channel.unit !== entry.input_unit
      ) {
        fail(
          `${where}: input_unit ${entry.input_unit} contradicts the file's unit [${channel.unit}]`,
        );
      }
      const headerUnit = channel.unit === "" ? entry.input_unit : channel.unit;
      const base = headerUnit === undefined ? undefined : baseUnit(headerUnit);
      volts = base?.unit === "V" ? base.factor : undefined;
      if (entry.full_scale_volts !== undefined && volts === undefined) {
        fail(
          `${where}: full_scale_volts is the input range of a column in volts, but the column's unit is ${
            channel.unit === "" ? "not given (set input_unit)" : `[${channel.unit}]`
          }`,
        );
      }
    }
    // A CSV column's range in its own unit (a WAV channel's rails come from its bit depth).
    const range = channel.unit !== FULL_SCALE_UNIT && entry.full_scale_volts !== undefined
      ? entry.full_scale_volts / (volts as number)
      : undefined;
    let factor = 1;
    let unit = channel.unit;
    if (entry.sensitivity_mv_per_unit !== undefined) {
      if (entry.unit === undefined || entry.unit === "") {
        fail(`${where}: a sensitivity needs the engineering unit it refers to ("unit")`);
      }
      if (volts === undefined) {
        fail(
          channel.unit === FULL_SCALE_UNIT
            ? `${where}: a WAV channel needs full_scale_volts before a sensitivity can apply`
            : `${where}: a sensitivity needs voltage data, but the column's unit is ${
              channel.unit === "" ? "not given (set input_unit)" : `[${channel.unit}]`
            }`,
        );
      }
      factor = ((volts as number) * 1000) / entry.sensitivity_mv_per_unit;
      unit = entry.unit as string;
    } else if (channel.unit === FULL_SCALE_UNIT && volts !== undefined) {
      if (entry.unit !== undefined && entry.unit !== "V") {
        fail(`${where}: without a sensitivity the data are volts, not [${entry.unit}]`);
      }
      factor = volts;
      unit = "V";
    } else if (entry.unit !== undefined) {
      if (
        channel.unit !== "" && channel.unit !== entry.unit &&
        !sameQuantity(channel.unit, entry.unit)
      ) {
        fail(
          `${where}: unit [${entry.unit}] contradicts the file's unit [${channel.unit}]; give a sensitivity to convert`,
        );
      }
      // Units of one quantity ([g] in the file, m/s^2 in the set-up) both go to the base unit below.
      unit = channel.unit === "" ? entry.unit : channel.unit;
    }
    const role = entry.role ?? channel.role;
    const transform = inBaseUnit({
      name: entry.name ?? channel.name,
      unit,
      factor,
      ...(role !== undefined ? { role } : {}),
    });
    return range === undefined ? transform : {
      ...transform,
      fullScale: { low: -range * transform.factor, high: range * transform.factor },
    };
  });
  const names = new Set<string>();
  for (const t of transforms) {
    if (names.has(t.name)) fail(`after renaming, two channels are called "${t.name}"`);
    names.add(t.name);
  }
  return transforms;
}

/** The transform with its unit converted to the SI base unit (units.ts), when quiver knows it. */
function inBaseUnit(transform: ChannelTransform): ChannelTransform {
  const base = baseUnit(transform.unit);
  if (base === undefined || base.unit === transform.unit) return transform;
  return { ...transform, unit: base.unit, factor: transform.factor * base.factor };
}

/**
 * Applies a set-up to a recording: renames, converts volts to engineering
 * units, sets units and roles.
 *
 * @throws {QuiverError} as {@linkcode setupTransforms} does.
 *
 * @example
 * ```ts
 * import { applyChannelSetup } from "./channel_transforms.ts";
 * const rec = { rate: 100, startTime: 0, channels: [{ name: "acc", unit: "mV", data: new Float64Array([102]) }] };
 * const out = applyChannelSetup(rec, { channels: { acc: { unit: "m/s^2", sensitivity_mv_per_unit: 10.2 } } });
 * if (Math.abs(out.channels[0].data[0] - 10) > 1e-12) throw new Error();
 * ```
 */
export function applyChannelSetup(
  recording: Recording,
  setup: ChannelSetup,
  file?: string,
): Recording {
  const transforms = setupTransforms(recording.channels, setup, file);
  const channels = recording.channels.map((c, i): Channel => {
    const { factor, ...meta } = transforms[i];
    return { ...meta, data: factor === 1 ? c.data : c.data.map((v) => v * factor) };
  });
  return { ...recording, channels };
}
