/**
 * Order tracking of run-ups and run-downs: the analysis behind `orders`.
 *
 * Two methods, both stepping through the rpm range:
 * - `angle` (the default, computed order tracking): each channel is
 *   resampled to equal angle steps (angle_resample.ts), and a block of R
 *   revolutions centred where the shaft passes each rpm step goes through
 *   the spectral core with the angle as "time": lines are orders, spaced
 *   1/R apart. Orders stay on their lines however fast the sweep, so this
 *   is the method for real run-ups.
 * - `time` (rpm-synchronous blocks): a time block centred at each rpm step,
 *   order k read at k·rpm/60 Hz. Simple and close to what a spectrum shows,
 *   but an order sweeps across lines during the block, so fast sweeps smear
 *   it and read it low; use it for slow sweeps or steady steps.
 *
 * An order's amplitude is the energy of the spectral-core density over the
 * window's main lobe around it (±1 line for `angle`, ±2 lines for `time`,
 * Hann), which is the window's power correction: exact for a steady order
 * on a line and insensitive to where between lines it falls. Amplitudes are
 * RMS in the channel's unit (`peak`: √2 × RMS). The map's lines are the
 * `rms` (or `peak`) spectrum kind of the spectral core, so a steady order on
 * a line reads the same in the cut, the map and `spectrum --kind rms`.
 * `overall` is always the RMS of the channel over the same stretch of time,
 * mean removed.
 *
 * Memory: read from a file, the speed and response channels are spooled
 * once to temporary files (sample_series.ts); each rpm step reads back only
 * the stretch its block and the resampler's taps reach. Memory is flat in
 * the record's length (an rpm channel, unlike a tacho, is read whole).
 *
 * @module
 */
import { maxOf } from "../extent.ts";
import { QuiverError } from "../errors.ts";
import { channelIndices } from "../io/recording.ts";
import { asStream, type RecordingSource } from "../io/recording_stream.ts";
import { type SampleSeries, withChannelSeries } from "../io/sample_series.ts";
import type { Table, TableColumn } from "../io/table.ts";
import type { OrderMapMetadata, OrdersMetadata } from "./orders_metadata.ts";
import { SpectralAccumulator } from "../dsp/spectral_core.ts";
import { autoSpectrum } from "../dsp/spectrum_kinds.ts";
import { levelReference, levelUnit } from "../acoustics/levels.ts";
import { type Weighting, weightingPowerGain } from "../acoustics/weighting.ts";
import { inverseAngle, resampleToAngle } from "./angle_resample.ts";
import {
  lowestRpmBetween,
  motionOfSeries,
  type RpmStepOptions,
  rpmSteps,
  speedChannelName,
  type SpeedSource,
  speedSourceMetadata,
  timeAtRpm,
} from "./speed.ts";
import { formatNumber } from "../format_number.ts";

/**
 * The order-tracking methods.
 *
 * @example
 * ```ts
 * import { ORDER_METHODS } from "./order_tracking.ts";
 * if (ORDER_METHODS[0] !== "angle") throw new Error(); // the default
 * ```
 */
export const ORDER_METHODS = ["angle", "time"] as const;

/** One of {@linkcode ORDER_METHODS}. */
export type OrderMethod = typeof ORDER_METHODS[number];

/** Options of {@linkcode trackOrders}. */
export interface OrderOptions extends SpeedSource, RpmStepOptions {
  /** Response channels. Required. */
  channels: readonly string[];
  /** Orders to cut. Default 1, 2, 4. */
  orders?: readonly number[];
  /** Method. Default `"angle"`. */
  method?: OrderMethod;
  /** `rms` or `peak`. Default `"rms"`. */
  amplitude?: "rms" | "peak";
  /** angle method: revolutions per block (order resolution 1/R). Default 16. */
  revolutions?: number;
  /** angle method: samples per revolution (power of two). Default: ≥ 4 × the highest order, at least 64. */
  samplesPerRev?: number;
  /** time method: samples per block. Default: the power of two giving ¼-order resolution at the lowest rpm. */
  block?: number;
  /**
   * Frequency weighting (IEC 61672-1): each cut is weighted at its own
   * frequency k·rpm/60, and the overall becomes the energy of the weighted
   * spectrum of the same block. Default `"Z"`: no weighting, and the overall
   * is the RMS of the time data over the block's stretch.
   */
  weighting?: Weighting;
  /** Cuts and overall in dB re the unit's ISO 1683 reference (or `reference`). Default false. */
  db?: boolean;
  /** Level reference for `db`. Default: from the unit (ISO 1683). */
  reference?: number;
}

