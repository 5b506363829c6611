/**
 * quiver's exit codes, in one place.
 *
 * @module
 */

/** Done. */
export const EXIT_DONE = 0;
/** Bad data (a QuiverError of kind "data", or a failed campaign step). */
export const EXIT_DATA = 1;
/** Wrong usage: an option or argument problem. */
export const EXIT_USAGE = 2;
/** A bug of ours. */
export const EXIT_INTERNAL = 3;
/** Targets not all met, when the caller asked for it (`--require-targets`). */
export const TARGETS_NOT_MET_EXIT = 4;
