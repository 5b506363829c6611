/**
 * What the spectral pipeline and its worker say to each other, in a module
 * of its own: the worker imports this and the core, not the pipeline (which
 * would load the readers into the worker's isolate for nothing).
 *
 * @module
 */
import type { SpectralEstimate, SpectralOptions } from "./spectral_core.ts";
import type { RingBuffers } from "../shared_ring.ts";
import type { PostedError } from "../workers.ts";
import type { ConverterScale } from "../io/recording.ts";
import type { StreamRecipe } from "../io/recording_stream.ts";

/** A channel whose signal checks (lib/io/signal_checks.ts) a worker makes on its share. */
export interface CheckedChannel {
  name: string;
  unit: string;
  fullScale?: ConverterScale;
}

/** The ring flag that tells the worker the record has ended. */
export const END_OF_RECORD = 1;

/**
 * The message that starts a worker. Its samples come either through `ring`
 * (a slot holds `slotRows` rows of each channel in turn) or, with `reopen`,
 * from the worker's own read of the file: the stream opened again from its
 * recipe and the stream's channels at `channels` read.
 */
export type SpectralWorkerStart =
  & WorkerGroup
  & (
    | { ring: RingBuffers; slotRows: number; reopen?: never }
    | { reopen: { recipe: StreamRecipe; channels: number[] }; ring?: never }
  );

/** What every start message holds: the group's channels, options and checks. */
export interface WorkerGroup {
  channelCount: number;
  options: Omit<SpectralOptions, "frames">;
  /** The group's channels, when the worker makes their signal checks too. */
  checks?: CheckedChannel[];
}

/** The worker's one reply. */
export type SpectralWorkerReply =
  | {
    estimate: SpectralEstimate;
    /** Each channel's signal warnings, when the start asked for checks. */
    warnings?: string[][];
  }
  | { error: PostedError };
