/**
 * `quiver orders`: order cuts, rpm profile and maps of a run-up or run-down.
 *
 * @module
 */
import { toStderr } from "./terminal.ts";
import { z } from "npm:zod@4.6.7";
import { WEIGHTINGS } from "../lib/acoustics/weighting.ts";
import { ORDER_METHODS, trackOrders } from "../lib/orders/order_tracking.ts";
import { collectRecording, openRecordingStream } from "../lib/io/recording_stream.ts";
import { channelIndices } from "../lib/io/recording.ts";
import {
  inFile,
  integerOption,
  listOption,
  numberOption,
  type OptionSpec,
  parseCommandArgs,
  usageError,
} from "./args.ts";
import { writeResult } from "./output.ts";
import {
  RECORDING_HELP,
  RECORDING_OPTIONS,
  recordingOptionsShape,
  toReadOptions,
} from "./recording_options.ts";
import { OUTPUT_HELP, OUTPUT_OPTIONS, outputOptionsShape } from "./segment_options.ts";
import {
  oneSpeedSource,
  positiveListOption,
  pprWithTacho,
  SPEED_HELP,
  SPEED_OPTIONS,
  speedOptionsShape,
  toSpeedOptions,
} from "./speed_options.ts";

/** One-line summary for the command list. */
export const summary = "order cuts, rpm and rpm maps of run-ups and run-downs from a tacho";

/** The command's help text. */
export const help = `quiver orders IN (--tacho T --ppr N | --rpm-channel R) --channels a,b [options]

Order tracking of a run-up or run-down. The shaft angle comes from tacho
pulses (Schmitt trigger with automatic level and hysteresis, sub-sample
edges, missing and extra pulses repaired, speed from a local fit) or from a
channel that already holds rpm.

${SPEED_HELP}

Analysis:
  --channels a,b       response channels                          (required)
  --orders 2,4,6.5     orders to cut                               (default 1,2,4)
  --method M           angle: resample to equal angle steps, FFT over R
                       revolutions; orders stay on their lines (default; for
                       real run-ups) | time: time blocks at each rpm step, order
                       k at k*rpm/60 Hz (fast sweeps smear orders; for slow ones)
  --weighting W        A | C | Z: each cut weighted at its own frequency k*rpm/60 (IEC
                       61672-1); the overall then is the energy of the weighted
                       spectrum of each block                        (default Z)
  --db                 cuts and overall in dB re the unit's ISO 1683 reference
  --reference R        level reference for --db
  --amplitude A        rms | peak, for the cuts and the map (default rms);
                       the overall is always RMS
  --revolutions R      angle: revolutions per block; order resolution 1/R (default 16)
  --samples-per-rev S  angle: power of two       (default >= 4 x highest order, >= 64)
  --block N            time: samples per block   (default: 1/4-order resolution at rpm-min)

${RECORDING_HELP}

${OUTPUT_HELP}
  --rpm-out FILE       rpm profile: time_s, rpm
  --map-out FILE       map, tidy: one row per (rpm, order) for angle or (rpm,
                       frequency_hz) for time, then one column per channel: RMS
                       (or peak) per line, scaled as spectrum --kind rms (or peak)

Cut columns: rpm, then <channel>_order<k> per channel and order, then
<channel>_overall (RMS over the same stretch of time), in the channel's unit.
`;

/** zod schema of the options. */
export const schema = z.strictObject({
  ...speedOptionsShape,
  channels: listOption(),
  orders: positiveListOption("orders").optional(),
  method: z.enum(ORDER_METHODS).optional(),
  amplitude: z.enum(["rms", "peak"]).optional(),
  weighting: z.enum(WEIGHTINGS).optional(),
  db: z.boolean().optional(),
  reference: numberOption().pipe(z.number().positive("must be a positive number")).optional(),
  revolutions: integerOption().optional(),
  "samples-per-rev": integerOption().optional(),
  block: integerOption().optional(),
  "rpm-out": z.string().min(1).optional(),
  "map-out": z.string().min(1).optional(),
  ...outputOptionsShape,
  ...recordingOptionsShape,
}).refine(oneSpeedSource, {
  message: "give --tacho (with --ppr) or --rpm-channel, one of them",
}).refine(pprWithTacho, { message: "--tacho needs --ppr" });

const text = { type: "string" } as const;

/** parseArgs spec of the options. */
export const options: OptionSpec = {
  ...SPEED_OPTIONS,
  channels: text,
  orders: text,
  method: text,
  amplitude: text,
  weighting: text,
  db: { type: "boolean" },
  reference: text,
  revolutions: text,
  "samples-per-rev": text,
  block: text,
  "rpm-out": text,
  "map-out": text,
  ...OUTPUT_OPTIONS,
  ...RECORDING_OPTIONS,
};

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`orders takes one recording, got ${positionals.length}`);
  const outputs = [values.out, values["rpm-out"], values["map-out"]].filter((o) => o !== undefined);
  if (new Set(outputs).size !== outputs.length) {
    usageError("--out, --rpm-out and --map-out must name different files");
  }
  const [input] = positionals;
  // Only the channels the analysis needs are held in memory, read through the chunked reader.
  const stream = await openRecordingStream(input, toReadOptions(values));
  const needed = inFile(
    input,
    () =>
      channelIndices(stream.channels, [
        ...(values.tacho !== undefined ? [values.tacho] : []),
        ...(values["rpm-channel"] !== undefined ? [values["rpm-channel"]] : []),
        ...values.channels,
      ]),
  );
  const recording = await collectRecording(stream, needed);
  const result = inFile(input, () =>
    trackOrders(recording, {
      ...toSpeedOptions(values),
      channels: values.channels,
      orders: values.orders,
      method: values.method,
      amplitude: values.amplitude,
      weighting: values.weighting,
      db: values.db,
      reference: values.reference,
      revolutions: values.revolutions,
      samplesPerRev: values["samples-per-rev"],
      block: values.block,
    }));
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
    `orders: ${
      result.cuts.columns[0].values.length
    } rpm step(s) from ${m.rpm_min} to ${m.rpm_max} rpm, ` +
      `method ${m.method}, recorded ${
        (m.recorded_rpm_range as number[]).map((r) => r.toFixed(0)).join("–")
      } rpm\n`,
  );
}
