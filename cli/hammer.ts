/**
 * `quiver hammer`: impact-test FRFs from one continuous recording.
 *
 * @module
 */
import { HAMMER_OUTPUTS } from "../lib/frf/hammer_descriptor.ts";
import { toStderr } from "./terminal.ts";
import { z } from "npm:zod@4.6.7";
import { FRF_FORMS } from "../lib/frf/forms.ts";
import { hammerFrf, USABLE_DROP_DB } from "../lib/frf/hammer.ts";
import { formatNumber } from "../lib/format_number.ts";
import { formatCsv } from "../lib/io/table.ts";
import { writeFileAtomic } from "../lib/io/atomic_write.ts";
import { listOption, numberOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";

/** One-line summary for the command list. */
export const summary = "impact-hammer FRFs: finds and classifies hits, averages the good ones";

const positive = (what: string) =>
  numberOption().pipe(z.number().positive(`must be a positive number of ${what}`));

const CHANNELS = {
  force: option(z.string().min(1), {
    value: "CH",
    help: "the hammer's force channel",
    required: true,
  }),
  outputs: option(listOption(), {
    value: "a,b",
    help: "the response channels",
    required: true,
  }),
};

const HITS = {
  trigger: option(positive("force units"), {
    value: "LEVEL",
    help: "trigger level above the local baseline, force units",
    default: "the larger of 5 % of the largest force and 5 noise sigma",
  }),
  baseline: option(positive("seconds"), {
    value: "S",
    help:
      "block of the force's local baseline: the median of each\nblock, linear between blocks, so a drift does not move\nthe trigger",
    default: "0.05",
  }),
  range: option(positive("force units"), {
    value: "FULL_SCALE",
    help:
      "force channel range: peaks at or above it are overloads\n(flat tops of 3+ equal samples always are)",
  }),
  pretrigger: option(positive("seconds"), {
    value: "S",
    help: "seconds before the trigger in each record",
    default: "0.01",
  }),
  record: option(positive("seconds"), {
    value: "S",
    help: "record length in seconds",
    default: "a power of two within 90 % of the median hit spacing",
  }),
};

const WINDOWS = {
  "force-window": option(positive("seconds"), {
    value: "S",
    help: "force kept from the record start for S seconds, cosine\ntaper over its last quarter",
    default: "pre-trigger + 4 pulse widths",
  }),
  "exp-window": option(positive("seconds"), {
    value: "TAU_S",
    help:
      "exponential window exp(-t/TAU) on every channel; at least\nthe record / ln(1e4) (its end value at least 1e-4)",
    feeds: "expTau",
  }),
  "exp-end": option(
    numberOption().pipe(z.number().gt(0, "must be above 0").lt(1, "must be below 1")),
    { value: "FRACTION", help: "the same, given by its value at the record end (0 < F < 1)" },
  ),
  form: option(z.enum(FRF_FORMS), {
    value: "F",
    help: FRF_FORMS.join(" | "),
    default: "as measured",
  }),
};

const OUTPUTS = {
  ...OUTPUT_TABLE,
  ...HAMMER_OUTPUTS,
};

const TABLE = { ...CHANNELS, ...HITS, ...WINDOWS, ...RECORDING_TABLE, ...OUTPUTS };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver hammer IN --force F --outputs a,b [options]",
  about: `Finds the hits on the force channel of one continuous recording, classifies
each (accepted, double, overload, short), cuts one record per hit, windows
it, and averages H1 over the accepted hits only. Coherence is across hits.`,
  groups: [
    ["Channels", CHANNELS],
    ["Hits", HITS],
    ["Windows", WINDOWS],
    [RECORDING_HEADING, RECORDING_TABLE],
    ["Output", OUTPUTS],
  ],
  notes: `The FRF CSV has the columns of quiver frf. The exponential window's time
constant goes into the JSON metadata (exponential_window_tau_s) so that
damping estimates can remove the damping it adds. The FRF table also holds
force_autospectrum, and the metadata usable_bandwidth_hz: the first line
where the force autospectrum is 20 dB below its low-frequency level (common
practice takes 10 to 20 dB); above it the FRF is not to be trusted.`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE)).refine(
  (v) => v["exp-window"] === undefined || v["exp-end"] === undefined,
  { message: "give --exp-window or --exp-end, not both" },
);

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`hammer takes one recording, got ${positionals.length}`);
  if (values.out !== undefined && values.out === values["hits-out"]) {
    usageError("--out and --hits-out name the same file");
  }
  const [input] = positionals;
  // The analysis spools the channels it needs once through the chunked reader: flat memory.
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) =>
      hammerFrf(stream, {
        ...libraryOptions(CHANNELS, values),
        ...libraryOptions(HITS, values),
        ...libraryOptions(WINDOWS, values),
      }),
  );
  await writeResult(result.table, input, values);
  if (values["hits-out"] !== undefined) {
    await writeFileAtomic(values["hits-out"], formatCsv(result.hitLog));
  }
  if (values["records-out"] !== undefined) {
    await writeResult(result.hitRecords, input, {
      ...values,
      out: values["records-out"],
      format: undefined,
    });
  }
  for (const warning of result.warnings) {
    toStderr(`quiver hammer: warning: ${warning}\n`);
  }
  toStderr(`trigger level ${result.triggerRule}\n`);
  toStderr(
    `${result.summary}; usable bandwidth ${
      formatNumber(result.usableBandwidth.limitHz, 6)
    } Hz (force autospectrum ${USABLE_DROP_DB} dB down${
      result.usableBandwidth.reached ? "" : ": not reached"
    })\n`,
  );
}