/** Order cuts, rpm profile, map and warnings. */
export interface OrderResult {
  /** rpm, then `<channel>_order<k>` per channel and order, then `<channel>_overall`. */
  readonly cuts: Table<OrdersMetadata>;
  /** time_s, rpm. */
  readonly rpm: Table;
  /** Tidy map: rpm, order (angle) or frequency_hz (time), then one RMS-per-line column per channel. */
  readonly map: Table<OrderMapMetadata>;
  /** Warnings. */
  readonly warnings: readonly string[];
}

/** The label of order k in column names: as written, e.g. 2 → "2", 6.5 → "6.5". */
export function orderLabel(order: number): string {
  return String(order);
}

function energyAround(
  density: Float64Array,
  centre: number,
  halfWidth: number,
  spacing: number,
): number {
  let sum = 0;
  const lo = Math.max(0, Math.ceil(centre - halfWidth - 1e-9));
  const hi = Math.min(density.length - 1, Math.floor(centre + halfWidth + 1e-9));
  for (let k = lo; k <= hi; k++) sum += density[k] * spacing;
  return sum;
}

function rmsOver(data: Float64Array): number {
  let mean = 0;
  for (let n = 0; n < data.length; n++) mean += data[n];
  mean /= data.length;
  let sum = 0;
  for (let n = 0; n < data.length; n++) sum += (data[n] - mean) ** 2;
  return Math.sqrt(sum / data.length);
}

/**
 * Order cuts, rpm profile and map of a run-up or run-down.
 *
 * @throws {QuiverError} when the rpm never spans the requested range, or no
 * rpm step has a whole block inside the record; RangeError for bad options.
 *
 * @example
 * ```ts
 * import { trackOrders } from "./order_tracking.ts";
 * // A channel that holds rpm (1200 → 2400 in 10 s) and order 2 of 1 rms.
 * const rate = 4096, n = 10 * rate;
 * let angle = 0;
 * const rpm = new Float64Array(n), acc = new Float64Array(n);
 * for (let i = 0; i < n; i++) {
 *   rpm[i] = 1200 + 120 * i / rate;
 *   acc[i] = Math.SQRT2 * Math.sin(2 * Math.PI * 2 * angle);
 *   angle += rpm[i] / 60 / rate;
 * }
 * const { cuts } = await trackOrders({ rate, startTime: 0, channels: [{ name: "speed", unit: "rpm", data: rpm },
 *   { name: "acc", unit: "m/s^2", data: acc }] }, { rpmChannel: "speed", channels: ["acc"], orders: [2], rpmStep: 200 });
 * const o2 = cuts.columns.find((c) => c.name === "acc_order2")!.values;
 * if (o2.some((v) => Math.abs(v - 1) > 0.05)) throw new Error();
 * ```
 */
export async function trackOrders(
  source: RecordingSource,
  options: OrderOptions,
): Promise<OrderResult> {
  if (options.channels.length === 0) throw new RangeError("name at least one response channel");
  const stream = asStream(source);
  const indices = channelIndices(stream.channels, [speedChannelName(options), ...options.channels]);
  // A recording in memory is used as it is; one read from a file is spooled once, so memory
  // stays flat in the record's length (sample_series.ts).
  return await withChannelSeries(source, indices, (series, warnings) =>
    ordersOfSeries(series, {
      rate: stream.rate,
      startTime: stream.startTime,
      channels: indices.slice(1).map((i) => stream.channels[i]),
      signalWarnings: warnings.slice(1).flat(),
    }, options));
}

