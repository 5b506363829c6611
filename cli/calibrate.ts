/**
 * `quiver calibrate`: microphone sensitivity from a calibrator recording.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { readFile } from "node:fs/promises";
import process from "node:process";
import { z } from "npm:zod@4.6.7";
import { calibrateMicrophone } from "../lib/acoustics/calibration.ts";
import { QuiverError } from "../lib/errors.ts";
import { writeFileAtomic } from "../lib/io/atomic_write.ts";
import { type ChannelSetup, parseChannelSetup } from "../lib/io/channel_setup.ts";
import { openRecordingStream } from "../lib/io/recording_stream.ts";
import { channelIndices } from "../lib/io/recording.ts";
import { FULL_SCALE_UNIT } from "../lib/io/wav.ts";
import {
  inFile,
  inFileAsync,
  numberOption,
  type OptionSpec,
  parseCommandArgs,
  usageError,
} from "./args.ts";

/** One-line summary for the command list. */
export const summary =
  "microphone sensitivity from an acoustic calibrator recording; updates the set-up";

/** The command's help text. */
export const help = `quiver calibrate IN --channel CH [options]

Reads the calibrator tone on channel CH of IN (raw volts: a CSV column in
[V] or [mV], or a WAV channel with full_scale_volts in the set-up), reports
the microphone sensitivity in mV/Pa, and writes it into the channel set-up.

  --channel CH         the microphone channel, by its name in the file or in
                       the set-up                                   (required)
  --level DB           calibrator level, dB re 20 uPa               (default 94)
  --frequency HZ       calibrator frequency                         (default 1000)
  --setup FILE         set-up to read (for full_scale_volts) and to update
  --out FILE           where to write the updated set-up (default: --setup's
                       file; without either, the set-up goes to stdout)
  --rate HZ            sample rate, for a CSV without a time column
  --start S, --end S   use only the samples at times S_start <= t < S_end (default: all)

A calibrator at 94 dB (1 Pa rms) and 1 kHz is common practice. quiver's
levels are for engineering comparison, not certified measurements.
`;

/** zod schema of the options. */
export const schema = z.strictObject({
  channel: z.string().min(1),
  level: numberOption().pipe(z.number().positive("must be a positive number of dB")).optional(),
  frequency: numberOption().pipe(z.number().positive("must be a positive number of Hz")).optional(),
  setup: z.string().min(1).optional(),
  out: z.string().min(1).optional(),
  rate: numberOption().pipe(z.number().positive("must be a positive number of Hz")).optional(),
  start: numberOption().optional(),
  end: numberOption().optional(),
});

const text = { type: "string" } as const;

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  channel: text,
  level: text,
  frequency: text,
  setup: text,
  out: text,
  rate: text,
  start: text,
  end: text,
};

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
  const result = await inFileAsync(input, () =>
    calibrateMicrophone(stream, index, {
      levelDb: values.level ?? 94,
      frequencyHz: values.frequency ?? 1000,
      voltsPerUnit,
    }));
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
  toStderr(
    `${values.channel}: ${result.toneRmsVolts.toPrecision(6)} V rms at ${result.toneHz} Hz for ` +
      `${result.pressureRmsPa.toPrecision(6)} Pa rms -> sensitivity ${
        result.sensitivityMvPerPa.toPrecision(6)
      } mV/Pa` +
      `${target !== undefined ? ` (written to ${target})` : ""}\n`,
  );
}
