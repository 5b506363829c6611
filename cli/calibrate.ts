/**
 * `quiver calibrate`: microphone sensitivity from a calibrator recording.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";
import { RECORDING_TABLE } from "./recording_options.ts";
import { readFile } from "node:fs/promises";
import process from "node:process";
import { z } from "npm:zod@4.6.7";
import { calibrateMicrophone, CALIBRATOR_LEVEL_DB } from "../lib/acoustics/calibration.ts";
import { QuiverError } from "../lib/errors.ts";
import { formatFixed, formatNumber } from "../lib/format_number.ts";
import { writeFileAtomic } from "../lib/io/atomic_write.ts";
import { type ChannelSetup, parseChannelSetup } from "../lib/io/channel_setup.ts";
import { openRecordingStream } from "../lib/io/recording_stream.ts";
import { channelIndices } from "../lib/io/recording.ts";
import { FULL_SCALE_UNIT } from "../lib/io/wav.ts";
import { inFile, inFileAsync, numberOption, parseCommandArgs, usageError } from "./args.ts";

/** One-line summary for the command list. */
export const summary =
  "microphone sensitivity from an acoustic calibrator recording; updates the set-up";

// A calibrator level outside this is a slip (pascals, a lost decimal point), refused as such.
const LEVEL_RANGE =
  `must lie above ${CALIBRATOR_LEVEL_DB.above} dB and at most ${CALIBRATOR_LEVEL_DB.atMost} dB re 20 uPa (calibrators give 94 or 114 dB, pistonphones about 124 dB)`;

const ANALYSIS = {
  level: option(
    numberOption().pipe(
      z.number().gt(CALIBRATOR_LEVEL_DB.above, LEVEL_RANGE).lte(
        CALIBRATOR_LEVEL_DB.atMost,
        LEVEL_RANGE,
      ),
    ),
    {
      value: "DB",
      help: "calibrator level, dB re 20 uPa",
      default: "94",
      feeds: "levelDb",
    },
  ),
  frequency: option(numberOption().pipe(z.number().positive("must be a positive number of Hz")), {
    value: "HZ",
    help: "calibrator frequency",
    default: "1000",
    feeds: "frequencyHz",
  }),
};

