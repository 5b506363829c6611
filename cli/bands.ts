/**
 * `quiver bands`: fractional-octave band levels.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { z } from "npm:zod@4.6.7";
import { BAND_METHODS, bandLevels } from "../lib/acoustics/band_analysis.ts";
import { BAND_FRACTIONS } from "../lib/acoustics/bands.ts";
import { WEIGHTINGS } from "../lib/acoustics/weighting.ts";
import {
  integerOption,
  listOption,
  numberOption,
  type OptionSpec,
  parseCommandArgs,
  usageError,
} from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HELP,
  RECORDING_OPTIONS,
  recordingOptionsShape,
  toReadOptions,
} from "./recording_options.ts";
import {
  oneBlockChoice,
  OUTPUT_HELP,
  OUTPUT_OPTIONS,
  outputOptionsShape,
} from "./segment_options.ts";

/** One-line summary for the command list. */
export const summary = "1/1 … 1/24-octave band levels (IEC 61260-1), A/C/Z weighted, in dB";

/** The command's help text. */
export const help = `quiver bands IN [options]

Fractional-octave band levels of the channels of IN, in dB against the
ISO 1683 references (20 uPa for Pa, 1e-6 m/s^2, 1e-9 m/s, 1e-12 m) or
--reference. Bands follow IEC 61260-1 (base 10): exact mid-band frequencies
and edges, with the nominal labels for 1/1 and 1/3 octaves.

  --channels a,b       channels                                    (default all)
  --fraction B         ${BAND_FRACTIONS.join(" | ")}                        (default 3)
  --weighting W        ${WEIGHTINGS.join(" | ")} (IEC 61672-1)                      (default Z)
  --method M           fft: from the averaged narrowband PSD, weighting per line
                       (default; exact energy sums, any sample rate) |
                       filter: Butterworth filter bank with decimation, weighting
                       at each mid-band frequency (for records too short for fft)
  --reference P0       level reference in the channel's unit
  --min-hz F           lowest mid-band frequency                   (default 20)
  --max-hz F           highest mid-band frequency   (default 20000 or 0.45 x rate)
  --block N | --resolution HZ   narrowband block for fft (default: largest power
                       of two within a quarter of the record)

${RECORDING_HELP}

${OUTPUT_HELP}

CSV columns: center_hz (exact), nominal_hz, lower_hz, upper_hz, then one
level column per channel. The overall level (energy sum of the bands) goes
to stderr and into the JSON metadata.

Levels are for engineering comparison, not a certified sound level meter
measurement; for noise exposure follow local regulations and use certified
instruments.
`;

/** zod schema of the options. */
export const schema = z.strictObject({
  channels: listOption().optional(),
  fraction: z.enum(BAND_FRACTIONS.map(String) as [string, ...string[]]).optional(),
  weighting: z.enum(WEIGHTINGS).optional(),
  method: z.enum(BAND_METHODS).optional(),
  reference: numberOption().pipe(z.number().positive("must be positive")).optional(),
  "min-hz": numberOption().pipe(z.number().positive("must be positive")).optional(),
  "max-hz": numberOption().pipe(z.number().positive("must be positive")).optional(),
  block: integerOption().optional(),
  resolution: numberOption().pipe(z.number().positive("must be positive")).optional(),
  ...outputOptionsShape,
  ...recordingOptionsShape,
}).refine(oneBlockChoice, { message: "give --block or --resolution, not both" });

const text = { type: "string" } as const;

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  channels: text,
  fraction: text,
  weighting: text,
  method: text,
  reference: text,
  "min-hz": text,
  "max-hz": text,
  block: text,
  resolution: text,
  ...OUTPUT_OPTIONS,
  ...RECORDING_OPTIONS,
};

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`bands takes one recording, got ${positionals.length}`);
  const [input] = positionals;
  const analysis = {
    channels: values.channels,
    fraction: values.fraction === undefined
      ? undefined
      : Number(values.fraction) as 1 | 3 | 6 | 12 | 24,
    weighting: values.weighting,
    method: values.method,
    reference: values.reference,
    minHz: values["min-hz"],
    maxHz: values["max-hz"],
    block: values.block,
    resolution: values.resolution,
  };
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) => bandLevels(stream, analysis),
  );
  await writeResult(result.table, input, values);
  for (const w of result.warnings) toStderr(`quiver bands: warning: ${w}\n`);
  for (const o of result.overall) {
    toStderr(
      `${o.channel}: overall ${o.levelDb.toFixed(2)} ${o.unit} (energy sum of the bands)\n`,
    );
  }
}
