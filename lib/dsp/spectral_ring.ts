/**
 * The layout of the shared-memory ring between a reader and the spectral
 * worker (spectral_pipeline.ts writes it, spectral_worker.ts reads it): one
 * Int32Array of control words and one Float64Array of slots.
 *
 * @module
 */

/** Control word: slots written so far. */
export const WRITTEN = 0;
/** Control word: slots consumed so far. */
export const CONSUMED = 1;
/** First of the control words holding each slot's row count. */
export const LENGTHS = 2;
/** A slot's row count that tells the worker the record has ended. */
export const END = -1;
