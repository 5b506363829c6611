/**
 * Limits of the options that size memory or time, checked once the
 * recording's header is known (rate, length, channels) and before any sample
 * is read: a block longer than the record, a resolution finer than the record
 * resolves, more frames than segments, a level step longer than the record, a
 * hammer record longer than the recording, a lowest band below one cycle of
 * the record, an rpm step that makes more steps
 * than quiver keeps, an output or a block the machine's memory cannot hold.
 * Each refusal is one line naming the option, its value and the largest (or
 * smallest) value that would work (a usage error, exit 2).
 *
 * The checks are keyed by option name, so every command that reads a
 * recording through {@linkcode analyseRecording} (recording_options.ts) gets
 * those of the options it has.
 *
 * @module
 */
import { totalmem } from "node:os";
import { QuiverError } from "../lib/errors.ts";
import { formatNumber } from "../lib/format_number.ts";
import { MAX_FFT_SIZE } from "../lib/dsp/fft.ts";
import { DEFAULT_BLOCK } from "../lib/dsp/spectral_core.ts";
import { CHUNK_ROWS } from "../lib/io/recording_stream.ts";
import { MAX_RPM_STEPS } from "../lib/orders/rpm_steps.ts";

/** What the header tells: enough to size every analysis before reading. */
export interface RecordShape {
  /** Sample rate, Hz. */
  readonly rate: number;
  /** Samples per channel (of the time slice, when there is one). */
  readonly length: number;
  /** Channels in the recording. */
  readonly channels: number;
}

/**
 * The share of the machine's memory one command may plan to use: half, the
 * rest left to the system, the reader's page cache and other work.
 */
export const MEMORY_SHARE = 0.5;

/**
 * Bytes the spectral core holds per block sample, besides the per-channel
 * part: 256. A non-power-of-two block goes through Bluestein's algorithm,
 * whose three arrays of up to 8 × block doubles (kernel, work, spectrum) are
 * 192 bytes per block sample; the window, the chirps and a scratch segment
 * take most of the rest. An estimate, rounded up.
 */
export const CORE_BYTES_PER_SAMPLE = 256;

/**
 * Bytes the spectral core holds per block sample and channel: 48 (the tail
 * kept between chunks, the stitched segment, the real and imaginary parts
 * and the average, with its copy in the estimate; eight-byte doubles).
 */
export const CORE_BYTES_PER_SAMPLE_AND_CHANNEL = 48;

/**
 * Bytes per spectrogram cell in the output: 32 (the value, its share of the
 * time and frequency columns, and its text in the CSV or JSON written).
 */
export const BYTES_PER_CELL = 32;

/**
 * Bytes per channel that reading takes: one chunk of {@linkcode CHUNK_ROWS}
 * doubles for the reader, one for the parallel CSV parse or the worker's
 * ring, and one for the analysis' own copy (16 bytes per row in all,
 * rounded up to 24).
 */
export const READ_BYTES_PER_CHANNEL = CHUNK_ROWS * 24;

/** The memory a command may plan to use on this machine, bytes. */
export function memoryBudget(): number {
  return totalmem() * MEMORY_SHARE;
}

/**
 * The largest block the spectral core may take for `channels` channels within
 * `budget` bytes (and never above the largest transform, `MAX_FFT_SIZE`).
 *
 * @example
 * ```ts
 * import { largestBlock } from "./option_limits.ts";
 * // 1 GiB for one channel: 2^30 / (256 + 48) bytes per sample.
 * if (largestBlock(1, 2 ** 30) !== Math.floor(2 ** 30 / 304)) throw new Error();
 * if (largestBlock(1, 2 ** 50) !== 2 ** 27) throw new Error();
 * ```
 */
export function largestBlock(channels: number, budget: number): number {
  const perSample = CORE_BYTES_PER_SAMPLE + CORE_BYTES_PER_SAMPLE_AND_CHANNEL * channels;
  return Math.min(MAX_FFT_SIZE, Math.floor(budget / perSample));
}

