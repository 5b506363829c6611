/**
 * The spectral core behind a reader: a recording's channels read chunk by
 * chunk straight into one {@linkcode SpectralAccumulator}, in this thread.
 * (Transforms on a second core were measured on the project's 2-core
 * machine and gave no gain worth a worker: README, Performance.)
 *
 * @module
 */
import {
  SpectralAccumulator,
  type SpectralEstimate,
  type SpectralOptions,
} from "./spectral_core.ts";
import { readChecked, type RecordingStream } from "../io/recording_stream.ts";

/**
 * Reads the channels at `indices` of `stream` through the spectral core and
 * returns the estimate with the signal warnings of the read.
 *
 * @throws {RangeError} for impossible options, before anything is read;
 * {@linkcode QuiverError} as the reader and the core do.
 *
 * @example
 * ```ts
 * import { spectralEstimateOf } from "./spectral_pipeline.ts";
 * import { recordingSource } from "../io/recording_stream.ts";
 * const data = new Float64Array(1024).map((_, i) => Math.sin(i));
 * const stream = recordingSource({ rate: 256, startTime: 0, channels: [{ name: "a", unit: "V", data }] });
 * const { estimate } = await spectralEstimateOf(stream, [0], { rate: 256, block: 256 });
 * if (estimate.averages !== 7) throw new Error();
 * ```
 */
export async function spectralEstimateOf(
  stream: RecordingStream,
  indices: readonly number[],
  options: SpectralOptions,
): Promise<{ estimate: SpectralEstimate; warnings: string[] }> {
  const accumulator = new SpectralAccumulator(indices.length, options);
  const warnings = await readChecked(stream, indices, (chunk) => accumulator.push(chunk));
  return { estimate: accumulator.finish(), warnings };
}
