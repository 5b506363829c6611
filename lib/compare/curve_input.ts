/**
 * Curves for comparison: one function of frequency taken from a table that
 * quiver wrote (CSV with its `.meta.json` sidecar, or JSON) or a plain table
 * from a solver.
 *
 * Column choice for name C (or, without C, the first that fits): the
 * convention of foreign tables (curve_columns.ts: `C_re`/`C_im`, `C_mag`
 * with an optional `C_phase_deg`, `C_mag_db`), else
 * - a column named C: linear values, unless its unit starts with "dB";
 * - without C: plain `re`/`im`, `mag` (+ `phase_deg`), `mag_db` or `db`, else
 *   the first column after `frequency_hz`.
 *
 * Decibels: a column whose name ends in `_db` (or is `db`) or whose unit
 * starts with "dB" holds levels. Whether a curve is a power quantity (PSD,
 * power spectrum, band power: dB = 10·log10) or a root-power quantity (an
 * amplitude: FRF, RMS, peak: dB = 20·log10; ISO 80000-3,
 * IEC 60027-3:2002) comes, in this order, from the caller (`quantity`), the
 * table's metadata (a quiver spectrum's `kind` psd or power; an FRF), or the
 * unit ({@linkcode quantityOfUnit}); with none of them it is taken as an
 * amplitude and `quantitySource` says `default`, so the comparison can warn.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { CsvTableOptions } from "../io/csv_table.ts";
import {
  curveOfStem,
  curveStems,
  fromLevels,
  holdsLevels,
  type NamedColumn,
} from "../io/curve_columns.ts";
import { readResultFile } from "../io/result_file.ts";
import { RESULT_METADATA } from "../io/result_metadata.ts";
import { didYouMean } from "../nearest_name.ts";

/** A curve: frequency and value, complex when phase is known. */
export interface Curve {
  /** Frequencies, Hz, increasing. */
  readonly frequencies: Float64Array;
  /** |value| (linear), per line. */
  readonly magnitude: Float64Array;
  /** Real part, when phase is known. */
  readonly re?: Float64Array;
  /** Imaginary part, when phase is known. */
  readonly im?: Float64Array;
  /** `power` quantities take 10·log10 in dB, `amplitude` ones 20·log10. */
  readonly quantity: "power" | "amplitude";
  /** Unit of the values as given. */
  readonly unit: string;
  /** The column the curve came from. */
  readonly column: string;
  /** The file the curve came from, for messages. Default: none named. */
  readonly file?: string;
  /**
   * Where `quantity` came from: the caller, the metadata, the unit, or a
   * default (amplitude, for want of any of them). Default: `default`.
   */
  readonly quantitySource?: QuantitySource;
  /** Whether the values were read as levels in dB (so a change of quantity changes them). */
  readonly fromLevels?: boolean;
}

/** Where a curve's power/amplitude quantity was learnt. */
export type QuantitySource = "option" | "metadata" | "unit" | "default";

