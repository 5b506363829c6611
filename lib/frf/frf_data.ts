/**
 * The typed form of FRFs that analyses return (`frf`, `hammer`) and modal
 * analysis takes (`damping`): frequencies, and per response its name, unit,
 * form, complex H, |H| and coherence. A table file is only its edge.
 *
 * @module
 */
import type { FrfForm } from "./forms.ts";

/** One FRF: a response against the input. */
export interface FrfChannel {
  /** Response name (`frf` for a plain one-FRF table). */
  readonly name: string;
  /** Unit of H as given, "" when unknown. */
  readonly unit: string;
  /** Real part, when the table has phase. */
  readonly re?: Float64Array;
  /** Imaginary part, when the table has phase. */
  readonly im?: Float64Array;
  /** |H|. */
  readonly magnitude: Float64Array;
  /** Ordinary coherence, when the table has it. */
  readonly coherence?: Float64Array;
  /** The FRF form, from the metadata or the unit; undefined when neither says. */
  readonly form?: FrfForm;
}

/** FRFs on one frequency axis, as analyses return them and modal analysis takes them. */
export interface FrfData {
  /** Frequencies, strictly increasing, Hz. */
  readonly frequencies: Float64Array;
  /** The FRFs. */
  readonly channels: readonly FrfChannel[];
  /** Exponential window time constant applied to the records, s, when known. */
  readonly expTau?: number;
  /** The metadata of the table it was read from, when it had any. */
  readonly metadata?: Readonly<Record<string, unknown>>;
}
