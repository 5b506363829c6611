/**
 * `quiver loudness`: loudness (ISO 532-1, Zwicker's method) and sharpness
 * (DIN 45692) of microphone channels.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { toStderr } from "./terminal.ts";
import { listOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { commandHelp, option, shapeOf, specOf } from "./option_table.ts";
import {
  LOUDNESS_METHODS,
  LOUDNESS_SAFETY_NOTE,
  loudnessAnalysis,
} from "../lib/quality/loudness_analysis.ts";
import { SOUND_FIELDS } from "../lib/quality/zwicker_core.ts";
import { LOUDNESS_OUTPUTS } from "../lib/quality/loudness_descriptor.ts";
import { formatNumber } from "../lib/format_number.ts";

/** One-line summary for the command list. */
export const summary = "loudness (ISO 532-1, Zwicker) in sone and phon, sharpness (DIN 45692)";

const ANALYSIS = {
  channels: option(listOption(), {
    value: "a,b",
    help: "microphone channels",
    default: "every channel in Pa",
  }),
  field: option(z.enum(SOUND_FIELDS as ["free", "diffuse"]), {
    value: "F",
    help: "free | diffuse: the sound field ISO 532-1 assumes",
    default: "free",
  }),
  method: option(z.enum(LOUDNESS_METHODS), {
    value: "M",
    help: "stationary | time-varying (N5, N10 and N against time)",
    default: "stationary",
  }),
};

const OUTPUT = { ...OUTPUT_TABLE, ...LOUDNESS_OUTPUTS };
const TABLE = { ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver loudness IN [--channels a,b] [--field free|diffuse] " +
    "[--method stationary|time-varying] [options]",
  about: `Loudness by ISO 532-1:2017 (Zwicker's method) from the 28 one-third
octaves 25 Hz–12.5 kHz of each sound pressure channel: the low-frequency
weighting, the outer ear's transmission (free or diffuse field), core
loudness per critical band, upper slopes, total loudness N [sone] and
loudness level L_N [phon]; sharpness by DIN 45692:2009 [acum] from the
specific loudness. time-varying adds the nonlinear decay and temporal
weighting, N5 and N10 (exceeded 5 % and 10 % of the time); its loudness is
the mean of N(t). One row per channel: channel, loudness [sone],
loudness_level [phon], sharpness [acum] (time-varying: n5 [sone],
n10 [sone]). Any rate: below 31.2 kHz the rate is raised by a power of two
and the bands above the recording's Nyquist frequency are named.`,
  groups: [["Analysis", ANALYSIS], [RECORDING_HEADING, RECORDING_TABLE], ["Output", OUTPUT]],
  notes: LOUDNESS_SAFETY_NOTE.replace(/(.{1,72})(\s+|$)/g, "$1\n").trimEnd(),
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE))
  .refine((v) => v["history-out"] === undefined || v.method === "time-varying", {
    message: "--history-out needs --method time-varying",
  });

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`loudness takes one recording, got ${positionals.length}`);
  }
  const files = [values.out, values["specific-out"], values["history-out"]].filter((f) =>
    f !== undefined
  );
  if (new Set(files).size !== files.length) {
    usageError("--out, --specific-out and --history-out must name different files");
  }
  const [input] = positionals;
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) =>
      loudnessAnalysis(stream, {
        channels: values.channels,
        field: values.field,
        method: values.method,
        history: values["history-out"] !== undefined,
      }),
  );
  await writeResult(result.table, input, values);
  if (values["specific-out"] !== undefined) {
    await writeResult(result.specific, input, { out: values["specific-out"] });
  }
  if (values["history-out"] !== undefined && result.history !== undefined) {
    await writeResult(result.history, input, { out: values["history-out"] });
  }
  for (const w of result.warnings) toStderr(`quiver loudness: warning: ${w}\n`);
  for (const r of result.table.metadata.rows) {
    const n5 = r.n5 === null ? "" : `, N5 ${formatNumber(r.n5)} sone`;
    toStderr(
      `${r.channel}: ${formatNumber(r.loudness)} sone, ${formatNumber(r.loudness_level)} phon, ` +
        `${formatNumber(r.sharpness)} acum${n5}\n`,
    );
  }
  toStderr(`quiver loudness: ${LOUDNESS_SAFETY_NOTE}\n`);
}
