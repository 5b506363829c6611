/**
 * `quiver tones`: tonal prominence (ECMA-418-1) of microphone channels, in
 * the averaged spectrum of the record or of given orders along a run-up.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { toStderr } from "./terminal.ts";
import { integerOption, listOption, numberOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_TABLE, SEGMENT_TABLE } from "./segment_options.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";
import {
  missingTeethWithTacho,
  positiveListOption,
  pprWithTacho,
  SPEED_HEADING,
  SPEED_TABLE,
} from "./speed_options.ts";
import { SAFETY_NOTE, tonesAnalysis } from "../lib/quality/tones_analysis.ts";
import { CRITERIA } from "../lib/quality/tones_criteria.ts";
import { TONES_OUTPUTS } from "../lib/quality/tones_descriptor.ts";
import { formatNumber } from "../lib/format_number.ts";

/** One-line summary for the command list. */
export const summary = "tonal prominence (ECMA-418-1): TNR and PR of tones, or of orders along rpm";

const ANALYSIS = {
  channels: option(listOption(), {
    value: "a,b",
    help: "microphone channels",
    default: "every channel in Pa",
  }),
  against: option(z.enum(["time", "rpm"]), {
    value: "A",
    help:
      "time: the tones of the record's averaged spectrum |\nrpm: the given orders at each rpm step of a run-up",
    default: "time",
  }),
  orders: option(positiveListOption("orders"), {
    value: "8,16",
    help: "orders to follow (with --against rpm)",
  }),
  criterion: option(z.enum(CRITERIA), {
    value: "C",
    help: "tnr | pr: the ratio the verdict `prominent` is judged by",
    default: "tnr",
  }),
  "min-tnr": option(numberOption(), {
    value: "DB",
    help: "a peak is listed as a tone from this TNR up (against time)",
    default: "0",
  }),
  block: SEGMENT_TABLE.block,
  resolution: SEGMENT_TABLE.resolution,
  overlap: SEGMENT_TABLE.overlap,
  frames: option(integerOption(), {
    value: "K",
    help: "segments averaged at each rpm step (against rpm)",
    default: "4",
  }),
};

const OUTPUT = { ...OUTPUT_TABLE, ...TONES_OUTPUTS };
const TABLE = { ...ANALYSIS, ...SPEED_TABLE, ...RECORDING_TABLE, ...OUTPUT };

/** The command's help text. */
export const help = commandHelp({
  usage: `quiver tones IN [--channels mic] [options]
       quiver tones IN --against rpm (--tacho T --ppr N | --rpm-channel R) --orders 8,16 [options]`,
  about: `Tone-to-noise ratio (TNR) and prominence ratio (PR) after ECMA-418-1:
each tone's power against the masking noise in the critical band around it
(bandwidth 25 + 75·(1 + 1.4·(f/1000)²)^0.69 Hz), and the critical band's
power against the mean of the two bands beside it. Spectra are Hann-windowed
averages of the spectral core. One row per tone: channel, frequency_hz,
level_db, tnr_db, pr_db, prominent (by the criterion), margin_db (ratio
minus the criterion: 8 dB for TNR, 9 dB for PR from 1 kHz up, more below;
criteria for 89.1 Hz to 11.2 kHz), criterion_db, critical_bandwidth_hz.
Against rpm, the rows are each channel's orders at each rpm step, from the
same speed estimate and steps as \`orders\` (frames centred where the speed
passes each step); a run-up smears an order over a frame, so keep frames
short (--block) against the sweep rate.`,
  groups: [
    ["Analysis", ANALYSIS],
    [SPEED_HEADING, SPEED_TABLE],
    [RECORDING_HEADING, RECORDING_TABLE],
    ["Output", OUTPUT],
  ],
  notes: SAFETY_NOTE.replace(/(.{1,72})(\s+|$)/g, "$1\n").trimEnd(),
});

type Values = { against?: string; orders?: unknown; tacho?: unknown; "rpm-channel"?: unknown };
const rpmGiven = (v: Values) => v.tacho !== undefined || v["rpm-channel"] !== undefined;

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE))
  .refine((v) => v.against !== "rpm" || (rpmGiven(v) && v.orders !== undefined), {
    message: "--against rpm needs --orders and the speed: --tacho (with --ppr) or --rpm-channel",
  })
  .refine((v) => v.against === "rpm" || (!rpmGiven(v) && v.orders === undefined), {
    message: "--orders, --tacho and --rpm-channel go with --against rpm",
  })
  .refine(
    (v) =>
      v.against === "rpm" ||
      (v.frames === undefined &&
        Object.keys(SPEED_TABLE).every((k) => (v as Record<string, unknown>)[k] === undefined)),
    { message: "--frames and the speed options go with --against rpm" },
  )
  .refine((v) => v.against !== "rpm" || v["min-tnr"] === undefined, {
    message: "--min-tnr goes with --against time (against rpm every step's orders are listed)",
  })
  .refine((v) => v.tacho === undefined || v["rpm-channel"] === undefined, {
    message: "give --tacho (with --ppr) or --rpm-channel, one of them",
  })
  .refine(pprWithTacho, { message: "--tacho needs --ppr" })
  .refine(missingTeethWithTacho, { message: "--missing-teeth needs --tacho (a pulse wheel)" })
  .refine((v) => v.block === undefined || v.resolution === undefined, {
    message: "give --block or --resolution, not both",
  });

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`tones takes one recording, got ${positionals.length}`);
  if (values.out !== undefined && values.out === values["spectrum-out"]) {
    usageError("--out and --spectrum-out must name different files");
  }
  if (values.against === "rpm" && values["spectrum-out"] !== undefined) {
    usageError("--spectrum-out goes with --against time");
  }
  const [input] = positionals;
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) =>
      tonesAnalysis(stream, {
        ...libraryOptions(SPEED_TABLE, values),
        ...libraryOptions(ANALYSIS, values),
      }),
  );
  await writeResult(result.table, input, values);
  if (values["spectrum-out"] !== undefined && result.spectrum !== undefined) {
    await writeResult(result.spectrum, input, { out: values["spectrum-out"] });
  }
  const m = result.table.metadata;
  for (const w of m.warnings ?? []) toStderr(`quiver tones: warning: ${w}\n`);
  const prominent = result.table.columns.find((c) => c.name === "prominent")!
    .values as readonly string[];
  const count = prominent.filter((p) => p === "true").length;
  toStderr(
    `tones: ${prominent.length} row(s), ${count} prominent by ${m.criterion.toUpperCase()} ` +
      `(lines ${formatNumber(m.df_hz)} Hz apart)\n`,
  );
  toStderr(`quiver tones: ${SAFETY_NOTE}\n`);
}