/**
 * A number for a message, rounded away from the limit so that the number
 * shown still works when given back: `up` for a smallest value, down for a
 * largest. Six significant figures.
 *
 * @example
 * ```ts
 * import { shown } from "./option_limits.ts";
 * if (shown(1 / 3, "up") !== "0.333334" || shown(2 / 3, "down") !== "0.666666") throw new Error();
 * ```
 */
export function shown(value: number, direction: "up" | "down"): string {
  if (value === 0 || !Number.isFinite(value)) return String(value);
  const scale = 10 ** (5 - Math.floor(Math.log10(Math.abs(value))));
  const rounded = (direction === "up" ? Math.ceil(value * scale) : Math.floor(value * scale)) /
    scale;
  return formatNumber(rounded, 6);
}

/** The options this module reads, as parsed (any may be absent). */
type Values = Readonly<Record<string, unknown>>;

const numberAt = (values: Values, name: string): number | undefined =>
  typeof values[name] === "number" ? values[name] as number : undefined;

/**
 * Checks every sizing option among `values` against the record and the
 * machine. Options a command does not have are absent and not checked.
 *
 * @param file the recording's path, for the message.
 * @param budget bytes the command may plan to use (default {@linkcode memoryBudget}).
 * @throws {QuiverError} (usage) naming the option, its value and the limit.
 *
 * @example
 * ```ts
 * import { checkOptionLimits } from "./option_limits.ts";
 * let message = "";
 * try { checkOptionLimits({ rate: 1000, length: 20000, channels: 2 }, { block: 30000 }, "r.csv"); }
 * catch (e) { message = (e as Error).message; }
 * if (!message.includes("--block 30000 is longer than the record of 20000 samples") || !message.endsWith("the largest is 20000")) throw new Error(message);
 * checkOptionLimits({ rate: 1000, length: 20000, channels: 2 }, { block: 20000 }, "r.csv");
 * ```
 */
