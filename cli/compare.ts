/**
 * `quiver compare`: a test curve against a simulation.
 *
 * @module
 */
import { COMPARE_OUTPUTS } from "../lib/compare/compare_descriptor.ts";
import { toStderr } from "./terminal.ts";
import { formatFixed, formatNumber } from "../lib/format_number.ts";
import { z } from "npm:zod@4.6.7";
import { BAND_FRACTIONS, type BandFraction } from "../lib/acoustics/bands.ts";
import { compareCurves } from "../lib/compare/comparison.ts";
import { readCurveFile } from "../lib/compare/curve_input.ts";
import { writeFileAtomic } from "../lib/io/atomic_write.ts";
import { inFile, numberOption, parseCommandArgs, usageError } from "./args.ts";
import { resolveFormat, writeTable } from "./output.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";

/** One-line summary for the command list. */
export const summary =
  "test against simulation: common grid, dB difference, FRAC, peak shifts, bands";

const CURVES = {
  "test-column": option(z.string().min(1), {
    value: "C",
    help: "curve in TEST (C, C_re/C_im, C_mag or C_mag_db)",
    default: "first",
  }),
  "sim-column": option(z.string().min(1), {
    value: "C",
    help: "curve in SIM",
    default: "first",
  }),
  power: option(z.boolean(), {
    flag: true,
    help:
      "the curves are power quantities (dB = 10 log10); default from\nthe metadata (psd/power spectra) or a squared unit such as\n(m/s^2)^2/Hz, else amplitudes (20 log10) with a warning",
  }),
};

const ANALYSIS = {
  "min-hz": option(numberOption().pipe(z.number().min(0, "must be at least 0")), {
    value: "F",
    help: "frequency range",
    helpWith: "max-hz",
  }),
  "max-hz": option(numberOption().pipe(z.number().positive("must be positive")), {
    value: "F",
    help: "highest frequency",
  }),
  bands: option(
    z.enum(BAND_FRACTIONS.map(String) as [string, ...string[]]).transform((b) =>
      Number(b) as BandFraction
    ),
    { value: "B", help: `per-band level differences, 1/B octave (${BAND_FRACTIONS.join(", ")})` },
  ),
  prominence: option(numberOption().pipe(z.number().positive("must be positive")), {
    value: "DB",
    help: "peak prominence for peak matching",
    default: "6",
    feeds: "prominenceDb",
  }),
};

const OUTPUTS = {
  ...OUTPUT_TABLE,
  ...COMPARE_OUTPUTS,
};

const TABLE = { ...CURVES, ...ANALYSIS, ...OUTPUTS };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver compare TEST SIM [options]",
  about: `Lays a test curve against a simulation. Either file may be what quiver
wrote (CSV with its .meta.json sidecar, or JSON) or a plain table from a
solver: frequency_hz plus re and im, or mag (linear, optional phase_deg),
or a dB column (name ending in _db, or a unit starting with "dB").

Both go on the coarser of the two grids over the range both cover; the
other is interpolated linearly (in re/im when it has phase, else in
magnitude).`,
  groups: [["Curves", CURVES], ["Analysis", ANALYSIS], ["Output", OUTPUTS]],
  notes: `CSV columns: frequency_hz, test, simulation, difference_db (simulation - test).
dB: 10 log10 for power quantities (--power, psd/power metadata, or a squared
unit such as (m/s^2)^2/Hz or FS^2/Hz), else 20 log10.
A peak is located between lines only with 3 lines in its half-power band;
otherwise it is compared at the common grid's lines and flagged coarse.
Peaks of one curve only are listed as test-only or simulation-only.`,
});

/** parseArgs spec. */
export const options = specOf(TABLE);

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 2) {
    usageError(`compare takes a test file and a simulation file, got ${positionals.length}`);
  }
  const [testPath, simPath] = positionals;
  const quantity = values.power === true ? "power" : undefined;
  const test = await readCurveFile(testPath, { column: values["test-column"], quantity });
  const simulation = await readCurveFile(simPath, { column: values["sim-column"], quantity });
  const result = inFile(
    testPath,
    () => compareCurves(test, simulation, { ...libraryOptions(ANALYSIS, values), quantity }),
  );
  const traced = {
    ...result.table,
    metadata: { test: testPath, simulation: simPath, ...result.table.metadata },
  };
  await writeTable(traced, resolveFormat(values.format, values.out), values.out);
  if (values["summary-out"] !== undefined) {
    await writeFileAtomic(
      values["summary-out"],
      JSON.stringify({ test: testPath, simulation: simPath, ...result.summary }, null, 2) + "\n",
    );
  }
  const s = result.summary;
  for (const warning of s.warnings) toStderr(`quiver compare: warning: ${warning}\n`);
  const unmatched = (side: string, peaks: typeof s.test_only_peaks) =>
    peaks.length === 0
      ? ""
      : `; ${side} only: ${peaks.map((p) => `${formatFixed(p.frequency_hz, 2)} Hz`).join(", ")}`;
  toStderr(
    `compare: FRAC ${formatFixed(s.frac, 4)} (${s.frac_on}), ${s.peaks.length} matched peak(s)` +
      s.peaks.map((p) =>
        `; ${formatFixed(p.test_hz, 2)} Hz -> ${formatFixed(p.simulation_hz, 2)} Hz (${
          formatFixed(p.shift_percent, 2)
        } %, ${formatFixed(p.level_difference_db, 2)} dB${p.coarse ? ", coarse" : ""})`
      ).join("") +
      unmatched("test", s.test_only_peaks) + unmatched("simulation", s.simulation_only_peaks) +
      `; dB as ${s.quantity === "power" ? "10" : "20"}·lg of ${s.quantity}s (${s.quantity_from})` +
      `, grid ${s.grid.lines} lines ${formatNumber(s.grid.min_hz, 6)}-${
        formatNumber(s.grid.max_hz, 6)
      } Hz from ${s.grid.from}\n`,
  );
  for (const p of s.peaks) {
    if (p.note !== undefined) {
      toStderr(`quiver compare: note: peak at ${formatFixed(p.test_hz, 2)} Hz: ${p.note}\n`);
    }
  }
}
