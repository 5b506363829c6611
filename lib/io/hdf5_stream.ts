/**
 * A recording laid out in an HDF5 file (hdf5_layout.ts) as a
 * {@linkcode RecordingStream}: the sample rate and start time found at
 * opening ({@linkcode hdf5Timing}: a stated rate, the time dataset's first
 * and last values, or `--rate`, each checked against the others), then the
 * samples read CHUNK_ROWS at a time by hyperslab, each dataset once a chunk
 * however many of its columns are asked for. The time dataset's steps and
 * the samples' finiteness are checked as they are read.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import type { ChannelTransform } from "./channel_transforms.ts";
import { type Hdf5Dataset, Hdf5File } from "./hdf5_file.ts";
import type { Hdf5Layout } from "./hdf5_layout.ts";
import { CHUNK_ROWS, type RecordingStream } from "./recording_source.ts";

/** The sample rate of a layout, where it comes from, and the time of the first sample. */
export interface Hdf5Timing {
  /** Sample rate, Hz; null when nothing gives it. */
  readonly rate: number | null;
  /** Where the rate comes from, in words; null with the rate. */
  readonly rateFrom: string | null;
  /** Time of the first sample, s (the time dataset's first value, else 0). */
  readonly startTime: number;
}

/** Default tolerance of a time step, as a fraction of the nominal step (as for CSV). */
const STEP_TOLERANCE = 0.01;

/** One value of a dataset's samples (a 1-D or MATLAB vector). */
function valueAt(file: Hdf5File, dataset: Hdf5Dataset, axis: number, index: number): number {
  const out = new Float64Array(1);
  file.readRows(dataset, index, 1, out, axis);
  return out[0];
}

/**
 * The timing of a layout: the time dataset's first and last values give a
 * rate ((n − 1)/(t_last − t_first)), checked against a stated rate and
 * `rate` (to {@linkcode STEP_TOLERANCE} of a step); a stated rate and a
 * given one must agree to 1e-9 relative.
 *
 * @throws {QuiverError} (usage) for rates that disagree, or none at all
 * when `required`; (data) for a time dataset that does not increase.
 */
export function hdf5Timing(
  file: Hdf5File,
  layout: Hdf5Layout,
  options: { rate?: number; required: boolean },
): Hdf5Timing {
  const fail = (detail: string, kind: "data" | "usage" = "usage"): never => {
    throw new QuiverError(detail, { file: file.path }, kind);
  };
  let timeRate: number | null = null;
  let startTime = 0;
  const { time, length, statedRate } = layout;
  if (time !== null) {
    const name = time.dataset.path;
    if (length < 2) fail(`time dataset ${name} holds fewer than two times`, "data");
    const first = valueAt(file, time.dataset, time.axis, 0);
    const last = valueAt(file, time.dataset, time.axis, length - 1);
    if (!(last > first) || !Number.isFinite(first) || !Number.isFinite(last)) {
      fail(`time dataset ${name} does not increase (${first} s … ${last} s)`, "data");
    }
    timeRate = (length - 1) / (last - first);
    startTime = first;
  }
  const near = (a: number, b: number, tolerance: number) =>
    Math.abs(a - b) <= tolerance * Math.max(a, b);
  const timeFrom = `the time dataset ${time?.dataset.path}`;
  if (statedRate !== null && timeRate !== null && !near(statedRate.hz, timeRate, STEP_TOLERANCE)) {
    fail(
      `${statedRate.from} says ${statedRate.hz} Hz but ${timeFrom} steps at ${
        formatNumber(timeRate, 8)
      } Hz`,
      "data",
    );
  }
  if (options.rate !== undefined) {
    if (statedRate !== null && !near(options.rate, statedRate.hz, 1e-9)) {
      fail(`--rate ${options.rate} Hz disagrees with ${statedRate.from}: ${statedRate.hz} Hz`);
    }
    if (timeRate !== null && !near(options.rate, timeRate, STEP_TOLERANCE)) {
      fail(`--rate ${options.rate} Hz disagrees with ${timeFrom}: ${formatNumber(timeRate, 8)} Hz`);
    }
    const agreeing = statedRate !== null ? statedRate.from : timeRate !== null ? timeFrom : null;
    return {
      rate: options.rate,
      rateFrom: agreeing === null ? "--rate" : `--rate, agreeing with ${agreeing}`,
      startTime,
    };
  }
  if (statedRate !== null) return { rate: statedRate.hz, rateFrom: statedRate.from, startTime };
  if (timeRate !== null) return { rate: timeRate, rateFrom: timeFrom, startTime };
  if (options.required) {
    fail(
      `no sample rate in the file (no sample_rate attribute, no time dataset) for ${
        layout.group === "/" ? "its root" : `group ${layout.group}`
      }: give --rate HZ`,
    );
  }
  return { rate: null, rateFrom: null, startTime };
}

