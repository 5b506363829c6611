/**
 * `quiver bands`: fractional-octave band levels.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { z } from "npm:zod@4.6.7";
import {
  BAND_METHODS,
  bandLevels,
  DEFAULT_BAND_RANGE_HZ,
  DEFAULT_BLOCK_RULE,
} from "../lib/acoustics/band_analysis.ts";
import { BAND_FRACTIONS, type BandFraction } from "../lib/acoustics/bands.ts";
import { WEIGHTINGS } from "../lib/acoustics/weighting.ts";
import { integerOption, listOption, numberOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { oneBlockChoice, OUTPUT_TABLE } from "./segment_options.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";

/** One-line summary for the command list. */
export const summary = "1/1 … 1/24-octave band levels (IEC 61260-1), A/C/Z weighted, in dB";

const positive = () => numberOption().pipe(z.number().positive("must be positive"));

const ANALYSIS = {
  channels: option(listOption(), { value: "a,b", help: "channels", default: "all" }),
  fraction: option(
    z.enum(BAND_FRACTIONS.map(String) as [string, ...string[]]).transform((f) =>
      Number(f) as BandFraction
    ),
    { value: "B", help: BAND_FRACTIONS.join(" | "), default: "3" },
  ),
  weighting: option(z.enum(WEIGHTINGS), {
    value: "W",
    help: `${WEIGHTINGS.join(" | ")} (IEC 61672-1)`,
    default: "Z",
  }),
  method: option(z.enum(BAND_METHODS), {
    value: "M",
    help:
      "fft: from the averaged narrowband PSD, weighting per line\n(default; exact energy sums, any sample rate) |\nfilter: Butterworth filter bank with decimation, weighting\nat each mid-band frequency (for records too short for fft)",
  }),
  reference: option(positive(), { value: "P0", help: "level reference in the channel's unit" }),
  "min-hz": option(positive(), {
    value: "F",
    help: "lowest band: the one holding F",
    default: String(DEFAULT_BAND_RANGE_HZ[0]),
  }),
  "max-hz": option(positive(), {
    value: "F",
    help:
      "highest band: the one holding F, or the last wholly\nbelow half the rate (filter: 0.45 x rate)",
    default: String(DEFAULT_BAND_RANGE_HZ[1]),
  }),
  block: option(integerOption(), {
    value: "N",
    // The rule's words wrapped after the lowest band, so the help keeps its width.
    help: `narrowband block for fft, instead of --resolution\n(default: ${
      DEFAULT_BLOCK_RULE.replace(" lines, ", " lines,\n")
    })`,
  }),
  resolution: option(positive(), { value: "HZ", help: "narrowband line spacing for fft" }),
};

const TABLE = { ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT_TABLE };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver bands IN [options]",
  about: `Fractional-octave band levels of the channels of IN, in dB against the
ISO 1683 references (20 uPa for Pa, 1e-6 m/s^2, 1e-9 m/s, 1e-12 m) or
--reference. Bands follow IEC 61260-1 (base 10): exact mid-band frequencies
and edges, with the nominal labels for 1/1 and 1/3 octaves.`,
  groups: [["Analysis", ANALYSIS], [RECORDING_HEADING, RECORDING_TABLE], ["Output", OUTPUT_TABLE]],
  notes: `CSV columns: center_hz (exact), nominal_hz, lower_hz, upper_hz, then one
level column per channel. The overall level (energy sum of the bands) goes
to stderr and into the JSON metadata.

Levels are for engineering comparison, not a certified sound level meter
measurement; for noise exposure follow local regulations and use certified
instruments.`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE)).refine(oneBlockChoice, {
  message: "give --block or --resolution, not both",
});

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`bands takes one recording, got ${positionals.length}`);
  const [input] = positionals;
  const analysis = libraryOptions(ANALYSIS, values);
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) => bandLevels(stream, analysis),
  );
  await writeResult(result.table, input, values);
  for (const w of result.warnings) toStderr(`quiver bands: warning: ${w}\n`);
  const [first, last] = result.table.metadata.band_range_nominal_hz as number[];
  toStderr(`quiver bands: bands ${first} Hz to ${last} Hz (nominal)\n`);
  for (const o of result.overall) {
    toStderr(
      Number.isFinite(o.levelDb)
        ? `${o.channel}: overall ${o.levelDb.toFixed(2)} ${o.unit} (energy sum of the bands)\n`
        : `${o.channel}: overall level not defined: the bands hold no power (a silent channel?)\n`,
    );
  }
}
