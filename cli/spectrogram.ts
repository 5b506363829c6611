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
import { spectrogramAgainstRpm } from "../lib/orders/rpm_spectrogram.ts";
import {
  oneSpeedSource,
  positiveListOption,
  pprWithTacho,
  SPEED_HELP,
  SPEED_OPTIONS,
  speedOptionsShape,
  toSpeedOptions,
} from "./speed_options.ts";
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
export const summary = "spectra against time or rpm (a colour map's data), scaled as spectrum";

/** The command's help text. */
export const help = `quiver spectrogram IN [options]

One spectrum per frame of the channels of IN (CSV or WAV): each frame is one
segment (or --frames K segments averaged), scaled exactly as quiver spectrum
with the same options. Against time, frames follow each other through the
record; against rpm, one frame is centred where the speed first passes each
rpm step (the same speed estimate and instants as quiver orders).

Analysis:
  --against A          time | rpm                                  (default time)
  --channels a,b       channels to analyse, in output order
                       (default all; against rpm, all but the speed channel)
${SEGMENT_HELP}
  --kind K             psd | power | rms | peak                    (default psd)
  --frames K           segments averaged per frame                 (default 1)
  --weighting W        A | C | Z, line by line (IEC 61672-1)        (default Z)
  --db                 levels in dB re the unit's ISO 1683 reference (or --reference)
  --reference R        level reference for --db
  --max-cells N        refuse an output larger than N cells        (default ${MAX_SPECTROGRAM_CELLS})
  --orders 2,8,16      against rpm: order lines the report draws over the map
                       (recorded in the metadata; no effect on the values)

${SPEED_HELP}
                       (speed options apply with --against rpm only)

${RECORDING_HELP}

${OUTPUT_HELP}

Columns, tidy: time_s (the frame's centre on the recording's time axis) or,
against rpm, rpm (the step); then frequency_hz, then one per channel headed
"name [unit]".
`;

// Options that mean something against rpm only.
const RPM_ONLY = [...Object.keys(SPEED_OPTIONS), "orders"];
const usesSpeed = (v: Record<string, unknown>) => RPM_ONLY.some((k) => v[k] !== undefined);

/** zod schema of the options. */
export const schema = z.strictObject({
  against: z.enum(["time", "rpm"]).optional(),
  channels: listOption().optional(),
  ...segmentOptionsShape,
  kind: z.enum(SPECTRUM_KINDS).optional(),
  frames: integerOption().optional(),
  weighting: z.enum(WEIGHTINGS).optional(),
  db: z.boolean().optional(),
  reference: numberOption().pipe(z.number().positive("must be a positive number")).optional(),
  "max-cells": integerOption().optional(),
  orders: positiveListOption("orders").optional(),
  ...speedOptionsShape,
  ...outputOptionsShape,
  ...recordingOptionsShape,
}).refine(oneBlockChoice, { message: "give --block or --resolution, not both" })
  .refine((v) => v.reference === undefined || v.db === true, {
    message: "--reference applies to --db only",
  })
  .refine((v) => v.against === "rpm" ? oneSpeedSource(v) : !usesSpeed(v), {
    message:
      "--against rpm needs --tacho (with --ppr) or --rpm-channel; the speed options and --orders apply to --against rpm only",
  })
  .refine(pprWithTacho, { message: "--tacho needs --ppr" });

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  against: { type: "string" },
  channels: { type: "string" },
  ...SEGMENT_OPTIONS,
  kind: { type: "string" },
  frames: { type: "string" },
  weighting: { type: "string" },
  db: { type: "boolean" },
  reference: { type: "string" },
  "max-cells": { type: "string" },
  orders: { type: "string" },
  ...SPEED_OPTIONS,
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
    (stream) => {
      const common = {
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
      };
      return values.against === "rpm"
        ? spectrogramAgainstRpm(stream, {
          ...common,
          ...toSpeedOptions(values),
          orderLines: values.orders,
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
    } Hz${values.out !== undefined ? ` -> ${values.out}` : ""}\n`,
  );
}