/**
 * The stream of a layout with its timing and the channels' transforms (one
 * a channel, from the set-up or the unit conversion). Each `read` opens the
 * file anew and closes it at the end.
 *
 * @throws {QuiverError} from `read` for a chunk that cannot be read, a
 * sample that is not finite, or a time step off the rate, naming the
 * dataset and the sample.
 */
export function hdf5Stream(
  path: string,
  layout: Hdf5Layout,
  timing: { rate: number; startTime: number },
  transforms: readonly ChannelTransform[],
  options: { timeTolerance?: number } = {},
): RecordingStream {
  const { length, channels } = layout;
  const { rate } = timing;
  const tolerance = options.timeTolerance ?? STEP_TOLERANCE;
  return {
    rate,
    startTime: timing.startTime,
    length,
    channels: transforms.map(({ factor: _f, ...meta }) => meta),
    async read(selected, onChunk) {
      const file = await Hdf5File.open(path);
      try {
        const rows = Math.min(CHUNK_ROWS, length);
        // One buffer per dataset read (a 2-D one's columns come from one read), one per channel.
        const sources = new Map<
          Hdf5Dataset,
          { buffer: Float64Array; width: number; axis: number }
        >();
        for (const s of selected) {
          const c = channels[s];
          const width = c.dataset.shape.length === 2 && c.axis === 0 ? c.dataset.shape[1] : 1;
          if (!sources.has(c.dataset)) {
            sources.set(c.dataset, { buffer: new Float64Array(rows * width), width, axis: c.axis });
          }
        }
        const out = selected.map(() => new Float64Array(rows));
        const factors = selected.map((s) => transforms[s].factor);
        const time = layout.time;
        const times = time === null ? null : new Float64Array(rows);
        let previous = NaN;
        for (let first = 0; first < length; first += CHUNK_ROWS) {
          const count = Math.min(CHUNK_ROWS, length - first);
          for (const [dataset, s] of sources) {
            file.readRows(dataset, first, count, s.buffer, s.axis);
          }
          if (time !== null && times !== null) {
            file.readRows(time.dataset, first, count, times, time.axis);
            previous = checkSteps(times, count, first, previous, {
              rate,
              tolerance,
              dataset: time.dataset,
              file: path,
            });
          }
          onChunk(selected.map((s, j) => {
            const c = channels[s];
            const { buffer, width } = sources.get(c.dataset)!;
            const d = out[j].subarray(0, count);
            const f = factors[j];
            for (let i = 0, k = c.column; i < count; i++, k += width) {
              const v = buffer[k];
              if (v - v !== 0) {
                throw new QuiverError(
                  `dataset ${c.dataset.path}${
                    width > 1 ? `, column ${c.column + 1} (${c.name})` : ""
                  }, sample ${first + i}: ${v} is not a finite number`,
                  { file: path },
                );
              }
              d[i] = v * f;
            }
            return d;
          }));
        }
      } finally {
        file.close();
      }
    },
  };
}

/**
 * Checks a chunk of times: each step within `tolerance` of 1/rate, plus the
 * rounding of the times as stored (a float32 time has 24 bits). Returns the
 * chunk's last time.
 */
function checkSteps(
  times: Float64Array,
  count: number,
  first: number,
  previous: number,
  where: { rate: number; tolerance: number; dataset: Hdf5Dataset; file: string },
): number {
  const step = 1 / where.rate;
  const bits = where.dataset.type === "float32" ? 24 : where.dataset.type === "float64" ? 53 : 0;
  for (let i = 0; i < count; i++) {
    const t = times[i];
    if (i > 0 || !Number.isNaN(previous)) {
      const before = i > 0 ? times[i - 1] : previous;
      const rounding = bits === 0 ? 0 : 2 * Math.max(Math.abs(t), Math.abs(before)) * 2 ** -bits;
      if (!(Math.abs(t - before - step) <= where.tolerance * step + rounding)) {
        throw new QuiverError(
          `time dataset ${where.dataset.path}, sample ${
            first + i
          }: the step from ${before} s to ${t} s is not 1/${
            formatNumber(where.rate, 8)
          } Hz (within ${where.tolerance * 100} % of a step)`,
          { file: where.file },
        );
      }
    }
  }
  return count > 0 ? times[count - 1] : previous;
}
