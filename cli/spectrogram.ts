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
  SEGMENT_HELP,
  SEGMENT_OPTIONS,
  segmentOptionsShape,
} from "./segment_options.ts";

/** One-line summary for the command list. */
export const summary = "spectra against time (a colour map's data), scaled as spectrum";

/** The command's help text. */
export const help = `quiver spectrogram IN [options]

One spectrum per frame of the channels of IN (CSV or WAV): each frame is one
segment (or --frames K segments averaged), scaled exactly as quiver spectrum
with the same options. Against time only, for now.

Analysis:
  --channels a,b       channels to analyse, in output order       (default all)
${SEGMENT_HELP}
  --kind K             psd | power | rms | peak                    (default psd)
  --frames K           segments averaged per frame                 (default 1)
  --weighting W        A | C | Z, line by line (IEC 61672-1)        (default Z)
  --db                 levels in dB re the unit's ISO 1683 reference (or --reference)
  --reference R        level reference for --db
  --max-cells N        refuse an output larger than N cells        (default ${MAX_SPECTROGRAM_CELLS})

${RECORDING_HELP}

${OUTPUT_HELP}

Columns, tidy: time_s (the frame's centre on the recording's time axis),
frequency_hz, then one per channel headed "name [unit]".
`;

/** zod schema of the options. */
export const schema = z.strictObject({
  channels: listOption().optional(),
  ...segmentOptionsShape,
  kind: z.enum(SPECTRUM_KINDS).optional(),
  frames: integerOption().optional(),
  weighting: z.enum(WEIGHTINGS).optional(),
  db: z.boolean().optional(),
  reference: numberOption().pipe(z.number().positive("must be a positive number")).optional(),
  "max-cells": integerOption().optional(),
  ...outputOptionsShape,
  ...recordingOptionsShape,
}).refine(oneBlockChoice, { message: "give --block or --resolution, not both" })
  .refine((v) => v.reference === undefined || v.db === true, {
    message: "--reference applies to --db only",
  });

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  channels: { type: "string" },
  ...SEGMENT_OPTIONS,
  kind: { type: "string" },
  frames: { type: "string" },
  weighting: { type: "string" },
  db: { type: "boolean" },
  reference: { type: "string" },
  "max-cells": { type: "string" },
  ...OUTPUT_OPTIONS,
  ...RECORDING_OPTIONS,
};

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
    (stream) =>
      spectrogram(stream, {
        channels: values.channels,
        block: values.block,
        resolution: values.resolution,
        overlap: values.overlap,
        window: values.window,
        detrend: values.detrend,
        kind: values.kind,
        frames: values.frames,
        weighting: values.weighting,
        db: values.db,
        reference: values.reference,
        maxCells: values["max-cells"],
      }),
  );
  await writeResult(table, input, values);
  for (const w of table.metadata.warnings as string[]) {
    toStderr(`quiver spectrogram: warning: ${w}\n`);
  }
  const m = table.metadata;
  toStderr(
    `spectrogram: ${
      table.columns.length - 2
    } channel(s), ${m.kind}, ${m.frames} frame(s) of ${m.segments_per_frame} segment(s) of ${m.block} samples, df ${
      formatNumber(m.df_hz, 6)
    } Hz${values.out !== undefined ? ` -> ${values.out}` : ""}\n`,
  );
}