const TABLE = {
  channel: option(z.string().min(1), {
    value: "CH",
    help: "the microphone channel, by its name in the file or in\nthe set-up",
    required: true,
  }),
  ...ANALYSIS,
  setup: option(z.string().min(1), {
    value: "FILE",
    help: "set-up to read (for full_scale_volts) and to update",
  }),
  out: option(z.string().min(1), {
    value: "FILE",
    help:
      "where to write the updated set-up (default: --setup's\nfile; without either, the set-up goes to stdout)",
  }),
  rate: RECORDING_TABLE.rate,
  start: RECORDING_TABLE.start,
  end: RECORDING_TABLE.end,
};

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver calibrate IN --channel CH [options]",
  about: `Reads the calibrator tone on channel CH of IN (raw volts: a CSV column in
[V] or [mV], or a WAV channel with full_scale_volts in the set-up), reports
the microphone sensitivity in mV/Pa, and writes it into the channel set-up.`,
  groups: [[undefined, TABLE]],
  notes: `A calibrator at 94 dB (1 Pa rms) and 1 kHz is common practice. Only the
steady tone counts: 0.1 s frames more than 0.3 dB from the median frame level
(a dropout, a level step) are left out with one frame either side, with a
warning naming them; when more than 25 % of the frames are unsteady the
calibration is refused and the set-up is not written. quiver's levels are
for engineering comparison, not certified measurements.`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`calibrate takes one recording, got ${positionals.length}`);
  }
  const [input] = positionals;
  let setup: ChannelSetup = { channels: {} };
  if (values.setup !== undefined) {
    let textContent: string | undefined;
    try {
      textContent = await readFile(values.setup, "utf8");
    } catch (error) {
      if ((error as { code?: string }).code !== "ENOENT") throw error;
    }
    if (textContent !== undefined) setup = parseChannelSetup(textContent, values.setup);
  }
  // The raw recording: the calibration must see volts, not an older sensitivity's output.
  const stream = await openRecordingStream(
    input,
    {
      ...(values.rate !== undefined ? { rate: values.rate } : {}),
      ...(values.start !== undefined ? { start: values.start } : {}),
      ...(values.end !== undefined ? { end: values.end } : {}),
    },
  );
  const key = Object.entries(setup.channels).find(([, e]) => e.name === values.channel)?.[0] ??
    values.channel;
  const [index] = inFile(input, () => channelIndices(stream.channels, [key]));
  const channel = stream.channels[index];
  const entry = setup.channels[key] ?? {};
  const voltsPerUnit = channel.unit === "V"
    ? 1
    : channel.unit === "mV"
    ? 1e-3
    : channel.unit === FULL_SCALE_UNIT && entry.full_scale_volts !== undefined
    ? entry.full_scale_volts
    : channel.unit === "" && entry.input_unit !== undefined
    ? (entry.input_unit === "V" ? 1 : 1e-3)
    : undefined;
  if (voltsPerUnit === undefined) {
    throw new QuiverError(
      channel.unit === FULL_SCALE_UNIT
        ? `channel "${key}" is a WAV channel: give its full_scale_volts in the set-up (--setup)`
        : `channel "${key}" is in [${channel.unit}], not volts; calibrate from raw [V] or [mV] data`,
      { file: input },
      "usage",
    );
  }
  const result = await inFileAsync(
    input,
    () => calibrateMicrophone(stream, index, { ...libraryOptions(ANALYSIS, values), voltsPerUnit }),
  );
  const updated: ChannelSetup = {
    ...setup,
    channels: {
      ...setup.channels,
      [key]: {
        ...entry,
        unit: "Pa",
        sensitivity_mv_per_unit: result.sensitivityMvPerPa,
        role: entry.role ?? "microphone",
      },
    },
  };
  const json = JSON.stringify(updated, null, 2) + "\n";
  parseChannelSetup(json); // what is written must read back
  const target = values.out ?? values.setup;
  if (target === undefined) process.stdout.write(json);
  else await writeFileAtomic(target, json);
  for (const warning of result.warnings) {
    toStderr(`quiver calibrate: warning: ${warning}\n`);
  }
  toStderr(
    `${values.channel}: ${result.toneRmsVolts.toPrecision(6)} V rms at ${result.toneHz} Hz over ${
      formatNumber(result.steadySeconds, 3)
    } s of steady tone for ` +
      `${result.pressureRmsPa.toPrecision(6)} Pa rms -> sensitivity ${
        result.sensitivityMvPerPa.toPrecision(6)
      } mV/Pa` +
      `${target !== undefined ? ` (written to ${target})` : ""}\n`,
  );
  toStderr(`${values.channel}: ${sensitivityChange(entry, result.sensitivityMvPerPa)}\n`);
}

/**
 * The new sensitivity beside the one the set-up held before, and the change
 * in dB: 20·lg(new/old), a ratio of field quantities (mV/Pa), as IEC 60027-3
 * defines the decibel for them. Without an old sensitivity in mV/Pa, says so.
 *
 * @example
 * ```ts
 * import { sensitivityChange } from "./calibrate.ts";
 * const line = sensitivityChange({ unit: "Pa", sensitivity_mv_per_unit: 50 }, 100);
 * if (line !== "sensitivity was 50.0000 mV/Pa, now 100.000 mV/Pa: +6.02 dB") throw new Error();
 * ```
 */
export function sensitivityChange(
  before: { unit?: string; sensitivity_mv_per_unit?: number },
  nowMvPerPa: number,
): string {
  const now = `now ${nowMvPerPa.toPrecision(6)} mV/Pa`;
  const old = before.sensitivity_mv_per_unit;
  if (old === undefined) return `the set-up had no sensitivity for this channel; ${now}`;
  if (before.unit !== "Pa") {
    return `sensitivity was ${old.toPrecision(6)} mV per ${
      before.unit === undefined || before.unit === "" ? "unit (no unit given)" : before.unit
    }, not per Pa, so no change in dB is given; ${now}`;
  }
  const db = 20 * Math.log10(nowMvPerPa / old);
  const signed = `${db >= 0 ? "+" : "-"}${formatFixed(Math.abs(db), 2)} dB`;
  return `sensitivity was ${old.toPrecision(6)} mV/Pa, ${now}: ${signed}`;
}
