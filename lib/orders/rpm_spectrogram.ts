/**
 * Spectra against shaft speed: one frame per rpm step, centred on the
 * instant the speed first passes the step (the same speed estimate and
 * instants as `orders`, speed.ts), each frame `frames` segments of the one
 * spectral core scaled by the same rule as the spectrogram against time
 * ({@linkcode FrameScaling}).
 *
 * Memory: the speed channel is spooled to a temporary file and scanned (the
 * tacho's level needs its whole record); the response channels stream, and
 * only the frames whose stretch the current chunk overlaps hold an
 * accumulator.
 *
 * Output, tidy: `rpm`, `frequency_hz`, then one column per channel.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { channelIndices } from "../io/recording.ts";
import { asStream, readChecked, type RecordingSource } from "../io/recording_stream.ts";
import { withChannelSeries } from "../io/sample_series.ts";
import type { Table, TableColumn } from "../io/table.ts";
import { resolveBlock, SpectralAccumulator } from "../dsp/spectral_core.ts";
import {
  FrameScaling,
  linesInRange,
  MAX_SPECTROGRAM_CELLS,
  rangeMetadata,
  type SpectrogramOptions,
  spectrogramSegmenting,
} from "../dsp/spectrogram.ts";
import type { SpectrogramMetadata } from "../dsp/spectrogram_metadata.ts";
import {
  motionOfSeries,
  type RpmStepOptions,
  rpmSteps,
  speedChannelName,
  type SpeedSource,
  speedSourceMetadata,
  timeAtRpm,
} from "./speed.ts";
import { formatNumber } from "../format_number.ts";

/** Options of {@linkcode spectrogramAgainstRpm}: a spectrogram's, the speed source and the steps. */
export interface RpmSpectrogramOptions extends SpectrogramOptions, SpeedSource, RpmStepOptions {
  /** Orders to draw over the map in the report (metadata only). Default: none. */
  orderLines?: readonly number[];
}

/**
 * The spectrogram of the chosen channels against rpm.
 *
 * @throws {QuiverError} when the speed does not cover the rpm range, no step
 * has a whole frame inside the record, the output is over `maxCells`, or a
 * unit has no level reference; RangeError for bad options.
 *
 * @example
 * ```ts
 * import { spectrogramAgainstRpm } from "./rpm_spectrogram.ts";
 * // rpm rising 600 → 3000 in 10 s, and a tone at order 2 of 1 rms.
 * const rate = 2048, n = 10 * rate;
 * const rpm = new Float64Array(n), x = new Float64Array(n);
 * let angle = 0;
 * for (let i = 0; i < n; i++) {
 *   rpm[i] = 600 + 240 * i / rate;
 *   x[i] = Math.SQRT2 * Math.sin(2 * Math.PI * 2 * angle);
 *   angle += rpm[i] / 60 / rate;
 * }
 * const t = await spectrogramAgainstRpm({ rate, startTime: 0, channels: [{ name: "n", unit: "rpm", data: rpm },
 *   { name: "x", unit: "V", data: x }] }, { rpmChannel: "n", channels: ["x"], rpmStep: 600, block: 1024, kind: "rms" });
 * const [r, f, v] = t.columns.map((c) => c.values);
 * // At 1800 rpm order 2 is at 60 Hz (lines 2 Hz apart): the peak line is there.
 * let best = -1;
 * for (let i = 0; i < r.length; i++) if (r[i] === 1800 && (best < 0 || v[i] > v[best])) best = i;
 * if (f[best] !== 60) throw new Error();
 * ```
 */
