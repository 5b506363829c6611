/**
 * `quiver modal`: several FRFs of one reference, one set of poles, mode shapes.
 *
 * @module
 */
import { MODAL_OUTPUTS } from "../lib/modal/modal_descriptor.ts";
import { basename, extname } from "node:path";
import { z } from "npm:zod@4.6.7";
import { QuiverError } from "../lib/errors.ts";
import { formatFixed } from "../lib/format_number.ts";
import { parseTextCsv } from "../lib/io/csv_table.ts";
import { readFrfFile } from "../lib/modal/frf_input.ts";
import { parseGeometry } from "../lib/modal/geometry.ts";
import {
  largestModelOrder,
  linesForOrder,
  modalBand,
  smallestAutomaticOrder,
} from "../lib/modal/modal_band.ts";
import { type ModalDof, modalFit } from "../lib/modal/modal_fit.ts";
import { modalTables } from "../lib/modal/modal_tables.ts";
import { readFile } from "node:fs/promises";
import { integerOption, numberOption, parseCommandArgs, usageError } from "./args.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";
import { resolveFormat, writeTable } from "./output.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { positiveListOption } from "./speed_options.ts";
import { toStderr } from "./terminal.ts";

/** One-line summary for the command list. */
export const summary = "modes, damping and shapes from several FRFs of one reference (LSCF + LSFD)";

const positive = (what: string) =>
  numberOption().pipe(z.number().positive(`must be a positive number of ${what}`));

const ANALYSIS = {
  "min-hz": option(positive("Hz"), {
    value: "F",
    help: "frequency band of the fit",
    default: "all but 0 Hz",
    helpWith: "max-hz",
  }),
  "max-hz": option(positive("Hz"), { value: "F", help: "highest frequency of the fit" }),
  "max-order": option(integerOption(), {
    value: "N",
    help:
      "highest model order (even, at least 12 without --modes-hz,\nat most 128 and at most the band's lines − 2); orders\n2, 4, … N are fitted",
    default: "32",
  }),
  "modes-hz": option(positiveListOption("frequencies"), {
    value: "F1,F2",
    help: "take the poles nearest these frequencies instead of\nthe automatic rule",
    feeds: "modesHz",
  }),
};

const INPUTS = {
  geometry: option(z.string().min(1), {
    value: "FILE.csv",
    help:
      "point, x, y, z (and an optional line_to): the test geometry,\nfor the report's drawings of the shapes",
  }),
  dofs: option(z.string().min(1), {
    value: "MAP.csv",
    help:
      "file, column, point, direction: the point each FRF measures\n(file is the base name, column the response name)",
    default: "the response name, or the file's name when files share it",
  }),
};

const OUTPUTS = {
  ...OUTPUT_TABLE,
  ...MODAL_OUTPUTS,
};

