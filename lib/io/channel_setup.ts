/**
 * The channel set-up file: per-channel unit, sensitivity and role.
 *
 * ```json
 * {
 *   "description": "Ridgeback road test, rig B, 2026-11-12",
 *   "channels": {
 *     "seat_rail_z": { "unit": "m/s^2", "sensitivity_mv_per_unit": 10.2, "role": "response" },
 *     "ch3": { "name": "driver_ear", "unit": "Pa", "full_scale_volts": 5, "sensitivity_mv_per_unit": 50, "role": "microphone" }
 *   }
 * }
 * ```
 *
 * Keys of `channels` are the names in the file (CSV header names, or `ch1` …
 * for WAV). Fields of an entry:
 * - `name`: new channel name (default: the key).
 * - `unit`: engineering unit. Required with a sensitivity.
 * - `sensitivity_mv_per_unit`: transducer sensitivity in mV per engineering
 *   unit (e.g. 10.2 mV/(m/s²), 50 mV/Pa). The data must then be voltages:
 *   CSV header unit `V` or `mV` (or `input_unit`), or WAV with
 *   `full_scale_volts`. Engineering value = volts·1000/sensitivity.
 * - `input_unit`: `V` or `mV`, for a CSV column whose header has no unit.
 * - `full_scale_volts`: for WAV, the voltage at digital full scale; for a
 *   CSV column in volts, the converter's input range ±V (its rails, against
 *   which clipping is judged: signal_checks.ts).
 * - `role`: `force`, `response`, `microphone`, `tacho` or `other`.
 * - `description`: free text (e.g. sensor position).
 *
 * Unknown fields, unknown channels, and a unit that contradicts the file's
 * own header are errors, never silently ignored. A sensitivity must lie in
 * {@linkcode SENSITIVITY_RANGE_MV_PER_UNIT} and a full scale in
 * {@linkcode FULL_SCALE_RANGE_VOLTS}: zero, negative, non-finite or absurd
 * values are refused naming the channel and the value (they would turn the
 * data into Infinity or NaN). Channel names (keys and `name`) may not hold
 * control, bidirectional or zero-width characters (names.ts); a key is
 * looked up as the set-up's own entry only, so a channel called
 * `constructor` or `__proto__` is a name like any other. Every channel's unit, with
 * or without a set-up, ends in its SI base unit when quiver knows it
 * (units.ts): a column in [g] is read in m/s^2, one in [mm/s] in m/s.
 *
 * @module
 */
import { readFile } from "node:fs/promises";
import { z } from "npm:zod@4.6.7";
import { QuiverError } from "../errors.ts";
import { CHANNEL_ROLES } from "./recording.ts";
import { checkName } from "./names.ts";
import { assertRegularFile, unreadable } from "./file_kinds.ts";

// What a set-up does to the channels lives apart (no zod there): every reading applies the
// transforms, only a reading with --setup parses a set-up file.
export { applyChannelSetup, type ChannelTransform, setupTransforms } from "./channel_transforms.ts";

/**
 * Sensitivities accepted, in mV per engineering unit: 1e-6 … 1e6. Real
 * transducers lie well inside (about 0.01 mV/N for a large force cell to
 * 10 000 mV/g for a seismic accelerometer, from memory); the range is wide
 * so that any unit prefix fits, and narrow enough that volts·1000/sensitivity
 * can neither overflow nor vanish.
 *
 * @example
 * ```ts
 * import { SENSITIVITY_RANGE_MV_PER_UNIT } from "./channel_setup.ts";
 * if (SENSITIVITY_RANGE_MV_PER_UNIT[0] !== 1e-6 || SENSITIVITY_RANGE_MV_PER_UNIT[1] !== 1e6) throw new Error();
 * ```
 */
export const SENSITIVITY_RANGE_MV_PER_UNIT: readonly [number, number] = [1e-6, 1e6];

/**
 * Full-scale voltages accepted for WAV channels, in V: 1e-6 … 1e4 (acquisition
 * ranges run from millivolts to some hundred volts, common practice).
 *
 * @example
 * ```ts
 * import { FULL_SCALE_RANGE_VOLTS } from "./channel_setup.ts";
 * if (FULL_SCALE_RANGE_VOLTS[1] !== 1e4) throw new Error();
 * ```
 */
export const FULL_SCALE_RANGE_VOLTS: readonly [number, number] = [1e-6, 1e4];

const channelEntrySchema = z.strictObject({
  name: z.string().trim().min(1).optional(),
  unit: z.string().trim().optional(),
  sensitivity_mv_per_unit: z.number().positive().finite().optional(),
  input_unit: z.enum(["V", "mV"]).optional(),
  full_scale_volts: z.number().positive().finite().optional(),
  role: z.enum(CHANNEL_ROLES).optional(),
  description: z.string().optional(),
});

