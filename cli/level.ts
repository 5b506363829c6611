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
import { listOption, numberOption, type OptionSpec, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HELP,
  RECORDING_OPTIONS,
  recordingOptionsShape,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_HELP, OUTPUT_OPTIONS, outputOptionsShape } from "./segment_options.ts";

/** One-line summary for the command list. */
export const summary = "level against time (Fast/Slow), with Leq, Lmax, Lmin, L10, L50, L90";

/** The command's help text. */
export const help = `quiver level IN [options]

Frequency-weighted (digital filter) and time-weighted (IEC 61672-1: Fast
0.125 s, Slow 1 s) level against time, in dB against the ISO 1683
references, with the summary Leq, Lmax, Lmin, L10, L50, L90 on stderr and in
the JSON metadata. A and C need a sample rate above 24.4 kHz.

  --channels a,b       channels                                    (default all)
  --weighting W        ${WEIGHTINGS.join(" | ")}                                  (default A)
  --time-weighting T   ${TIME_WEIGHTINGS.join(" | ")} (none: Leq over each step) (default fast)
  --step S             seconds between readings                    (default 0.1)
  --reference P0       level reference in the channel's unit

${RECORDING_HELP}

${OUTPUT_HELP}

Levels are for engineering comparison, not a certified sound level meter
measurement; for noise exposure follow local regulations and use certified
instruments.
`;

/** zod schema of the options. */
export const schema = z.strictObject({
  channels: listOption().optional(),
  weighting: z.enum(WEIGHTINGS).optional(),
  "time-weighting": z.enum(TIME_WEIGHTINGS).optional(),
  step: numberOption().pipe(z.number().positive("must be a positive number of seconds")).optional(),
  reference: numberOption().pipe(z.number().positive("must be positive")).optional(),
  ...outputOptionsShape,
  ...recordingOptionsShape,
});

const text = { type: "string" } as const;

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  channels: text,
  weighting: text,
  "time-weighting": text,
  step: text,
  reference: text,
  ...OUTPUT_OPTIONS,
  ...RECORDING_OPTIONS,
};

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`level takes one recording, got ${positionals.length}`);
  const [input] = positionals;
  const analysis = {
    channels: values.channels,
    weighting: values.weighting,
    timeWeighting: values["time-weighting"],
    step: values.step,
    reference: values.reference,
  };
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
