/**
 * Curves for comparison: one function of frequency taken from a table that
 * quiver wrote (CSV with its `.meta.json` sidecar, or JSON) or a plain table
 * from a solver.
 *
 * Column choice for name C (or, without C, the first that fits):
 * - `C_re` and `C_im`: complex (an FRF from `frf`/`hammer`);
 * - `C_mag` (with `C_phase_deg` if present), or `C_mag_db`;
 * - a column named C: linear values, unless its unit starts with "dB";
 * - without C: plain `re`/`im`, `mag` (+ `phase_deg`), `mag_db` or `db`, else
 *   the first column after `frequency_hz`.
 *
 * Decibels: a column whose name ends in `_db` (or is `db`) or whose unit
 * starts with "dB" holds levels. Whether a curve is a power quantity (PSD,
 * autopower, band power: dB = 10·log10) or an amplitude (FRF, RMS, peak:
 * dB = 20·log10) comes from the table's metadata (`kind` psd or power), or
 * from the caller; the default is amplitude.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { CsvTableOptions } from "../io/csv_table.ts";
import { readResultFile } from "../io/result_file.ts";
import { RESULT_METADATA } from "../io/result_metadata.ts";

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
}

interface NamedColumn {
  readonly name: string;
  readonly unit: string;
  readonly values: Float64Array;
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
  const quantity = options.quantity ?? (kind === "psd" || kind === "power" ? "power" : "amplitude");
  const isDb = (c: NamedColumn) => /(^|_)db$/i.test(c.name) || /^dB/.test(c.unit);
  const fromDb = (v: Float64Array) => v.map((x) => 10 ** (x / (quantity === "power" ? 10 : 20)));
  const build = (prefix: string): Curve | undefined => {
    const p = prefix === "" ? "" : `${prefix}_`;
    const re = get(`${p}re`);
    const im = get(`${p}im`);
    if (re !== undefined && im !== undefined) {
      return {
        frequencies: f,
        re: re.values,
        im: im.values,
        magnitude: re.values.map((r, k) => Math.hypot(r, im.values[k])),
        quantity,
        unit: re.unit,
        column: prefix || "re/im",
      };
    }
    const mag = get(`${p}mag`);
    const phase = get(`${p}phase_deg`);
    if (mag !== undefined) {
      const magnitude = isDb(mag) ? fromDb(mag.values) : mag.values;
      if (phase !== undefined) {
        const rad = phase.values.map((d) => (d * Math.PI) / 180);
        return {
          frequencies: f,
          magnitude,
          re: magnitude.map((m, k) => m * Math.cos(rad[k])),
          im: magnitude.map((m, k) => m * Math.sin(rad[k])),
          quantity,
          unit: mag.unit,
          column: `${p}mag`,
        };
      }
      return { frequencies: f, magnitude, quantity, unit: mag.unit, column: `${p}mag` };
    }
    const db = get(`${p}mag_db`) ?? (prefix === "" ? get("db") : undefined);
    if (db !== undefined) {
      return {
        frequencies: f,
        magnitude: fromDb(db.values),
        quantity,
        unit: db.unit,
        column: db.name,
      };
    }
    return undefined;
  };
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
        `no response or column "${name}" in this FRF result; its responses are ${names.join(", ")}`,
      );
    }
  }
  if (options.column !== undefined) {
    const curve = build(options.column);
    if (curve !== undefined) return curve;
    const plain = get(options.column);
    if (plain === undefined) {
      fail(
        `no column "${options.column}" (nor ${options.column}_re/_im, _mag, _mag_db); the table has ${
          columns.map((c) => c.name).join(", ")
        }`,
      );
    }
    const c = plain as NamedColumn;
    return {
      frequencies: f,
      magnitude: isDb(c) ? fromDb(c.values) : c.values,
      quantity,
      unit: c.unit,
      column: c.name,
    };
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
  const c = first as NamedColumn;
  return {
    frequencies: f,
    magnitude: isDb(c) ? fromDb(c.values) : c.values,
    quantity,
    unit: c.unit,
    column: c.name,
  };
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
  return curveFromColumns(columns, { ...options, metadata: table.metadata, file: path });
}