export function checkOptionLimits(
  shape: RecordShape,
  values: Values,
  file: string,
  budget: number = memoryBudget(),
): void {
  const { rate, length } = shape;
  const fail = (detail: string): never => {
    throw new QuiverError(detail, { file }, "usage");
  };
  const record = `the record of ${length} samples (${formatNumber(length / rate, 6)} s at ${
    formatNumber(rate, 6)
  } Hz)`;
  const listed = Array.isArray(values.channels) ? values.channels.length : undefined;
  const channels = Math.max(1, Math.min(listed ?? shape.channels, shape.channels));

  // Reading: a chunk of rows per channel, whatever the analysis.
  const readable = Math.floor(budget / READ_BYTES_PER_CHANNEL);
  if (channels > readable) {
    fail(
      `${channels} channels would take ${
        formatNumber(channels * READ_BYTES_PER_CHANNEL / 2 ** 30, 3)
      } GiB to read in chunks of ${CHUNK_ROWS} rows; this machine allows ${readable} at once` +
        (listed === undefined ? " (choose them with --channels)" : ""),
    );
  }

  // The block: from --block, or --resolution (block = ceil(rate/df)).
  const machineBlock = largestBlock(channels, budget);
  const largest = Math.min(length, machineBlock);
  const why = (block: number) =>
    block > length
      ? `longer than ${record}`
      : `more than the spectral core may take on this machine for ${channels} channel(s) (${
        formatNumber(machineBlock, 6)
      } samples in ${formatNumber(budget / 2 ** 30, 3)} GiB)`;
  const block = numberAt(values, "block");
  if (block !== undefined && block > largest) {
    fail(`--block ${block} is ${why(block)}; the largest is ${largest}`);
  }
  const resolution = numberAt(values, "resolution");
  let resolvedBlock = block;
  if (resolution !== undefined) {
    resolvedBlock = Math.ceil(rate / resolution - 1e-9);
    if (resolvedBlock > largest) {
      fail(
        `--resolution ${resolution} Hz needs a block of ${resolvedBlock} samples, ${
          why(resolvedBlock)
        }; the finest is ${shown(rate / largest, "up")} Hz`,
      );
    }
  }

  // Frames of the spectrogram: K segments per frame need K segments in the record.
  const frames = numberAt(values, "frames");
  if (frames !== undefined) {
    const b = resolvedBlock ?? DEFAULT_BLOCK;
    const overlap = numberAt(values, "overlap") ?? 0.5;
    const hop = b - Math.floor(overlap * b);
    const segments = length >= b ? Math.floor((length - b) / hop) + 1 : 0;
    if (frames > segments) {
      fail(
        `--frames ${frames} asks for more segments per frame than ${record} holds: ${segments} of ${b} samples; the largest is ${segments}`,
      );
    }
  }

  // Output cells of a spectrogram, against the machine.
  const maxCells = numberAt(values, "max-cells");
  const cellsAllowed = Math.floor(budget / BYTES_PER_CELL);
  if (maxCells !== undefined && maxCells > cellsAllowed) {
    fail(
      `--max-cells ${maxCells} allows an output larger than this machine holds (${BYTES_PER_CELL} bytes a cell in ${
        formatNumber(budget / 2 ** 30, 3)
      } GiB); the largest is ${cellsAllowed}`,
    );
  }

  // Time steps and records that must fit in the record.
  const duration = length / rate;
  const step = numberAt(values, "step");
  if (step !== undefined && step > duration) {
    fail(
      `--step ${step} s is longer than ${record}; the largest is ${shown(duration, "down")} s`,
    );
  }
  const hammerRecord = numberAt(values, "record");
  if (hammerRecord !== undefined && hammerRecord > duration) {
    fail(
      `--record ${hammerRecord} s is longer than ${record}; the largest is ${
        shown(duration, "down")
      } s`,
    );
  }
  const pretrigger = numberAt(values, "pretrigger");
  if (pretrigger !== undefined && pretrigger > duration) {
    fail(
      `--pretrigger ${pretrigger} s is longer than ${record}; the largest is ${
        shown(duration, "down")
      } s`,
    );
  }

  // The lowest band (bands --min-hz): a band centred below 1/T has less than one cycle in
  // the record, and no line of any DFT of it but DC (line spacing ≥ rate/length = 1/T).
  const minHz = numberAt(values, "min-hz");
  if (minHz !== undefined && minHz < 1 / duration) {
    fail(
      `--min-hz ${minHz} is below one cycle in ${record}; the smallest is ${
        shown(1 / duration, "up")
      } Hz`,
    );
  }

  // The angle block of orders: R revolutions of S samples each.
  const revolutions = numberAt(values, "revolutions");
  const perRev = numberAt(values, "samples-per-rev");
  if (revolutions !== undefined && perRev !== undefined && revolutions * perRev > machineBlock) {
    fail(
      `--revolutions ${revolutions} × --samples-per-rev ${perRev} make an angle block of ${
        revolutions * perRev
      } samples, more than the largest, ${machineBlock}; the most revolutions at ${perRev} samples per revolution is ${
        Math.floor(machineBlock / perRev)
      }`,
    );
  }
  if (perRev !== undefined && perRev > machineBlock) {
    fail(`--samples-per-rev ${perRev} is more than the largest block, ${machineBlock}`);
  }

  // rpm steps, when the range is given (otherwise the speed is known only once
  // read, and the step is checked there against the same number).
  const rpmMin = numberAt(values, "rpm-min");
  const rpmMax = numberAt(values, "rpm-max");
  const rpmStep = numberAt(values, "rpm-step");
  if (rpmStep !== undefined && rpmMin !== undefined && rpmMax !== undefined && rpmMax > rpmMin) {
    const steps = wholeSteps((rpmMax - rpmMin) / rpmStep) + 1;
    if (steps > MAX_RPM_STEPS) {
      fail(
        `--rpm-step ${rpmStep} makes ${steps} rpm steps from ${rpmMin} to ${rpmMax}; quiver takes at most ${MAX_RPM_STEPS}, so the smallest step is ${
          shown((rpmMax - rpmMin) / (MAX_RPM_STEPS - 1), "up")
        }`,
      );
    }
  }
}

/** floor(q), except that a q within rounding (1e-12 relative) of a whole number is that number. */
function wholeSteps(q: number): number {
  const near = Math.round(q);
  return Math.abs(q - near) <= 1e-12 * Math.max(1, near) ? near : Math.floor(q);
}