/** Order tracking on the series of the speed channel (first) and the responses. */
function ordersOfSeries(
  series: readonly SampleSeries[],
  recording: {
    rate: number;
    startTime: number;
    channels: readonly { name: string; unit: string }[];
    signalWarnings: readonly string[];
  },
  options: OrderOptions,
): OrderResult {
  const [speedSeries, ...responses] = series;
  const recordLength = speedSeries.length;
  const orders = options.orders ?? [1, 2, 4];
  if (orders.some((k) => !(k > 0))) throw new RangeError("orders must be positive numbers");
  const method = options.method ?? "angle";
  const amplitude = options.amplitude ?? "rms";
  const amplitudeFactor = amplitude === "peak" ? Math.SQRT2 : 1;
  const weighting = options.weighting ?? "Z";
  const db = options.db ?? false;
  const channels = recording.channels;
  const { motion, notes } = motionOfSeries(
    speedSeries,
    recording.rate,
    options,
    recording.startTime,
  );
  const warnings = [...notes, ...recording.signalWarnings];
  const { steps, rpmMin, rpmMax, rpmStep: step, recorded: [lowest, highest] } = rpmSteps(
    motion,
    options,
  );
  const maxOrder = maxOf(orders);
  const revolutions = options.revolutions ?? 16;
  const samplesPerRev = options.samplesPerRev ??
    Math.max(64, 2 ** Math.ceil(Math.log2(4 * maxOrder)));
  if (method === "angle" && maxOrder > 0.45 * samplesPerRev) {
    throw new RangeError(
      `order ${maxOrder} is above 0.45 of ${samplesPerRev} samples per revolution`,
    );
  }
  const timeBlock = options.block ??
    2 ** Math.ceil(Math.log2((4 * recording.rate * 60) / rpmMin));

  const rows: {
    rpm: number;
    time: number;
    cut: number[][];
    overall: number[];
    line: Float64Array[];
  }[] = [];
  let lineSpacing = 0;
  let lines = 0;
  const skipped: number[] = [];
  for (const r of steps) {
    const t = timeAtRpm(motion, r);
    if (t === undefined) {
      skipped.push(r);
      continue;
    }
    let blocks: Float64Array[];
    let first: number, last: number;
    let rate: number, block: number;
    if (method === "angle") {
      block = revolutions * samplesPerRev;
      rate = samplesPerRev;
      const centre = motion.angleAt(t);
      const startRev = centre - revolutions / 2;
      const endRev = centre + revolutions / 2;
      const timeOf = inverseAngle(motion.angleAt, motion.span);
      const t0 = timeOf(startRev), t1 = timeOf(endRev);
      if (
        startRev < motion.angleAt(motion.span[0]) || endRev > motion.angleAt(motion.span[1]) ||
        t0 < 0 ||
        t1 * recording.rate > recordLength - 1
      ) {
        skipped.push(r);
        continue;
      }
      first = Math.ceil(t0 * recording.rate);
      last = Math.floor(t1 * recording.rate);
      // The stretch every tap of the resampler reaches: its kernel is widest where the shaft
      // turns slowest (angle_resample.ts: 8 zero crossings of a cutoff at 0.45 of the rates).
      const slowest = lowestRpmBetween(motion, t0, t1);
      const cutoff = Math.min(0.45 * (slowest / 60) * samplesPerRev, 0.45 * recording.rate);
      const reach = cutoff > 0 ? 8 / (2 * cutoff) : Infinity;
      const lo = Math.max(0, Math.floor((t0 - reach) * recording.rate) - 1);
      const hi = Math.min(recordLength - 1, Math.ceil((t1 + reach) * recording.rate) + 1);
      blocks = resampleToAngle(responses.map((r) => r.read(lo, hi + 1)), {
        offset: lo,
        recordLength,
        rate: recording.rate,
        timeOfAngle: timeOf,
        rpmAtTime: motion.rpmAt,
        samplesPerRev,
        startRev,
        count: block,
      });
    } else {
      block = timeBlock;
      rate = recording.rate;
      const centre = Math.round(t * recording.rate);
      first = centre - block / 2;
      last = first + block - 1;
      if (first < 0 || last >= recordLength) {
        skipped.push(r);
        continue;
      }
      blocks = responses.map((r) => Float64Array.from(r.read(first, last + 1)));
    }
    const accumulator = new SpectralAccumulator(channels.length, { rate, block, window: "hann" });
    accumulator.pushSegment(blocks);
    const estimate = accumulator.finish();
    lineSpacing = estimate.df;
    lines = estimate.frequencies.length;
    const weightAt = (frequency: number) => Math.sqrt(weightingPowerGain(weighting, frequency));
    const cut = channels.map((_, c) =>
      orders.map((k) => {
        const centreLine = method === "angle" ? k * revolutions : (k * r) / 60 / estimate.df;
        const energy = energyAround(
          estimate.auto[c],
          centreLine,
          method === "angle" ? 1 : 2,
          estimate.df,
        );
        return amplitudeFactor * Math.sqrt(energy) * weightAt((k * r) / 60);
      })
    );
    // The overall level is an RMS whatever `amplitude` says: a broadband sum has no peak of its
    // own. Weighted, it is the energy of the weighted spectrum of the block (a line of the angle
    // method at order j·Δ lies at j·Δ·rpm/60 Hz).
    const overall = channels.map((_, c) => {
      if (weighting === "Z") return rmsOver(responses[c].read(first, last + 1));
      const density = estimate.auto[c];
      let energy = 0;
      for (let j = 1; j < density.length; j++) {
        const hz = method === "angle" ? (j * estimate.df * r) / 60 : j * estimate.df;
        energy += density[j] * estimate.df * weightingPowerGain(weighting, hz);
      }
      return Math.sqrt(energy);
    });
    // The map's lines are scaled by the spectral core's one rule (spectrum kinds), as `spectrum` does.
    const line = channels.map((_, c) => autoSpectrum(estimate, c, amplitude));
    rows.push({ rpm: r, time: t, cut, overall, line });
  }
  if (rows.length === 0) {
    throw new QuiverError(
      "no rpm step has a whole analysis block inside the record; use a shorter block",
    );
  }
  if (skipped.length > 0) {
    warnings.push(
      `${skipped.length} rpm step(s) left out (no whole block around them): ${
        skipped.slice(0, 5).map((r) => formatNumber(r)).join(", ")
      }${skipped.length > 5 ? ", …" : ""} rpm`,
    );
  }
  const columns: TableColumn[] = [{
    name: "rpm",
    unit: "rpm",
    values: new Float64Array(rows.map((x) => x.rpm)),
  }];
  // In dB: 20·lg(amplitude / reference), the reference of the unit (ISO 1683) or given.
  const references = db ? channels.map((c) => levelReference(c.unit, options.reference)) : [];
  const level = (ci: number, v: number) => db ? 20 * Math.log10(v / references[ci]) : v;
  const unitOf = (ci: number) =>
    db ? levelUnit(weighting, references[ci], channels[ci].unit) : channels[ci].unit;
  channels.forEach((c, ci) => {
    orders.forEach((k, ki) => {
      columns.push({
        name: `${c.name}_order${orderLabel(k)}`,
        unit: unitOf(ci),
        values: new Float64Array(rows.map((x) => level(ci, x.cut[ci][ki]))),
      });
    });
  });
  channels.forEach((c, ci) => {
    columns.push({
      name: `${c.name}_overall`,
      unit: unitOf(ci),
      values: new Float64Array(rows.map((x) => level(ci, x.overall[ci]))),
    });
  });
  // The map keeps orders (or frequencies) up to 0.45 of the block's sampling, where the data are valid.
  const validLines = Math.min(
    lines,
    Math.floor((0.45 * (method === "angle" ? samplesPerRev : recording.rate)) / lineSpacing) + 1,
  );
  const mapRpm: number[] = [];
  const mapAxis: number[] = [];
  rows.forEach((row) => {
    for (let k = 0; k < validLines; k++) {
      mapRpm.push(row.rpm);
      mapAxis.push(k * lineSpacing);
    }
  });
  const mapColumns: TableColumn[] = [
    { name: "rpm", unit: "rpm", values: new Float64Array(mapRpm) },
    {
      name: method === "angle" ? "order" : "frequency_hz",
      unit: "",
      values: new Float64Array(mapAxis),
    },
    ...channels.map((c, ci) => ({
      name: c.name,
      unit: c.unit,
      values: new Float64Array(
        rows.flatMap((row) => Array.from(row.line[ci].subarray(0, validLines))),
      ),
    })),
  ];
  const metadata: OrdersMetadata = {
    analysis: "orders",
    method,
    amplitude,
    weighting,
    overall: weighting === "Z"
      ? "RMS of the time data over each block's stretch"
      : "energy of the weighted spectrum of each block",
    db,
    ...(db ? { references } : {}),
    orders,
    rpm_min: rpmMin,
    rpm_max: rpmMax,
    rpm_step: step,
    speed_source: speedSourceMetadata(options),
    ...(method === "angle"
      ? {
        revolutions_per_block: revolutions,
        samples_per_rev: samplesPerRev,
        order_resolution: 1 / revolutions,
      }
      : { block: timeBlock, df_hz: recording.rate / timeBlock }),
    window: "hann",
    recorded_rpm_range: [lowest, highest],
    warnings,
  };
  return {
    cuts: { columns, metadata },
    rpm: {
      columns: [
        { name: "time_s", unit: "", values: motion.times.map((t) => t + recording.startTime) },
        { name: "rpm", unit: "rpm", values: motion.rpm },
      ],
      metadata: { ...metadata, analysis: "rpm" },
    },
    map: {
      columns: mapColumns,
      metadata: {
        ...metadata,
        analysis: "order map",
        layout: "tidy: one row per (rpm, order or frequency)",
      },
    },
    warnings,
  };
}
