/**
 * `quiver level`: frequency- and time-weighted level against time.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { z } from "npm:zod@4.6.7";
import { levelHistory } from "../lib/acoustics/level_analysis.ts";
import { TIME_WEIGHTINGS } from "../lib/acoustics/time_weighting.ts";
import { WEIGHTINGS } from "../lib/acoustics/weighting.ts";
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
export const summary = "level against time (Fast/Slow), with Leq, Lmax, Lmin, L10, L50, L90";

const ANALYSIS = {
  channels: option(listOption(), { value: "a,b", help: "channels", default: "all" }),
  weighting: option(z.enum(WEIGHTINGS), {
    value: "W",
    help: WEIGHTINGS.join(" | "),
    default: "A",
  }),
  "time-weighting": option(z.enum(TIME_WEIGHTINGS), {
    value: "T",
    help: `${TIME_WEIGHTINGS.join(" | ")} (none: Leq over each step)`,
    default: "fast",
  }),
  step: option(numberOption().pipe(z.number().positive("must be a positive number of seconds")), {
    value: "S",
    help: "seconds between readings",
    default: "0.1",
  }),
  reference: option(numberOption().pipe(z.number().positive("must be positive")), {
    value: "P0",
    help: "level reference in the channel's unit",
  }),
};

const TABLE = { ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT_TABLE };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver level IN [options]",
  about: `Frequency-weighted (digital filter) and time-weighted (IEC 61672-1: Fast
0.125 s, Slow 1 s) level against time, in dB against the ISO 1683
references, with the summary Leq, Lmax, Lmin, L10, L50, L90 on stderr and in
the JSON metadata. A and C need a sample rate above 24.4 kHz. Fast and Slow
start from rest (IEC 61672-1); Lmax and Leq count from the first sample, Lmin
and L10/L50/L90 from 5 time constants on (the meter settled).`,
  groups: [["Analysis", ANALYSIS], [RECORDING_HEADING, RECORDING_TABLE], ["Output", OUTPUT_TABLE]],
  notes: `Levels are for engineering comparison, not a certified sound level meter
measurement; for noise exposure follow local regulations and use certified
instruments.`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`level takes one recording, got ${positionals.length}`);
  const [input] = positionals;
  const analysis = libraryOptions(ANALYSIS, values);
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) => levelHistory(stream, analysis),
  );
  await writeResult(result.table, input, values);
  for (const w of result.warnings) toStderr(`quiver level: warning: ${w}\n`);
  for (const s of result.summary) {
    const f = (v: number) => v.toFixed(1);
    toStderr(
      `${s.channel} [${s.unit}]: Leq ${f(s.leq)}, Lmax ${f(s.lmax)}, Lmin ${f(s.lmin)}, ` +
        `L10 ${f(s.l10)}, L50 ${f(s.l50)}, L90 ${f(s.l90)}\n`,
    );
  }
}
