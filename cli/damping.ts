/**
 * `quiver damping`: mode frequencies and damping from an FRF table.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { TARGETS_NOT_MET_EXIT } from "./exit_codes.ts";
import { formatFixed } from "../lib/format_number.ts";
import process from "node:process";
import { z } from "npm:zod@4.6.7";
import { FRF_FORMS } from "../lib/frf/forms.ts";
import { DAMPING_METHODS, modalDamping } from "../lib/modal/damping_analysis.ts";
import { readFrfFile } from "../lib/modal/frf_input.ts";
import {
  inFile,
  listOption,
  numberOption,
  type OptionSpec,
  parseCommandArgs,
  usageError,
} from "./args.ts";
import { writeResult } from "./output.ts";
import { OUTPUT_HELP, OUTPUT_OPTIONS, outputOptionsShape } from "./segment_options.ts";

/** One-line summary for the command list. */
export const summary =
  "mode frequencies, damping ratios and Q from an FRF table, with quality flags";

/** The command's help text. */
export const help = `quiver damping FRF [options]

Finds the modes of an FRF table and estimates each one's frequency and
damping twice: by the half-power bandwidth (peak and -3 dB points
interpolated between lines) and by a single-mode fit around the peak
(complex when the table has phase, with a constant residual for the other
modes). FRF is what quiver frf or quiver hammer wrote (CSV with its
.meta.json sidecar, or JSON), or a plain table: frequency_hz plus re and im,
or mag (linear) with optional phase_deg, or mag_db.

Options:
  --channel R[,S]      FRF(s) to analyse                           (default all)
  --min-hz F, --max-hz F   frequency range for peaks              (default all)
  --method M           ${DAMPING_METHODS.join(" | ")}: with both, the fit is the
                       primary value and half-power the second   (default both)
  --prominence DB      smallest peak prominence, dB                (default 6)
  --peaks-from P       each (every FRF's own peaks) | sum (peaks of the summed
                       |H|, so every FRF reports the same modes)   (default each)
  --exp-tau S          exponential window time constant to correct for
                       (default: from the table's metadata)
  --form F             ${FRF_FORMS.join(" | ")}, when the table does not say
                       (default: receptance, flagged form_assumed)
  --target-hz F        check that the first mode is at or above F Hz
  --require-targets    exit with code 4 when that target fails (default: report, exit 0)
  --delimiter D, --decimal M   as for recordings (auto)

${OUTPUT_HELP}

CSV columns: channel, mode, frequency_hz, damping_ratio, q_factor, method,
flags, half_power_frequency_hz, half_power_damping_ratio,
lines_in_half_power_band, fit_frequency_hz, fit_damping_ratio,
peak_coherence, window_correction. Empty cells mean "not estimated".
Flags: few_lines, no_half_power, low_coherence, close_modes, disagree,
poor_fit, magnitude_only, form_assumed, window_dominates (see README).
`;

const positive = (what: string) =>
  numberOption().pipe(z.number().positive(`must be a positive number of ${what}`));

/** zod schema of the options. */
export const schema = z.strictObject({
  channel: listOption().optional(),
  "min-hz": numberOption().pipe(z.number().min(0, "must be at least 0")).optional(),
  "max-hz": positive("Hz").optional(),
  method: z.enum(DAMPING_METHODS).optional(),
  prominence: positive("dB").optional(),
  "peaks-from": z.enum(["each", "sum"]).optional(),
  "exp-tau": positive("seconds").optional(),
  form: z.enum(FRF_FORMS).optional(),
  "target-hz": positive("Hz").optional(),
  "require-targets": z.boolean().optional(),
  delimiter: z.enum(["auto", "comma", "semicolon", "tab"]).optional(),
  decimal: z.enum(["auto", "point", "comma"]).optional(),
  ...outputOptionsShape,
});

const text = { type: "string" } as const;

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  channel: text,
  "min-hz": text,
  "max-hz": text,
  method: text,
  prominence: text,
  "peaks-from": text,
  "exp-tau": text,
  form: text,
  "target-hz": text,
  "require-targets": { type: "boolean" },
  delimiter: text,
  decimal: text,
  ...OUTPUT_OPTIONS,
};

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`damping takes one FRF table, got ${positionals.length}`);
  }
  const [input] = positionals;
  const delimiters = { auto: "auto", comma: ",", semicolon: ";", tab: "\t" } as const;
  const decimals = { auto: "auto", point: ".", comma: "," } as const;
  const data = await readFrfFile(input, {
    delimiter: delimiters[values.delimiter ?? "auto"],
    decimal: decimals[values.decimal ?? "auto"],
  });
  const result = inFile(input, () =>
    modalDamping(data, {
      channels: values.channel,
      minHz: values["min-hz"],
      maxHz: values["max-hz"],
      method: values.method,
      prominenceDb: values.prominence,
      peaks: values["peaks-from"],
      expTau: values["exp-tau"],
      form: values.form,
      targetHz: values["target-hz"],
    }));
  await writeResult(result.table, input, values);
  for (const w of result.warnings) toStderr(`quiver damping: warning: ${w}\n`);
  for (const m of result.modes) {
    toStderr(
      `${m.channel} mode ${m.mode}: ${m.frequencyHz.toFixed(3)} Hz, damping ${
        formatFixed(100 * m.dampingRatio, 3)
      } % ` +
        `(${m.method})${m.flags.length > 0 ? ` [${m.flags.join(", ")}]` : ""}\n`,
    );
  }
  const t = result.target;
  if (t !== undefined) {
    toStderr(
      t.firstModeHz === null
        ? `target: first mode >= ${t.minimumHz} Hz: FAIL (no mode found)\n`
        : `target: first mode >= ${t.minimumHz} Hz: ${t.pass ? "PASS" : "FAIL"} ` +
          `(${t.firstModeHz.toFixed(3)} Hz in ${t.channel}, margin ${t.marginHz!.toFixed(3)} Hz, ${
            t.marginPercent!.toFixed(1)
          } %)\n`,
    );
    if (!t.pass && values["require-targets"] === true) process.exitCode = TARGETS_NOT_MET_EXIT;
  }
}
