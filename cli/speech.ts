/**
 * `quiver speech`: the speech intelligibility index (ANSI S3.5-1997) of the
 * noise at a microphone.
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
import { SPEECH_NOTE, speechAnalysis } from "../lib/quality/speech_analysis.ts";
import { SPEECH_OUTPUTS } from "../lib/quality/speech_descriptor.ts";
import { SII_STANDARD } from "../lib/quality/sii_tables.ts";
import { formatNumber } from "../lib/format_number.ts";

/** One-line summary for the command list. */
export const summary = "speech intelligibility index (ANSI S3.5-1997) of cabin noise, 0 to 1";

const ANALYSIS = {
  channels: option(listOption(), {
    value: "a,b",
    help: "microphone channels, in Pa",
    default: "every channel in Pa",
  }),
};

const OUTPUT = { ...OUTPUT_TABLE, ...SPEECH_OUTPUTS };
const TABLE = { ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver speech IN [--channels mic] [options]",
  about: `The speech intelligibility index of ${SII_STANDARD},
0 (nothing understood) to 1, for the standard speech spectrum of normal
vocal effort heard by a listener without hearing loss, in the noise of each
microphone channel. The noise's one-third octave band levels (160 Hz to
8 kHz, from the averaged PSD as in bands) become spectrum levels by each
band's width; one row per channel: channel, sii. --bands-out gives each
band's contribution. The sample rate must exceed 17825 Hz (the 8 kHz band).`,
  groups: [["Analysis", ANALYSIS], [RECORDING_HEADING, RECORDING_TABLE], ["Output", OUTPUT]],
  notes: SPEECH_NOTE.replace(/(.{1,72})(\s+|$)/g, "$1\n").trimEnd(),
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`speech takes one recording, got ${positionals.length}`);
  }
  if (values.out !== undefined && values.out === values["bands-out"]) {
    usageError("--out and --bands-out must name different files");
  }
  const [input] = positionals;
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) => speechAnalysis(stream, { channels: values.channels }),
  );
  await writeResult(result.table, input, values);
  if (values["bands-out"] !== undefined) {
    await writeResult(result.bands, input, { out: values["bands-out"] });
  }
  for (const w of result.warnings) toStderr(`quiver speech: warning: ${w}\n`);
  for (const r of result.table.metadata.rows) {
    toStderr(`${r.channel}: SII ${formatNumber(r.sii, 3)} (${SII_STANDARD})\n`);
  }
  toStderr(`quiver speech: ${SPEECH_NOTE}\n`);
}