/** A unit as a product of named factors with exponents, or undefined when it does not parse. */
function unitExponents(unit: string): Map<string, number> | undefined {
  // Spaces around operators go; a space inside a name ("foo bar") makes it no unit.
  const text = unit.trim().replace(/\s*([/*·^()])\s*/g, "$1").replace(/²/g, "^2")
    .replace(/√/g, "sqrt");
  let at = 0;
  const add = (into: Map<string, number>, from: Map<string, number>, power: number) => {
    for (const [name, e] of from) into.set(name, (into.get(name) ?? 0) + e * power);
  };
  // expr := term ('/' term)* ; term := factor (('*'|'·') factor)* ;
  // factor := atom ('^' integer)? ; atom := name | '1' | '(' expr ')' | 'sqrt' atom
  const expr = (): Map<string, number> | undefined => {
    const result = new Map<string, number>();
    const first = term();
    if (first === undefined) return undefined;
    add(result, first, 1);
    while (text[at] === "/") {
      at++;
      const next = term();
      if (next === undefined) return undefined;
      add(result, next, -1);
    }
    return result;
  };
  const term = (): Map<string, number> | undefined => {
    const result = new Map<string, number>();
    for (;;) {
      const f = factor();
      if (f === undefined) return undefined;
      add(result, f, 1);
      if (text[at] !== "*" && text[at] !== "·") return result;
      at++;
    }
  };
  const factor = (): Map<string, number> | undefined => {
    const a = atom();
    if (a === undefined) return undefined;
    if (text[at] !== "^") return a;
    const m = /^\^(?:\((-?\d+)\)|(-?\d+))/.exec(text.slice(at));
    if (m === null) return undefined;
    at += m[0].length;
    const result = new Map<string, number>();
    add(result, a, Number(m[1] ?? m[2]));
    return result;
  };
  const atom = (): Map<string, number> | undefined => {
    if (text.startsWith("sqrt", at)) {
      at += 4;
      const a = atom();
      if (a === undefined) return undefined;
      const result = new Map<string, number>();
      add(result, a, 0.5);
      return result;
    }
    if (text[at] === "(") {
      at++;
      const inner = expr();
      if (inner === undefined || text[at] !== ")") return undefined;
      at++;
      return inner;
    }
    if (text[at] === "1") {
      at++;
      return new Map();
    }
    const m = /^[A-Za-zµμΩ°%]+/.exec(text.slice(at));
    if (m === null) return undefined;
    at += m[0].length;
    return new Map([[m[0], 1]]);
  };
  const parsed = expr();
  if (parsed === undefined || at !== text.length) return undefined;
  for (const [name, e] of parsed) if (e === 0) parsed.delete(name);
  return parsed;
}

/**
 * Power or root-power (amplitude) quantity, read from a unit, with the
 * reason; undefined when the unit says nothing (empty, a level in dB, or not
 * a product of named factors with integer powers).
 *
 * The rule (ISO 80000-3, IEC 60027-3:2002: a power quantity is
 * proportional to the square of a root-power quantity): after one factor 1/Hz
 * is set aside as a density, a unit whose every factor has an even exponent,
 * such as `(m/s^2)^2`, `FS^2`, `m^2/s^4` or `Pa^2`, is the square of another
 * and names a power quantity; so do watt and joule (`W`, `W/m^2`, `J`). Any
 * other unit, such as `m/s^2` (whose `^2` squares only the second), `m/N`
 * or `Pa`, names a root-power quantity.
 *
 * @example
 * ```ts
 * import { quantityOfUnit } from "./curve_input.ts";
 * if (quantityOfUnit("(m/s^2)^2/Hz")?.quantity !== "power") throw new Error();
 * if (quantityOfUnit("m/s^2")?.quantity !== "amplitude") throw new Error();
 * if (quantityOfUnit("dB") !== undefined || quantityOfUnit("") !== undefined) throw new Error();
 * ```
 */
export function quantityOfUnit(
  unit: string,
): { quantity: "power" | "amplitude"; reason: string } | undefined {
  if (unit.trim() === "" || /^dB/i.test(unit.trim())) return undefined;
  const factors = unitExponents(unit);
  if (factors === undefined) return undefined;
  const density = factors.get("Hz") === -1;
  if (density) factors.delete("Hz");
  if (factors.size === 0) return undefined;
  const per = density ? " per Hz (a density)" : "";
  for (const [name, e] of factors) {
    if (/^[pnµμmkMG]?[WJ]$/.test(name) && e === 1) {
      return { quantity: "power", reason: `[${unit}] is a power or energy${per}` };
    }
  }
  const even = Array.from(factors.values()).every((e) => Number.isInteger(e / 2));
  return even
    ? { quantity: "power", reason: `[${unit}] is a squared unit${per}: a power quantity` }
    : { quantity: "amplitude", reason: `[${unit}] is a root-power (amplitude) unit` };
}

/**
 * The same curve as another quantity: relabelled, and for values read as
 * levels in dB re-read from those levels (a power is the square of the
 * amplitude of the same level).
 *
 * @example
 * ```ts
 * import { withQuantity } from "./curve_input.ts";
 * const c = { frequencies: new Float64Array([1]), magnitude: new Float64Array([10]), quantity: "amplitude" as const,
 *   unit: "", column: "db", fromLevels: true };
 * if (withQuantity(c, "power", "option").magnitude[0] !== 100) throw new Error();
 * ```
 */
export function withQuantity(
  curve: Curve,
  quantity: "power" | "amplitude",
  source: QuantitySource,
): Curve {
  if (curve.quantity === quantity || curve.fromLevels !== true) {
    return { ...curve, quantity, quantitySource: source };
  }
  const magnitude = curve.magnitude.map((m) => quantity === "power" ? m * m : Math.sqrt(m));
  if (curve.re === undefined || curve.im === undefined) {
    return { ...curve, magnitude, quantity, quantitySource: source };
  }
  const { re, im } = curve;
  const angle = re.map((r, k) => Math.atan2(im[k], r));
  return {
    ...curve,
    magnitude,
    re: angle.map((a, k) => magnitude[k] * Math.cos(a)),
    im: angle.map((a, k) => magnitude[k] * Math.sin(a)),
    quantity,
    quantitySource: source,
  };
}

/** The names a column option may give: each column's, and the stems of the convention. */
function curveNames(columns: readonly { name: string }[]): string[] {
  const names = columns.map((c) => c.name).filter((n) => n !== "frequency_hz");
  return [...new Set([...curveStems(columns), ...names])];
}

/**
 * Picks a curve out of named columns.
 *
 * @throws {QuiverError} when no frequency column or no fitting column exists.
 *
 * @example
 * ```ts
 * import { curveFromColumns } from "./curve_input.ts";
 * const c = curveFromColumns([
 *   { name: "frequency_hz", unit: "", values: new Float64Array([1, 2]) },
 *   { name: "mag_db", unit: "", values: new Float64Array([0, 20]) }]);
 * if (c.magnitude[1] !== 10) throw new Error();
 * ```
 */
export function curveFromColumns(
  columns: readonly NamedColumn[],
  options: {
    column?: string;
    quantity?: "power" | "amplitude";
    metadata?: Readonly<Record<string, unknown>>;
    file?: string;
  } = {},
): Curve {
  const fail = (detail: string): never => {
    throw new QuiverError(detail, { file: options.file });
  };
  const get = (name: string) => columns.find((c) => c.name === name);
  const frequency = get("frequency_hz") ?? get("center_hz");
  if (frequency === undefined) fail('no "frequency_hz" (or "center_hz") column');
  const f = (frequency as NamedColumn).values;
  for (let k = 1; k < f.length; k++) {
    if (!(f[k] > f[k - 1])) fail(`frequencies must increase, but ${f[k]} follows ${f[k - 1]} Hz`);
  }
  // quiver's own results say what they hold; a foreign table is read by its column names.
  const spectrum = RESULT_METADATA.spectrum.safeParse(options.metadata ?? {});
  const frfResult = RESULT_METADATA.frf.safeParse(options.metadata ?? {});
  const kind = spectrum.success ? spectrum.data.kind : undefined;
  const declared: { quantity: "power" | "amplitude"; source: QuantitySource } | undefined =
    options.quantity !== undefined
      ? { quantity: options.quantity, source: "option" }
      : spectrum.success || frfResult.success
      ? { quantity: kind === "psd" || kind === "power" ? "power" : "amplitude", source: "metadata" }
      : undefined;
  const quantity = declared?.quantity ?? "amplitude";
  // A linear column's unit may name the quantity; levels in dB need it given.
  const finish = (curve: Curve, fromLevels: boolean): Curve => {
    if (declared !== undefined) return { ...curve, quantitySource: declared.source, fromLevels };
    const byUnit = fromLevels ? undefined : quantityOfUnit(curve.unit);
    return byUnit !== undefined
      ? { ...curve, quantity: byUnit.quantity, quantitySource: "unit", fromLevels }
      : { ...curve, quantitySource: "default", fromLevels };
  };
  const build = (prefix: string): Curve | undefined => {
    const found = curveOfStem(columns, prefix, { quantity, file: options.file });
    if (found === undefined) return undefined;
    const { coherence: _, fromLevels: levels, ...curve } = found;
    return finish({ frequencies: f, quantity, ...curve }, levels);
  };
  const plainColumn = (c: NamedColumn): Curve =>
    finish({
      frequencies: f,
      magnitude: holdsLevels(c) ? fromLevels(c.values, quantity) : c.values,
      quantity,
      unit: c.unit,
      column: c.name,
    }, holdsLevels(c));
  if (frfResult.success) {
    // An FRF quiver wrote: a response by the name its metadata lists (default the first).
    const names = frfResult.data.responses.map((r) => r.name);
    const name = options.column ?? names[0];
    if (names.includes(name)) {
      const curve = build(name);
      if (curve === undefined) fail(`response "${name}" lacks its ${name}_re/${name}_im columns`);
      return curve as Curve;
    }
    if (get(name) === undefined) {
      fail(
        `no response or column "${name}"${
          didYouMean(name, names)
        } in this FRF result; its responses are ${names.join(", ")}`,
      );
    }
  }
  if (options.column !== undefined) {
    const curve = build(options.column);
    if (curve !== undefined) return curve;
    const plain = get(options.column);
    if (plain === undefined) {
      fail(
        `no column "${options.column}"${
          didYouMean(options.column, curveNames(columns))
        } (nor ${options.column}_re/_im, _mag, _mag_db); the table has ${
          columns.map((c) => c.name).join(", ")
        }`,
      );
    }
    return plainColumn(plain as NamedColumn);
  }
  const plain = build("");
  if (plain !== undefined) return plain;
  for (const c of columns) {
    const m = /^(.*)_(re|mag)$/.exec(c.name);
    if (m !== null) {
      const curve = build(m[1]);
      if (curve !== undefined) return curve;
    }
  }
  const first = columns.find((c) =>
    c !== frequency && !["nominal_hz", "lower_hz", "upper_hz"].includes(c.name)
  );
  if (first === undefined) fail("no value column besides the frequencies");
  return plainColumn(first as NamedColumn);
}

/**
 * Reads a curve from a quiver table (CSV + sidecar, or JSON) or a plain CSV.
 *
 * @throws {QuiverError} for unreadable or unsuitable files.
 *
 * @example
 * ```ts
 * import { readCurveFile } from "./curve_input.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/sim.csv`, "frequency_hz,mag [m/N],phase_deg\n10,2,0\n20,1,90\n");
 * const c = await readCurveFile(`${dir}/sim.csv`);
 * if (c.unit !== "m/N" || Math.abs(c.im![1] - 1) > 1e-12) throw new Error();
 * ```
 */
export async function readCurveFile(
  path: string,
  options: { column?: string; quantity?: "power" | "amplitude" } & CsvTableOptions = {},
): Promise<Curve> {
  const table = await readResultFile(path, options);
  const columns = table.columns.flatMap((c) =>
    c.values instanceof Float64Array ? [{ name: c.name, unit: c.unit, values: c.values }] : []
  );
  return {
    ...curveFromColumns(columns, { ...options, metadata: table.metadata, file: path }),
    file: path,
  };
}
