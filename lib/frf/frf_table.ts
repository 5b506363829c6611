/**
 * The FRF table layout shared by `frf` and `hammer`: `frequency_hz`, then for
 * each response R the columns `R_re`, `R_im`, `R_mag`, `R_phase_deg`,
 * `R_coherence` and `R_random_error`.
 *
 * @module
 */
import type { TableColumn } from "../io/table.ts";
import { type ComplexSpectrum, randomError } from "./estimators.ts";

/** Everything the table holds about one response. */
export interface ResponseFrf {
  /** Response channel name. */
  readonly name: string;
  /** Unit of the FRF, e.g. `(m/s^2)/N`. */
  readonly unit: string;
  /** The FRF. */
  readonly h: ComplexSpectrum;
  /** Ordinary coherence per line. */
  readonly coherence: Float64Array;
}

/**
 * The six columns of one response, computing magnitude, phase and the
 * normalised random error for `averages` averages.
 *
 * @example
 * ```ts
 * import { responseColumns } from "./frf_table.ts";
 * const cols = responseColumns({ name: "hub", unit: "m/N",
 *   h: { re: new Float64Array([0]), im: new Float64Array([2]) }, coherence: new Float64Array([1]) }, 10);
 * if (cols[2].values[0] !== 2 || cols[3].values[0] !== 90) throw new Error();
 * ```
 */
export function responseColumns(response: ResponseFrf, averages: number): TableColumn[] {
  const { name, unit, h, coherence } = response;
  return [
    { name: `${name}_re`, unit, values: h.re },
    { name: `${name}_im`, unit, values: h.im },
    { name: `${name}_mag`, unit, values: h.re.map((re, k) => Math.hypot(re, h.im[k])) },
    {
      name: `${name}_phase_deg`,
      unit: "deg",
      values: h.re.map((re, k) => (Math.atan2(h.im[k], re) * 180) / Math.PI),
    },
    { name: `${name}_coherence`, unit: "", values: coherence },
    { name: `${name}_random_error`, unit: "", values: randomError(coherence, averages) },
  ];
}
