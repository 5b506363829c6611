/**
 * `quiver spectrogram`: spectra against time, each frame scaled as `spectrum`.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { formatNumber } from "../lib/format_number.ts";
import { z } from "npm:zod@4.6.7";
import { MAX_SPECTROGRAM_CELLS, spectrogram } from "../lib/dsp/spectrogram.ts";
import { SPECTRUM_KINDS } from "../lib/dsp/spectrum_kinds.ts";
import { WEIGHTINGS } from "../lib/acoustics/weighting.ts";
import { integerOption, listOption, numberOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import { spectrogramAgainstRpm } from "../lib/orders/rpm_spectrogram.ts";
import { oneSpeedSource, positiveListOption, pprWithTacho, SPEED_TABLE } from "./speed_options.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { oneBlockChoice, OUTPUT_TABLE, SEGMENT_TABLE } from "./segment_options.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";
import { RECORDING_FORMAT_NAMES } from "../lib/io/formats/mod.ts";

/** One-line summary for the command list. */
export const summary = "spectra against time or rpm (a colour map's data), scaled as spectrum";

const ANALYSIS = {
  channels: option(listOption(), {
    value: "a,b",
    help: "channels to analyse, in output order",
    default: "all; against rpm, all but the speed channel",
  }),
  ...SEGMENT_TABLE,
  kind: option(z.enum(SPECTRUM_KINDS), {
    value: "K",
    help: "psd | power | rms | peak",
    default: "psd",
  }),
  frames: option(integerOption(), {
    value: "K",
    help: "segments averaged per frame",
    default: "1",
  }),
  weighting: option(z.enum(WEIGHTINGS), {
    value: "W",
    help: "A | C | Z, line by line (IEC 61672-1)",
    default: "Z",
  }),
  db: option(z.boolean(), {
    flag: true,
    help: "levels in dB re the unit's ISO 1683 reference (or --reference)",
  }),
  reference: option(numberOption().pipe(z.number().positive("must be a positive number")), {
    value: "R",
    help: "level reference for --db",
  }),
  "min-hz": option(numberOption().pipe(z.number().min(0, "must be at least 0")), {
    value: "F",
    help: "lowest frequency kept",
    default: "0",
  }),
  "max-hz": option(numberOption().pipe(z.number().positive("must be positive")), {
    value: "F",
    help: "highest frequency kept (at most half the rate)",
    default: "half the rate",
  }),
  "max-cells": option(integerOption(), {
    value: "N",
    help: "refuse an output larger than N cells",
    default: String(MAX_SPECTROGRAM_CELLS),
  }),
};

const AGAINST = {
  against: option(z.enum(["time", "rpm"]), {
    value: "A",
    help: "time | rpm",
    default: "time",
  }),
};

const RPM_ONLY = {
  ...SPEED_TABLE,
  orders: option(positiveListOption("orders"), {
    value: "2,8,16",
    help:
      "order lines the report draws over the map\n(recorded in the metadata; no effect on the values)",
    feeds: "orderLines",
  }),
};

const TABLE = { ...AGAINST, ...ANALYSIS, ...RPM_ONLY, ...RECORDING_TABLE, ...OUTPUT_TABLE };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver spectrogram IN [options]",
  about:
    `One spectrum per frame of the channels of IN (${RECORDING_FORMAT_NAMES}): each frame is one
segment (or --frames K segments averaged), scaled exactly as quiver spectrum
with the same options. Against time, frames follow each other through the
record; against rpm, one frame is centred where the speed first passes each
rpm step (the same speed estimate and instants as quiver orders).`,
  groups: [
    ["Analysis", { ...AGAINST, ...ANALYSIS }],
    ["Against rpm only (speed as in quiver orders)", RPM_ONLY],
    [RECORDING_HEADING, RECORDING_TABLE],
    ["Output", OUTPUT_TABLE],
  ],
  notes: `Columns, tidy: time_s (the frame's centre on the recording's time axis) or,
against rpm, rpm (the step); then frequency_hz, then one per channel headed
"name [unit]".`,
});

// Options that mean something against rpm only.
const usesSpeed = (v: Record<string, unknown>) =>
  Object.keys(RPM_ONLY).some((k) => v[k] !== undefined);

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE))
  .refine(oneBlockChoice, { message: "give --block or --resolution, not both" })
  .refine((v) => v.reference === undefined || v.db === true, {
    message: "--reference applies to --db only",
  })
  .refine((v) => v.against === "rpm" ? oneSpeedSource(v) : !usesSpeed(v), {
    message:
      "--against rpm needs --tacho (with --ppr) or --rpm-channel; the speed options and --orders apply to --against rpm only",
  })
  .refine(pprWithTacho, { message: "--tacho needs --ppr" })
  .refine(
    (v) => v["min-hz"] === undefined || v["max-hz"] === undefined || v["max-hz"] > v["min-hz"],
    { message: "--max-hz must be above --min-hz" },
  );

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`spectrogram takes one recording, got ${positionals.length}`);
  }
  const [input] = positionals;
  const table = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) => {
      const common = libraryOptions(ANALYSIS, values);
      return values.against === "rpm"
        ? spectrogramAgainstRpm(stream, {
          ...common,
          ...libraryOptions(RPM_ONLY, values),
        })
        : spectrogram(stream, common);
    },
  );
  await writeResult(table, input, values);
  for (const w of table.metadata.warnings as string[]) {
    toStderr(`quiver spectrogram: warning: ${w}\n`);
  }
  const m = table.metadata;
  toStderr(
    `spectrogram against ${m.against}: ${
      table.columns.length - 2
    } channel(s), ${m.kind}, ${m.frames} frame(s) of ${m.segments_per_frame} segment(s) of ${m.block} samples, df ${
      formatNumber(m.df_hz, 6)
    } Hz, ${formatNumber(m.min_hz, 6)}–${formatNumber(m.max_hz, 6)} Hz (${m.lines} lines)${
      values.out !== undefined ? ` -> ${values.out}` : ""
    }\n`,
  );
}