/**
 * The zod schema of a channel set-up file.
 *
 * @example
 * ```ts
 * import { channelSetupSchema } from "./channel_setup.ts";
 * const ok = channelSetupSchema.safeParse({ channels: { ch1: { name: "driver_ear", unit: "Pa", sensitivity_mv_per_unit: 50 } } });
 * if (!ok.success) throw new Error();
 * ```
 */
export const channelSetupSchema = z.strictObject({
  description: z.string().optional(),
  channels: z.record(z.string(), channelEntrySchema),
});

/** A validated channel set-up. */
export type ChannelSetup = z.infer<typeof channelSetupSchema>;

/**
 * Parses and validates set-up JSON text.
 *
 * @throws {QuiverError} naming the file and the offending field or position.
 *
 * @example
 * ```ts
 * import { parseChannelSetup } from "./channel_setup.ts";
 * const s = parseChannelSetup('{"channels": {"a": {"unit": "N", "role": "force"}}}');
 * if (s.channels.a.role !== "force") throw new Error();
 * ```
 */
export function parseChannelSetup(text: string, file?: string): ChannelSetup {
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    const position = /position (\d+)/.exec(message);
    const location = position === null ? { file } : lineAndColumn(text, Number(position[1]), file);
    throw new QuiverError(`not valid JSON: ${message}`, location);
  }
  checkRawChannels(json, file);
  const result = channelSetupSchema.safeParse(json);
  if (!result.success) {
    const issue = result.error.issues[0];
    const path = issue.path.map(String).join(".");
    throw new QuiverError(
      `channel set-up${path === "" ? "" : ` field ${path}`}: ${issue.message}`,
      { file },
    );
  }
  // Own entries only, in an object without a prototype (zod drops a "__proto__" key).
  const channels: ChannelSetup["channels"] = Object.create(null);
  const raw = (json as { channels: Record<string, unknown> }).channels;
  for (const key of Object.keys(raw)) {
    const entry = channelEntrySchema.safeParse(raw[key]);
    if (!entry.success) {
      throw new QuiverError(
        `channel set-up field channels.${key}: ${entry.error.issues[0].message}`,
        { file },
      );
    }
    Object.defineProperty(channels, key, { value: entry.data, enumerable: true, writable: true });
  }
  return { ...result.data, channels };
}

/**
 * Reads and validates the set-up file at `path` ({@linkcode parseChannelSetup}).
 *
 * @throws {QuiverError} (usage) for a path that is not a regular file or
 * cannot be read; as {@linkcode parseChannelSetup} for its content.
 *
 * @example
 * ```ts
 * import { readChannelSetup } from "./channel_setup.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/s.json`, '{ "channels": { "a": { "role": "tacho" } } }');
 * if ((await readChannelSetup(`${dir}/s.json`)).channels.a.role !== "tacho") throw new Error();
 * ```
 */
export async function readChannelSetup(path: string): Promise<ChannelSetup> {
  assertRegularFile(path, "channel set-up");
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (error) {
    throw unreadable(path, error);
  }
  return parseChannelSetup(text, path);
}

/** Names and numbers of the raw entries, checked before the schema so the message names both. */
function checkRawChannels(json: unknown, file?: string): void {
  if (typeof json !== "object" || json === null || !("channels" in json)) return;
  const channels = json.channels;
  if (typeof channels !== "object" || channels === null) return;
  for (const [key, entry] of Object.entries(channels)) {
    checkName(key, `set-up channel "${key}"`, { file });
    if (typeof entry !== "object" || entry === null) continue;
    const fields = entry as Record<string, unknown>;
    if (Object.hasOwn(fields, "name") && typeof fields.name === "string") {
      checkName(fields.name, `set-up channel "${key}": new name`, { file });
    }
    const ranges = [
      ["sensitivity_mv_per_unit", SENSITIVITY_RANGE_MV_PER_UNIT, "mV per unit"],
      ["full_scale_volts", FULL_SCALE_RANGE_VOLTS, "V"],
    ] as const;
    for (const [field, [low, high], unit] of ranges) {
      if (!Object.hasOwn(fields, field)) continue;
      const value = fields[field];
      if (typeof value !== "number") continue; // the schema names the wrong type
      if (!(value >= low && value <= high)) {
        throw new QuiverError(
          `set-up channel "${key}": ${field} ${value} is out of range; quiver accepts ${low} … ${high} ${unit} (zero, negative, non-finite or absurd values would make the data Infinity or NaN)`,
          { file },
        );
      }
    }
  }
}

function lineAndColumn(text: string, position: number, file?: string) {
  const before = text.slice(0, position).split("\n");
  return { file, line: before.length, column: before[before.length - 1].length + 1 };
}
