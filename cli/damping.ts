/**
 * `quiver damping`: mode frequencies and damping from an FRF table.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { TARGETS_NOT_MET_EXIT } from "./exit_codes.ts";
import process from "node:process";
import { z } from "npm:zod@4.6.7";
import { FRF_FORMS } from "../lib/frf/forms.ts";
import { modalDamping } from "../lib/modal/damping_analysis.ts";
import { DAMPING_METHODS } from "../lib/modal/damping_flags.ts";
import { describeSkipped } from "../lib/modal/first_mode.ts";
import { readFrfFile } from "../lib/modal/frf_input.ts";
import { inFile, listOption, numberOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { RECORDING_TABLE } from "./recording_options.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";
import { formatFixed, formatNumber } from "../lib/format_number.ts";

/** One-line summary for the command list. */
export const summary =
  "mode frequencies, damping ratios and Q from an FRF table, with quality flags";

const positive = (what: string) =>
  numberOption().pipe(z.number().positive(`must be a positive number of ${what}`));

const ANALYSIS = {
  channel: option(listOption(), {
    value: "R[,S]",
    help: "FRF(s) to analyse",
    default: "all",
    feeds: "channels",
  }),
  "min-hz": option(numberOption().pipe(z.number().min(0, "must be at least 0")), {
    value: "F",
    help: "frequency range of the candidates reported",
    default: "all",
    helpWith: "max-hz",
  }),
  "max-hz": option(positive("Hz"), { value: "F", help: "highest frequency reported" }),
  method: option(z.enum(DAMPING_METHODS), {
    value: "M",
    help: `${
      DAMPING_METHODS.join(" | ")
    }: with both, the fit is the\nprimary value and half-power the second`,
    default: "both",
  }),
  prominence: option(positive("dB"), {
    value: "DB",
    help: "smallest peak prominence, dB",
    default: "6",
    feeds: "prominenceDb",
  }),
  "peaks-from": option(z.enum(["each", "sum"]), {
    value: "P",
    help:
      "each (every FRF's own peaks) | sum (peaks of the summed\n|H|, so every FRF reports the same modes)",
    default: "each",
    feeds: "peaks",
  }),
  "exp-tau": option(positive("seconds"), {
    value: "S",
    help: "exponential window time constant to correct for",
    default: "from the table's metadata",
  }),
  form: option(z.enum(FRF_FORMS), {
    value: "F",
    help: `${FRF_FORMS.join(" | ")}, when the table does not say`,
    default: "receptance, flagged form_assumed",
  }),
  "target-hz": option(positive("Hz"), {
    value: "F",
    help: "check that the first mode (never a noise candidate)\nis at or above F Hz",
  }),
};

const CHECKS = {
  "require-targets": option(z.boolean(), {
    flag: true,
    help: "exit with code 4 when that target fails",
    default: "report, exit 0",
  }),
  delimiter: RECORDING_TABLE.delimiter,
  decimal: RECORDING_TABLE.decimal,
};

const TABLE = { ...ANALYSIS, ...CHECKS, ...OUTPUT_TABLE };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver damping FRF [options]",
  about: `Finds the modes of an FRF table and estimates each one's frequency and
damping twice: by the half-power bandwidth (peak and -3 dB points
interpolated between lines) and by a single-mode fit around the peak
(complex when the table has phase, with a constant residual for the other
modes). FRF is what quiver frf or quiver hammer wrote (CSV with its
.meta.json sidecar, or JSON), or a plain table: frequency_hz plus re and im,
or mag (linear) with optional phase_deg, or mag_db.`,
  groups: [["Analysis", ANALYSIS], ["Checks and reading", CHECKS], ["Output", OUTPUT_TABLE]],
  notes: `CSV columns: channel, mode, frequency_hz, damping_ratio, q_factor, method,
flags, half_power_frequency_hz, half_power_damping_ratio,
lines_in_half_power_band, fit_frequency_hz, fit_damping_ratio,
peak_coherence, window_correction. An empty cell: not estimated, or
dropped as implausible (flag implausible_damping); an empty mode: a
candidate flagged noise.
Every prominent peak is a candidate, the same with or without a range
(which only chooses the rows). Coherence judges a candidate, never deletes
it: one whose coherence is below 0.8 around it is flagged noise, has an
empty mode cell and is never the mode --target-hz judges; a coherence dip
confined to a peak with fewer than 3 lines in its half-power band is
flagged resolution_bias and stays a mode.
Flags: noise, resolution_bias, few_lines, no_half_power, low_coherence,
close_modes, disagree, poor_fit, no_fit, implausible_damping,
magnitude_only, form_assumed, window_dominates (see README).`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

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
  const result = inFile(input, () => modalDamping(data, libraryOptions(ANALYSIS, values)));
  await writeResult(result.table, input, values);
  for (const w of result.warnings) toStderr(`quiver damping: warning: ${w}\n`);
  for (const m of result.modes) {
    if (m.mode === null) continue; // candidates flagged noise: one line per channel below
    toStderr(
      `${m.channel} mode ${m.mode}: ${formatFixed(m.frequencyHz, 3)} Hz, damping ${
        formatFixed(100 * m.dampingRatio, 3)
      } % ` +
        `(${m.method})${m.flags.length > 0 ? ` [${m.flags.join(", ")}]` : ""}\n`,
    );
  }
  for (const channel of new Set(result.modes.map((m) => m.channel))) {
    const noise = result.modes.filter((m) => m.channel === channel && m.mode === null);
    if (noise.length === 0) continue;
    toStderr(
      `${channel}: ${noise.length} candidate(s) flagged noise, not modes: ${
        noise.map((m) => formatFixed(m.frequencyHz, 3)).join(", ")
      } Hz\n`,
    );
  }
  const t = result.target;
  if (t !== undefined) {
    const skipped = t.skipped.length > 0 ? `; ${describeSkipped(t.skipped)}` : "";
    toStderr(
      t.firstModeHz === null
        ? `target: first mode >= ${formatNumber(t.minimumHz)} Hz: FAIL (no mode found${skipped})\n`
        : `target: first mode >= ${formatNumber(t.minimumHz)} Hz: ${t.pass ? "PASS" : "FAIL"} ` +
          `(${formatFixed(t.firstModeHz, 3)} Hz, mode ${t.mode} of ${t.channel}, margin ${
            formatFixed(t.marginHz, 3)
          } Hz, ${formatFixed(t.marginPercent, 1)} %${skipped})\n`,
    );
    if (!t.pass && values["require-targets"] === true) process.exitCode = TARGETS_NOT_MET_EXIT;
  }
}
