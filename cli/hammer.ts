/**
 * `quiver hammer`: impact-test FRFs from one continuous recording.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { z } from "npm:zod@4.6.7";
import { FRF_FORMS } from "../lib/frf/forms.ts";
import { hammerFrf } from "../lib/frf/hammer.ts";
import { collectRecording, openRecordingStream } from "../lib/io/recording_stream.ts";
import { channelIndices } from "../lib/io/recording.ts";
import { formatCsv } from "../lib/io/table.ts";
import { writeFileAtomic } from "../lib/io/atomic_write.ts";
import {
  inFile,
  listOption,
  numberOption,
  type OptionSpec,
  parseCommandArgs,
  usageError,
} from "./args.ts";
import { writeResult } from "./output.ts";
import {
  RECORDING_HELP,
  RECORDING_OPTIONS,
  recordingOptionsShape,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_HELP, OUTPUT_OPTIONS, outputOptionsShape } from "./segment_options.ts";

/** One-line summary for the command list. */
export const summary = "impact-hammer FRFs: finds and classifies hits, averages the good ones";

/** The command's help text. */
export const help = `quiver hammer IN --force F --outputs a,b [options]

Finds the hits on the force channel of one continuous recording, classifies
each (accepted, double, overload, short), cuts one record per hit, windows
it, and averages H1 over the accepted hits only. Coherence is across hits.

Channels:
  --force CH           the hammer's force channel                    (required)
  --outputs a,b        the response channels                        (required)

Hits:
  --trigger LEVEL      trigger level above the baseline, force units
                       (default: the larger of 5 % of the largest force and 5 noise sigma)
  --range FULL_SCALE   force channel range: peaks at or above it are overloads
                       (flat tops of 3+ equal samples always are)
  --pretrigger S       seconds before the trigger in each record     (default 0.01)
  --record S           record length in seconds (default: largest power of two of
                       samples within 90 % of the median hit spacing)

Windows:
  --force-window S     force kept from the record start for S seconds, cosine
                       taper over its last quarter     (default: pre-trigger + 4 pulse widths)
  --exp-window TAU_S   exponential window exp(-t/TAU) on every channel
  --exp-end FRACTION   the same, given by its value at the record end (0 < F < 1)
  --form F             ${FRF_FORMS.join(" | ")}                (default: as measured)

${RECORDING_HELP}

${OUTPUT_HELP}
  --hits-out FILE      hit log CSV: hit, time_s, peak, status

The FRF CSV has the columns of quiver frf. The exponential window's time
constant goes into the JSON metadata (exponential_window_tau_s) so that
damping estimates can remove the damping it adds.
`;

const positive = (what: string) =>
  numberOption().pipe(z.number().positive(`must be a positive number of ${what}`));

/** zod schema of the options. */
export const schema = z.strictObject({
  force: z.string().min(1),
  outputs: listOption(),
  trigger: positive("force units").optional(),
  range: positive("force units").optional(),
  pretrigger: positive("seconds").optional(),
  record: positive("seconds").optional(),
  "force-window": positive("seconds").optional(),
  "exp-window": positive("seconds").optional(),
  "exp-end": numberOption().pipe(z.number().gt(0, "must be above 0").lt(1, "must be below 1"))
    .optional(),
  form: z.enum(FRF_FORMS).optional(),
  "hits-out": z.string().min(1).optional(),
  ...outputOptionsShape,
  ...recordingOptionsShape,
}).refine((v) => v["exp-window"] === undefined || v["exp-end"] === undefined, {
  message: "give --exp-window or --exp-end, not both",
});

const text = { type: "string" } as const;

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  force: text,
  outputs: text,
  trigger: text,
  range: text,
  pretrigger: text,
  record: text,
  "force-window": text,
  "exp-window": text,
  "exp-end": text,
  form: text,
  "hits-out": text,
  ...OUTPUT_OPTIONS,
  ...RECORDING_OPTIONS,
};

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`hammer takes one recording, got ${positionals.length}`);
  if (values.out !== undefined && values.out === values["hits-out"]) {
    usageError("--out and --hits-out name the same file");
  }
  const [input] = positionals;
  // Only the channels the analysis needs are held in memory, read through the chunked reader.
  const stream = await openRecordingStream(input, toReadOptions(values));
  const needed = inFile(
    input,
    () => channelIndices(stream.channels, [values.force, ...values.outputs]),
  );
  const recording = await collectRecording(stream, needed);
  const result = inFile(input, () =>
    hammerFrf(recording, {
      force: values.force,
      outputs: values.outputs,
      trigger: values.trigger,
      range: values.range,
      pretrigger: values.pretrigger,
      record: values.record,
      forceWindow: values["force-window"],
      expTau: values["exp-window"],
      expEnd: values["exp-end"],
      form: values.form,
    }));
  await writeResult(result.table, input, values);
  if (values["hits-out"] !== undefined) {
    await writeFileAtomic(values["hits-out"], formatCsv(result.hitLog));
  }
  for (const warning of result.warnings) {
    toStderr(`quiver hammer: warning: ${warning}\n`);
  }
  toStderr(`${result.summary}\n`);
}