export async function spectrogramAgainstRpm(
  source: RecordingSource,
  options: RpmSpectrogramOptions,
): Promise<Table<SpectrogramMetadata>> {
  const stream = asStream(source);
  const speedName = speedChannelName(options);
  // Default: every channel but the speed's.
  const indices = channelIndices(
    stream.channels,
    options.channels ?? stream.channels.map((c) => c.name).filter((n) => n !== speedName),
  );
  const channels = indices.map((i) => stream.channels[i]);
  const rate = stream.rate;
  const block = resolveBlock(rate, options);
  const perFrame = options.frames ?? 1;
  if (!Number.isInteger(perFrame) || perFrame < 1) {
    throw new RangeError(`a frame needs at least one segment, got ${perFrame}`);
  }
  const overlapSamples = Math.floor((options.overlap ?? 0.5) * block);
  const hop = block - overlapSamples;
  const span = (perFrame - 1) * hop + block;
  const scaling = new FrameScaling(channels, options);

  const speedIndex = channelIndices(stream.channels, [speedName]);
  // The speed channel is spooled (or used in memory) and scanned: flat memory (sample_series.ts).
  const { motion, notes } = await withChannelSeries(
    source,
    speedIndex,
    (series) => motionOfSeries(series[0], rate, options),
  );

  const steps = rpmSteps(motion, options);

  // Each step's stretch, centred on the instant the speed passes it.
  const frames: { rpm: number; first: number }[] = [];
  const skipped: number[] = [];
  for (const r of steps.steps) {
    const t = timeAtRpm(motion, r);
    const first = t === undefined ? -1 : Math.round(t * rate) - Math.floor(span / 2);
    if (t === undefined || first < 0 || first + span > stream.length) skipped.push(r);
    else frames.push({ rpm: r, first });
  }
  if (frames.length === 0) {
    throw new QuiverError(
      `no rpm step has a whole frame of ${span} samples inside the record; use a smaller block or fewer segments per frame`,
    );
  }
  const kept = linesInRange(rate, block, options.minHz, options.maxHz);
  const lines = kept.count;
  const cells = frames.length * lines * channels.length;
  const maxCells = options.maxCells ?? MAX_SPECTROGRAM_CELLS;
  if (cells > maxCells) {
    throw new QuiverError(
      `the spectrogram would hold ${cells} cells (${frames.length} rpm steps × ${lines} lines × ${channels.length} channel(s)), over ${maxCells}; coarsen it (a larger rpm step, a smaller block) or allow more`,
      {},
      "usage",
    );
  }
  const rpmColumn = new Float64Array(frames.length * lines);
  const frequency = new Float64Array(frames.length * lines);
  const values = channels.map(() => new Float64Array(frames.length * lines));
  const df = rate / block;
  frames.forEach((f, j) => {
    for (let k = 0; k < lines; k++) {
      rpmColumn[j * lines + k] = f.rpm;
      frequency[j * lines + k] = (kept.first + k) * df;
    }
  });

  // Frames in the order their stretches start; those the chunk overlaps are open.
  const order = frames.map((_, j) => j).sort((a, b) => frames[a].first - frames[b].first);
  const open = new Map<number, SpectralAccumulator>();
  let next = 0;
  let position = 0;
  const spectral = {
    rate,
    block,
    overlap: options.overlap,
    window: options.window,
    detrend: options.detrend,
  };
  const warnings = await readChecked(stream, indices, (chunk) => {
    const length = chunk[0]?.length ?? 0;
    const end = position + length;
    while (next < order.length && frames[order[next]].first < end) {
      open.set(order[next], new SpectralAccumulator(channels.length, spectral));
      next++;
    }
    for (const [j, accumulator] of open) {
      const first = frames[j].first;
      const from = Math.max(first, position) - position;
      const to = Math.min(first + span, end) - position;
      accumulator.push(chunk.map((c) => c.subarray(from, to)));
      if (first + span <= end) {
        scaling.write(accumulator.finish(), values, j * lines, kept);
        open.delete(j);
      }
    }
    position = end;
  });
  if (skipped.length > 0) {
    warnings.push(
      `${skipped.length} rpm step(s) left out (no whole frame around them): ${
        skipped.slice(0, 5).map((r) => formatNumber(r)).join(", ")
      }${skipped.length > 5 ? ", …" : ""} rpm`,
    );
  }
  return {
    columns: [
      { name: "rpm", unit: "rpm", values: rpmColumn },
      { name: "frequency_hz", unit: "", values: frequency },
      ...channels.map((c, i): TableColumn => ({
        name: c.name,
        unit: scaling.units[i],
        values: values[i],
      })),
    ],
    metadata: {
      analysis: "spectrogram",
      against: "rpm",
      layout: "tidy: one row per (rpm step, line)",
      ...spectrogramSegmenting(rate, block, overlapSamples, options),
      kind: options.kind ?? "psd",
      segments_per_frame: perFrame,
      frames: frames.length,
      ...rangeMetadata(rate, block, kept),
      frame_centre: "the first instant the speed passes the step",
      rpm_min: steps.rpmMin,
      rpm_max: steps.rpmMax,
      rpm_step: steps.rpmStep,
      recorded_rpm_range: steps.recorded,
      speed_source: speedSourceMetadata(options),
      order_lines: options.orderLines ?? [],
      ...scaling.metadata(),
      warnings: [...notes, ...warnings],
    },
  };
}