const TABLE = { ...ANALYSIS, ...INPUTS, ...OUTPUTS };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver modal FRF_FILE... [options]",
  about: `Fits every FRF of the files (what quiver frf or quiver hammer wrote, or
plain tables with re/im columns), all of one reference, with one set of
poles: the least-squares complex frequency-domain method (LSCF, Guillaume et
al. 2003) over model orders 2 … N. A pole is stable when frequency (1 %),
damping (5 %) and shape (MAC 0.98) hold against the order before; stable
poles are clustered across all orders, and a cluster stable at 5 or more
orders and at more than half of the orders from its first to N is a mode
(median frequency and damping). Residues and shapes by least squares with
upper and lower residuals. A clear FRF peak no mode explains is warned of.

Roving hammer: one file per hit point with the fixed accelerometer as
response; by reciprocity each file is one point of the shape. The files'
names then name the points (or give --dofs).`,
  groups: [["Analysis", ANALYSIS], ["Points", INPUTS], ["Output", OUTPUTS]],
  notes: `--out columns: mode, frequency_hz, damping_ratio, mpc (modal phase
collinearity), flags (low_mpc below 0.9, form_assumed, window_corrected,
named, unstable), stable_orders, orders_spanned, frequency_spread and
damping_spread (% of the median over the cluster). Shapes are normalised so
that their largest component is real and 1.`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** The band's ends as text, or "(empty)". */
function bandText(axis: Float64Array, from: number, to: number): string {
  return to > from ? `${formatFixed(axis[from], 2)}–${formatFixed(axis[to - 1], 2)} Hz` : "(empty)";
}

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length === 0) usageError("modal takes one or more FRF files");
  const files = await Promise.all(positionals.map((p) => readFrfFile(p)));
  const axis = files[0].frequencies;
  files.forEach((d, i) => {
    const same = d.frequencies.length === axis.length &&
      d.frequencies.every((v, k) => v === axis[k]);
    if (!same) {
      throw new QuiverError(
        `its frequency lines differ from ${positionals[0]}'s; fit FRFs of one analysis setting`,
        { file: positionals[i] },
      );
    }
  });
  const stem = (path: string) => basename(path, extname(path));
  let map: Map<string, { point: string; direction: string }> | undefined;
  if (values.dofs !== undefined) {
    const table = parseTextCsv(await readFile(values.dofs, "utf8"), { file: values.dofs });
    const names = table.header.map((h) => h.name);
    const index = ["file", "column", "point", "direction"].map((c) => names.indexOf(c));
    if (index.some((i) => i < 0)) {
      throw new QuiverError("a points map needs the columns file, column, point, direction", {
        file: values.dofs,
      });
    }
    map = new Map(table.rows.map((r) => [
      `${stem(r[index[0]])} ${r[index[1]]}`,
      { point: r[index[2]], direction: r[index[3]] },
    ]));
  }
  const names = files.flatMap((d) => d.channels.map((c) => c.name));
  const shared = new Set(names.filter((n, i) => names.indexOf(n) !== i));
  const dofs: ModalDof[] = files.flatMap((d, i) =>
    d.channels.map((frf) => {
      const key = `${stem(positionals[i])} ${frf.name}`;
      if (map !== undefined) {
        const entry = map.get(key);
        if (entry === undefined) {
          throw new QuiverError(`no row for file ${stem(positionals[i])}, column ${frf.name}`, {
            file: values.dofs,
          });
        }
        return { ...entry, frf, ...(d.expTau !== undefined ? { expTau: d.expTau } : {}) };
      }
      return {
        point: shared.has(frf.name) ? stem(positionals[i]) : frf.name,
        direction: "",
        frf,
        ...(d.expTau !== undefined ? { expTau: d.expTau } : {}),
      };
    })
  );
  const geometry = values.geometry !== undefined
    ? parseGeometry(await readFile(values.geometry, "utf8"), { file: values.geometry })
    : undefined;
  const analysis = libraryOptions(ANALYSIS, values);
  // Refuse a band or order that cannot give a mode before any fitting.
  if (
    analysis.minHz !== undefined && analysis.maxHz !== undefined && analysis.minHz >= analysis.maxHz
  ) {
    usageError(
      `--min-hz ${analysis.minHz} is not below --max-hz ${analysis.maxHz}: give the band's lower end first`,
    );
  }
  const { from, to } = modalBand(axis, analysis);
  const lines = to - from;
  const largest = largestModelOrder(lines);
  const maxOrder = values["max-order"] ?? 32;
  const automatic = values["modes-hz"] === undefined;
  // The automatic rule needs a cluster stable at 5 orders; orders start at 2 in steps of 2.
  const needed = automatic ? smallestAutomaticOrder() : 4;
  if (maxOrder < 4 || maxOrder % 2 !== 0) {
    usageError(`--max-order ${maxOrder}: the highest order must be even and at least 4`);
  }
  if (largest < needed) {
    usageError(
      `the band ${bandText(axis, from, to)} holds ${lines} line(s): too narrow for any fit; ${
        automatic
          ? `the automatic choice of modes fits orders up to at least ${needed} and needs at least ${
            linesForOrder(needed)
          } lines`
          : `a fit of order 4 needs at least ${linesForOrder(4)} lines`
      }; widen --min-hz/--max-hz`,
    );
  }
  if (maxOrder < needed) {
    usageError(
      `--max-order ${maxOrder} cannot give a mode: orders 2, 4, … ${maxOrder} hold at most ${
        maxOrder / 2 - 1
      } stable poles (order 2 has none before it) and a mode needs a cluster stable at 5; the smallest that can is --max-order ${needed} (or name the modes with --modes-hz)`,
    );
  }
  if (maxOrder > largest) {
    usageError(
      `--max-order ${maxOrder} is more than quiver fits on this band of ${lines} lines: at most ${largest}`,
    );
  }
  const result = modalFit(axis, dofs, analysis);
  const tables = modalTables(result, {
    files: positionals,
    min_hz: result.frequencies[0],
    max_hz: result.frequencies[result.frequencies.length - 1],
    max_order: maxOrder,
    selection: values["modes-hz"] !== undefined
      ? { modes_hz: values["modes-hz"] }
      : "clusters of poles stable in frequency (1 %), damping (5 %) and shape (MAC 0.98) against the order before, stable at 5 or more orders and at more than half of the orders from the cluster's first to the highest; median frequency and damping",
    ...(geometry !== undefined ? { geometry } : {}),
  });
  await writeTable(tables.modes, resolveFormat(values.format, values.out), values.out);
  const extra = [
    [values["shapes-out"], tables.shapes],
    [values["stability-out"], tables.stability],
    [values["synth-out"], tables.synthesis],
  ] as const;
  for (const [path, table] of extra) {
    if (path !== undefined) await writeTable(table, resolveFormat(undefined, path), path);
  }
  for (const w of result.warnings) toStderr(`quiver modal: warning: ${w}\n`);
  toStderr(
    `modal: ${result.modes.length} mode(s) from ${dofs.length} FRF(s), ${
      formatFixed(result.frequencies[0], 2)
    }–${formatFixed(result.frequencies[result.frequencies.length - 1], 2)} Hz\n`,
  );
  for (const m of result.modes) {
    toStderr(
      `  mode ${m.mode}: ${formatFixed(m.frequencyHz, 3)} Hz, damping ${
        formatFixed(100 * m.dampingRatio, 3)
      } %, MPC ${formatFixed(m.mpc, 3)}, stable at ${m.stableOrders} of ${m.ordersSpanned} orders${
        m.stableOrders > 0
          ? ` (spread ${formatFixed(m.frequencySpreadPercent, 2)} % in frequency, ${
            formatFixed(m.dampingSpreadPercent, 1)
          } % in damping)`
          : ""
      }${m.flags.length > 0 ? ` [${m.flags.join(", ")}]` : ""}\n`,
    );
  }
}
