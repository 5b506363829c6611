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

/** The ring flag that tells the worker the record has ended. */
export const END_OF_RECORD = 1;

/** The message that starts a worker: a ring slot holds `slotRows` rows of each channel in turn. */
export interface SpectralWorkerStart {
  channelCount: number;
  options: Omit<SpectralOptions, "frames">;
  ring: RingBuffers;
  slotRows: number;
}

/** The worker's one reply. */
export type SpectralWorkerReply =
  | { estimate: SpectralEstimate }
  | { error: PostedError };
