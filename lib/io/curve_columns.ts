/**
 * The column convention of foreign tables (a solver's export, a plain FRF
 * table): the one parser that both `compare` (curve_input.ts) and the modal
 * readers (frf_input.ts) use, as it is the only thing such a table can tell
 * us. For a name R (the stem; empty for plain columns):
 * - `R_re` and `R_im`: complex values (one without the other is refused);
 * - else `R_mag` (linear, or levels when its unit starts with "dB") with an
 *   optional `R_phase_deg`;
 * - else `R_mag_db` (for the empty stem also `mag_db` or `db`), levels,
 *   with an optional `R_phase_deg`;
 * - `R_coherence` beside them.
 *
 * Levels in dB are 10·log10 of a power quantity and 20·log10 of a
 * root-power (amplitude) quantity (ISO 80000-3); the caller says which.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";

/** A column as found in a file. */
export interface NamedColumn {
  readonly name: string;
  readonly unit: string;
  readonly values: Float64Array;
}

/** The suffixes of the convention, longest match not needed: none ends another. */
export const CURVE_SUFFIXES = [
  "_re",
  "_im",
  "_mag",
  "_mag_db",
  "_phase_deg",
  "_coherence",
  "_random_error",
] as const;

/** One curve read by the convention. */
export interface ConventionCurve {
  /** |value| (linear): as given in a magnitude column, else |re + i·im|. */
  readonly magnitude: Float64Array;
  /** Real part, when phase is known. */
  readonly re?: Float64Array;
  /** Imaginary part, when phase is known. */
  readonly im?: Float64Array;
  /** Coherence, when the table gives it. */
  readonly coherence?: Float64Array;
  /** Unit of the values as given. */
  readonly unit: string;
  /** Where it came from: the stem (`re/im` for plain complex columns), or the magnitude column. */
  readonly column: string;
  /** Whether the values were read from levels in dB. */
  readonly fromLevels: boolean;
}

/**
 * The stems that carry a suffix of the convention, in order of first
 * appearance.
 *
 * @example
 * ```ts
 * import { curveStems } from "./curve_columns.ts";
 * const names = ["frequency_hz", "a_re", "a_im", "b_mag_db", "c"];
 * if (curveStems(names.map((name) => ({ name }))).join() !== "a,b") throw new Error();
 * ```
 */
export function curveStems(columns: readonly { name: string }[]): string[] {
  const stems: string[] = [];
  for (const c of columns) {
    const suffix = CURVE_SUFFIXES.find((s) => c.name.endsWith(s) && c.name.length > s.length);
    if (suffix === undefined) continue;
    const stem = c.name.slice(0, -suffix.length);
    if (!stems.includes(stem)) stems.push(stem);
  }
  return stems;
}

/**
 * Whether a column holds levels in dB: its name ends in `_db` (or is `db`)
 * or its unit starts with "dB".
 *
 * @example
 * ```ts
 * import { holdsLevels } from "./curve_columns.ts";
 * if (!holdsLevels({ name: "spl", unit: "dB re 20 µPa" }) || holdsLevels({ name: "a", unit: "m" })) throw new Error();
 * ```
 */
export function holdsLevels(column: { name: string; unit: string }): boolean {
  return /(^|_)db$/i.test(column.name) || /^dB/.test(column.unit);
}

/**
 * Linear values of levels in dB: `10^(L/10)` for a power quantity,
 * `10^(L/20)` for an amplitude.
 *
 * @example
 * ```ts
 * import { fromLevels } from "./curve_columns.ts";
 * if (fromLevels(new Float64Array([20]), "amplitude")[0] !== 10) throw new Error();
 * if (fromLevels(new Float64Array([20]), "power")[0] !== 100) throw new Error();
 * ```
 */
export function fromLevels(levels: Float64Array, quantity: "power" | "amplitude"): Float64Array {
  return levels.map((x) => 10 ** (x / (quantity === "power" ? 10 : 20)));
}

/**
 * The curve of stem `stem` (see the module notes), or undefined when the
 * columns hold none.
 *
 * @throws {QuiverError} for a real part without its imaginary part, or the
 * other way round.
 *
 * @example
 * ```ts
 * import { curveOfStem } from "./curve_columns.ts";
 * const columns = [
 *   { name: "a_mag", unit: "m/N", values: new Float64Array([2]) },
 *   { name: "a_phase_deg", unit: "", values: new Float64Array([90]) },
 * ];
 * const c = curveOfStem(columns, "a", { quantity: "amplitude" })!;
 * if (c.magnitude[0] !== 2 || Math.abs(c.im![0] - 2) > 1e-15 || c.unit !== "m/N") throw new Error();
 * if (curveOfStem(columns, "b", { quantity: "amplitude" }) !== undefined) throw new Error();
 * ```
 */
export function curveOfStem(
  columns: readonly NamedColumn[],
  stem: string,
  options: {
    /** Which quantity levels in dB are of (10·log10 or 20·log10). */
    quantity: "power" | "amplitude";
    /** File for messages. Default: none named. */
    file?: string;
  },
): ConventionCurve | undefined {
  const p = stem === "" ? "" : `${stem}_`;
  const get = (part: string) => columns.find((c) => c.name === `${p}${part}`);
  const re = get("re");
  const im = get("im");
  const coherence = get("coherence")?.values;
  const extra = coherence !== undefined ? { coherence } : {};
  if ((re === undefined) !== (im === undefined)) {
    throw new QuiverError(
      `FRF "${stem || "frf"}" has only one of its real and imaginary columns`,
      { file: options.file },
    );
  }
  if (re !== undefined && im !== undefined) {
    return {
      re: re.values,
      im: im.values,
      magnitude: re.values.map((r, k) => Math.hypot(r, im.values[k])),
      unit: re.unit,
      column: stem || "re/im",
      fromLevels: false,
      ...extra,
    };
  }
  const mag = get("mag");
  const db = mag ?? get("mag_db") ?? (stem === "" ? get("db") : undefined);
  if (db === undefined) return undefined;
  const levels = mag === undefined || holdsLevels(mag);
  const magnitude = levels ? fromLevels(db.values, options.quantity) : db.values;
  const phase = get("phase_deg");
  const polar = phase === undefined ? {} : {
    re: magnitude.map((m, k) => m * Math.cos((phase.values[k] * Math.PI) / 180)),
    im: magnitude.map((m, k) => m * Math.sin((phase.values[k] * Math.PI) / 180)),
  };
  return { magnitude, ...polar, unit: db.unit, column: db.name, fromLevels: levels, ...extra };
}
