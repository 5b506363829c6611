/**
 * What `quiver diff` asks of an analysis's result, given by the analysis
 * itself (its descriptor's `diff`, lib/analysis_descriptor.ts): the lines of
 * a spectral result with the kind of quantity each column holds and the
 * degrees of freedom of its estimate, and the single values worth following
 * from build to build (modes, damping, levels). `quiver diff` branches on no
 * command's name.
 *
 * @module
 */
import type { ResultTable } from "../io/result_file.ts";

/**
 * The kind of quantity a result column holds, which says how a change is
 * put in dB and judged:
 * - `power`: a power-like value (PSD, power spectrum, band power): 10·lg of the ratio;
 * - `amplitude`: an amplitude (RMS or peak spectrum, order amplitude): 20·lg of the ratio
 *   (the ratio of their squares is the power ratio);
 * - `level`: a level in dB of a power quantity: the difference of the levels;
 * - `frf`: an FRF magnitude with its coherence: 20·lg, judged by its random error.
 */
export type DiffQuantity = "power" | "amplitude" | "level" | "frf";

/** One channel (or order, or response) of a spectral result. */
export interface SpectralDiffColumn {
  /** Its name in the diff's columns (a channel, `<channel>_order8`, a response). */
  readonly name: string;
  /** Its unit as the result gives it; a change of unit refuses the step. */
  readonly unit: string;
  readonly quantity: DiffQuantity;
  /** Its values on the result's lines. */
  readonly values: Float64Array;
  /**
   * Power, amplitude and level: the chi-square degrees of freedom of each
   * line's estimate (a number for all lines, or one per line); undefined
   * when the result does not say (the change is then given without a verdict).
   */
  readonly degreesOfFreedom?: number | Float64Array;
  /** FRF: the ordinary coherence γ² of each line. */
  readonly coherence?: Float64Array;
  /** FRF: the independent averages behind it (overlap accounted for). */
  readonly averages?: number;
}

/** A spectral result as `quiver diff` compares it. */
export interface SpectralDiffView {
  /** The columns that place a line (frequency; time or rpm and frequency), in order. */
  readonly grid: readonly {
    readonly name: string;
    readonly unit: string;
    readonly values: Float64Array;
  }[];
  readonly columns: readonly SpectralDiffColumn[];
  /** How the degrees of freedom were found, in words (for the summary). */
  readonly statistics: string;
}

/** One single value of a result: a mode's frequency or damping, a level. */
export interface SingleValue {
  /** Its name, unique in the result (`bracket_z mode 1 frequency`). */
  readonly name: string;
  readonly value: number;
  readonly unit: string;
}

/** What an analysis's descriptor gives `quiver diff` (either or both). */
export interface DiffModule {
  /** The result as lines of spectra; absent: the analysis has no spectral result. */
  readonly spectral?: (result: ResultTable) => SpectralDiffView;
  /** The single values of the result; absent: none. */
  readonly values?: (result: ResultTable) => readonly SingleValue[];
}
