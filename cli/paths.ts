/**
 * `quiver paths`: transfer-path contributions at a receiver.
 *
 * @module
 */
import { PATHS_OUTPUTS } from "../lib/paths/paths_descriptor.ts";
import { z } from "npm:zod@4.6.7";
import { formatFixed } from "../lib/format_number.ts";
import type { FrfData } from "../lib/frf/frf_data.ts";
import { readFrfFile } from "../lib/modal/frf_input.ts";
import {
  parseRegularisation,
  PATH_METHODS,
  pathContributions,
} from "../lib/paths/contributions.ts";
import { listOption, parseCommandArgs, usageError } from "./args.ts";
import { commandHelp, option, shapeOf, specOf } from "./option_table.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { DETREND_MODES } from "../lib/dsp/detrend.ts";
import { WINDOW_NAMES } from "../lib/dsp/windows.ts";
import { WEIGHTINGS } from "../lib/acoustics/weighting.ts";
import { toStderr } from "./terminal.ts";

/** One-line summary for the command list. */
export const summary = "transfer-path contributions at a receiver (direct or matrix-inverse)";

const PATHS = {
  references: option(listOption(), {
    value: "a,b,c",
    help:
      "the paths: force channels of the recording (direct), or\nlabels of the forces to estimate (inverse)",
    required: true,
  }),
  transfer: option(listOption(), {
    value: "F1,F2,…",
    help:
      "one FRF file per path, in the order of --references: the\ntarget per force (and, inverse, each indicator per force)",
    required: true,
  }),
  target: option(z.string().min(1), {
    value: "CH",
    help: "the receiver channel, e.g. a cabin microphone",
    required: true,
  }),
  method: option(z.enum(PATH_METHODS), {
    value: "M",
    help: "direct (forces measured) | inverse (forces from indicators)",
    default: "direct",
  }),
  indicators: option(listOption(), {
    value: "i1,i2,…",
    help:
      "inverse: indicator channels (at least as many as paths;\ntwice as many is common practice)",
  }),
  regularise: option(z.string().min(1), {
    value: "R",
    help:
      "inverse: none | svd:K (keep K singular values) |\ntikhonov:λ (λ relative to the largest singular value)",
    default: "none",
  }),
};

const ANALYSIS = {
  overlap: option(z.coerce.number().min(0).lt(1), {
    value: "F",
    help: "overlap of segments (the block is the transfers' 1/df)",
    default: "0.5",
  }),
  window: option(z.enum(WINDOW_NAMES), { value: "W", help: "window", default: "hann" }),
  detrend: option(z.enum(DETREND_MODES), { value: "D", help: "detrend", default: "mean" }),
  scaling: option(z.enum(["spectrum", "density"]), {
    value: "S",
    help: "spectrum (RMS per line) | density (per √Hz)",
    default: "spectrum",
  }),
  weighting: option(z.enum(WEIGHTINGS), {
    value: "W",
    help: "weighting of band levels and rankings",
    default: "A for a target in Pa, else Z",
  }),
  ...PATHS_OUTPUTS,
  "band-width": option(z.enum(["octave", "third"]), {
    value: "B",
    help: "octave | third (third-octave) bands",
    default: "third",
  }),
};

const TABLE = { ...PATHS, ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUT_TABLE };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver paths OPERATING_IN --references a,b,c --transfer F1,F2,F3 --target MIC [options]",
  about: `Contribution of each transfer path to a receiver in operation: the path's
transfer function times its force, from the operating cross spectra with the
measured target as phase reference, so that correlated paths add right. The
complex sum is set against the measured target (synthesis_error_db). With
--method inverse the forces are estimated from indicator responses and the
measured indicator FRFs by a (regularised) pseudo-inverse.`,
  groups: [
    ["Paths", PATHS],
    ["Analysis", ANALYSIS],
    [RECORDING_HEADING, RECORDING_TABLE],
    ["Output", OUTPUT_TABLE],
  ],
  notes: `CSV columns: frequency_hz, per path P: P_contribution, P_phase_deg (relative
to the target), then sum_of_paths, sum_phase_deg, target_measured,
synthesis_error_db (and indicator_condition with --method inverse). The
metadata ranks the paths by energy over the analysed range and per octave.
Levels are for engineering comparison; quiver is not a certified instrument.`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) {
    usageError(`paths takes one operating recording, got ${positionals.length}`);
  }
  const [input] = positionals;
  const transfers: FrfData[] = [];
  for (const file of values.transfer) transfers.push(await readFrfFile(file));
  const method = values.method ?? "direct";
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) =>
      pathContributions(stream, {
        method,
        references: values.references,
        target: values.target,
        transfers,
        ...(values.indicators !== undefined ? { indicators: values.indicators } : {}),
        ...(values.regularise !== undefined
          ? { regularise: parseRegularisation(values.regularise) }
          : {}),
        ...(values.overlap !== undefined ? { overlap: values.overlap } : {}),
        ...(values.window !== undefined ? { window: values.window } : {}),
        ...(values.detrend !== undefined ? { detrend: values.detrend } : {}),
        ...(values.scaling !== undefined ? { scaling: values.scaling } : {}),
        ...(values.weighting !== undefined ? { weighting: values.weighting } : {}),
        bandFraction: values["band-width"] === "octave" ? 1 : 3,
      }),
  );
  const traced = {
    ...result.table,
    metadata: { ...result.table.metadata, transfers: values.transfer },
  };
  await writeResult(traced, input, values);
  if (values["bands-out"] !== undefined) {
    await writeResult(result.bandTable, input, {
      ...values,
      out: values["bands-out"],
      format: undefined,
    });
  }
  for (const w of result.warnings) toStderr(`quiver paths: warning: ${w}\n`);
  const ranking = result.table.metadata.ranking[0];
  toStderr(
    `paths: ${values.references.length} path(s) to ${values.target}, ${method}; over the analysed range: ${
      ranking.paths.map((p) =>
        `${p.name} ${formatFixed(p.level_db, 1)} dB (${formatFixed(p.share_percent, 0)} %)`
      ).join(", ")
    }\n`,
  );
}
