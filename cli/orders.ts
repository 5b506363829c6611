/**
 * `quiver orders`: order cuts, rpm profile and maps of a run-up or run-down.
 *
 * @module
 */
import { ORDERS_OUTPUTS } from "../lib/orders/orders_descriptor.ts";
import { toStderr } from "./terminal.ts";
import { z } from "npm:zod@4.6.7";
import { WEIGHTINGS } from "../lib/acoustics/weighting.ts";
import { ORDER_METHODS, trackOrders } from "../lib/orders/order_tracking.ts";
import { integerOption, listOption, numberOption, parseCommandArgs, usageError } from "./args.ts";
import { writeResult } from "./output.ts";
import {
  analyseRecording,
  RECORDING_HEADING,
  RECORDING_TABLE,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { commandHelp, libraryOptions, option, shapeOf, specOf } from "./option_table.ts";
import {
  missingTeethWithTacho,
  oneSpeedSource,
  positiveListOption,
  pprWithTacho,
  SPEED_HEADING,
  SPEED_TABLE,
} from "./speed_options.ts";
import { formatFixed, formatNumber } from "../lib/format_number.ts";

/** One-line summary for the command list. */
export const summary = "order cuts, rpm and rpm maps of run-ups and run-downs from a tacho";

const ANALYSIS = {
  channels: option(listOption(), {
    value: "a,b",
    help: "response channels",
    required: true,
  }),
  orders: option(positiveListOption("orders"), {
    value: "2,4,6.5",
    help: "orders to cut",
    default: "1,2,4",
  }),
  method: option(z.enum(ORDER_METHODS), {
    value: "M",
    help:
      "angle: resample to equal angle steps, FFT over R\nrevolutions; orders stay on their lines (default; for\nreal run-ups) | time: time blocks at each rpm step, order\nk at k*rpm/60 Hz (fast sweeps smear orders; for slow ones)",
  }),
  weighting: option(z.enum(WEIGHTINGS), {
    value: "W",
    help:
      "A | C | Z: each cut weighted at its own frequency k*rpm/60 (IEC\n61672-1); the overall then is the energy of the weighted\nspectrum of each block",
    default: "Z",
  }),
  db: option(z.boolean(), {
    flag: true,
    help: "cuts and overall in dB re the unit's ISO 1683 reference",
  }),
  reference: option(numberOption().pipe(z.number().positive("must be a positive number")), {
    value: "R",
    help: "level reference for --db",
  }),
  amplitude: option(z.enum(["rms", "peak"]), {
    value: "A",
    help: "rms | peak, for the cuts and the map (default rms);\nthe overall is always RMS",
  }),
  revolutions: option(integerOption(), {
    value: "R",
    help: "angle: revolutions per block; order resolution 1/R",
    default: "16",
  }),
  "samples-per-rev": option(integerOption(), {
    value: "S",
    help: "angle: power of two",
    default: ">= 4 x highest order, >= 64",
  }),
  block: option(integerOption(), {
    value: "N",
    help: "time: samples per block",
    default: "1/4-order resolution at rpm-min",
  }),
};

const OUTPUTS = {
  ...OUTPUT_TABLE,
  ...ORDERS_OUTPUTS,
};

const TABLE = { ...SPEED_TABLE, ...ANALYSIS, ...RECORDING_TABLE, ...OUTPUTS };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver orders IN (--tacho T --ppr N | --rpm-channel R) --channels a,b [options]",
  about: `Order tracking of a run-up or run-down. The shaft angle comes from tacho
pulses (Schmitt trigger whose level and hysteresis follow the pulses' own
amplitude, sub-sample edges, missing and extra pulses repaired, a
missing-tooth wheel's gap taken as the once-per-revolution mark, speed from a
local fit) or from a channel that already holds rpm. Stretches without
pulses and repairs are named in warnings.`,
  groups: [
    [SPEED_HEADING, SPEED_TABLE],
    ["Analysis", ANALYSIS],
    [RECORDING_HEADING, RECORDING_TABLE],
    ["Output", OUTPUTS],
  ],
  notes: `Cut columns: rpm, then <channel>_order<k> per channel and order, then
<channel>_overall (RMS over the same stretch of time), in the channel's unit.`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE)).refine(oneSpeedSource, {
  message: "give --tacho (with --ppr) or --rpm-channel, one of them",
}).refine(pprWithTacho, { message: "--tacho needs --ppr" })
  .refine(missingTeethWithTacho, { message: "--missing-teeth needs --tacho (a pulse wheel)" });

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`orders takes one recording, got ${positionals.length}`);
  const outputs = [values.out, values["rpm-out"], values["map-out"]].filter((o) => o !== undefined);
  if (new Set(outputs).size !== outputs.length) {
    usageError("--out, --rpm-out and --map-out must name different files");
  }
  const [input] = positionals;
  // The analysis spools the channels it needs once through the chunked reader: flat memory.
  const result = await analyseRecording(
    input,
    toReadOptions(values),
    (stream) =>
      trackOrders(stream, {
        ...libraryOptions(SPEED_TABLE, values),
        ...libraryOptions(ANALYSIS, values),
      }),
  );
  await writeResult(result.cuts, input, values);
  if (values["rpm-out"] !== undefined) {
    await writeResult(result.rpm, input, { out: values["rpm-out"] });
  }
  if (values["map-out"] !== undefined) {
    await writeResult(result.map, input, { out: values["map-out"] });
  }
  for (const w of result.warnings) toStderr(`quiver orders: warning: ${w}\n`);
  const m = result.cuts.metadata;
  toStderr(
    `orders: ${result.cuts.columns[0].values.length} rpm step(s) from ${
      formatNumber(m.rpm_min)
    } to ${formatNumber(m.rpm_max)} rpm, ` +
      `method ${m.method}, recorded ${
        (m.recorded_rpm_range as number[]).map((r) => formatFixed(r, 0)).join("–")
      } rpm\n`,
  );
}
