/**
 * Reading FRF tables for modal analysis.
 *
 * - What `frf` and `hammer` write (JSON, or CSV with its `.meta.json`
 *   sidecar): the metadata lists the responses with their forms
 *   (result_metadata.ts), and each response R's columns are read by their
 *   exact names `R_re`, `R_im`, `R_coherence`.
 * - A plain table from elsewhere, such as a solver export, without quiver
 *   metadata: `frequency_hz` plus the columns of the convention of foreign
 *   tables (curve_columns.ts, shared with `compare`): `re` and `im`, or
 *   `mag` with an optional `phase_deg`, or `mag_db` (20·log10|H|: an FRF is
 *   an amplitude); several FRFs as `R_re`/`R_im` (or `R_mag`, `R_mag_db`,
 *   `R_phase_deg`) per name R.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { CsvTableOptions } from "../io/csv_table.ts";
import { curveOfStem, curveStems, type NamedColumn } from "../io/curve_columns.ts";
import { readResultFile } from "../io/result_file.ts";
import { RESULT_METADATA } from "../io/result_metadata.ts";
import { formOfResponseUnit, type FrfForm } from "../frf/forms.ts";

export type { FrfChannel, FrfData } from "../frf/frf_data.ts";
import type { FrfChannel, FrfData } from "../frf/frf_data.ts";

/**
 * The response form implied by an FRF unit such as `(m/s^2)/N` or `m/N`.
 *
 * @example
 * ```ts
 * import { formOfFrfUnit } from "./frf_input.ts";
 * if (formOfFrfUnit("(m/s^2)/N") !== "accelerance" || formOfFrfUnit("m/N") !== "receptance") throw new Error();
 * ```
 */
export function formOfFrfUnit(unit: string): FrfForm | undefined {
  const wrapped = /^\((.+)\)\/[^/]+$/.exec(unit.trim());
  if (wrapped !== null) return formOfResponseUnit(wrapped[1]);
  const plain = /^([^/()]+)\/[^/]+$/.exec(unit.trim());
  return plain === null ? undefined : formOfResponseUnit(plain[1]);
}

/**
 * Builds FRF data from named columns and optional metadata.
 *
 * @throws {QuiverError} when no frequency column or no FRF column is found,
 * or frequencies do not increase.
 *
 * @example
 * ```ts
 * import { frfFromColumns } from "./frf_input.ts";
 * const d = frfFromColumns([
 *   { name: "frequency_hz", unit: "", values: new Float64Array([1, 2]) },
 *   { name: "mag", unit: "m/N", values: new Float64Array([3, 4]) }]);
 * if (d.channels[0].name !== "frf" || d.channels[0].form !== "receptance") throw new Error();
 * ```
 */
export function frfFromColumns(
  columns: readonly NamedColumn[],
  metadata?: Readonly<Record<string, unknown>>,
  file?: string,
  lines?: readonly number[],
): FrfData {
  const fail = (detail: string, line?: number): never => {
    throw new QuiverError(detail, { file, line });
  };
  const frequency = columns.find((c) => c.name === "frequency_hz");
  if (frequency === undefined) fail('no "frequency_hz" column');
  const f = (frequency as NamedColumn).values;
  for (let k = 1; k < f.length; k++) {
    if (!(f[k] > f[k - 1])) {
      fail(`frequencies must increase, but ${f[k]} follows ${f[k - 1]} Hz`, lines?.[k]);
    }
  }
  const byName = new Map(columns.map((c) => [c.name, c]));
  const quiver = RESULT_METADATA.frf.safeParse(metadata ?? {});
  const responseForms = new Map<string, FrfForm>();
  let names: string[];
  if (quiver.success) {
    // quiver's own FRF: the responses and their forms are listed; their columns have fixed names.
    names = quiver.data.responses.map((r) => r.name);
    for (const r of quiver.data.responses) if (r.form !== null) responseForms.set(r.name, r.form);
    for (const name of names) {
      if (!byName.has(`${name}_re`) || !byName.has(`${name}_im`)) {
        fail(`the metadata lists response "${name}" but the table lacks ${name}_re or ${name}_im`);
      }
    }
  } else {
    // A foreign table: FRFs by the naming convention R_re/R_im, R_mag, R_mag_db.
    names = curveStems(columns);
  }
  const build = (stem: string): FrfChannel | undefined => {
    const curve = curveOfStem(columns, stem, { quantity: "amplitude", file });
    if (curve === undefined) return undefined;
    const { re, im, coherence, unit } = curve;
    const name = stem || "frf";
    const form = responseForms.get(name) ?? formOfFrfUnit(unit);
    return {
      name,
      unit,
      // A channel's magnitude is |H| whenever its phase is known.
      magnitude: re !== undefined && im !== undefined
        ? re.map((v, k) => Math.hypot(v, im[k]))
        : curve.magnitude,
      ...(re !== undefined && im !== undefined ? { re, im } : {}),
      ...(coherence !== undefined ? { coherence } : {}),
      ...(form !== undefined ? { form } : {}),
    };
  };
  const channels: FrfChannel[] = [];
  for (const prefix of names) {
    const channel = build(prefix);
    if (channel !== undefined) channels.push(channel);
  }
  if (channels.length === 0 && !quiver.success) {
    const plain = build("");
    if (plain !== undefined) channels.push(plain);
  }
  if (channels.length === 0) {
    fail(
      'no FRF columns: expected R_re/R_im (or R_mag) per response, or plain "re"/"im", "mag" or "mag_db"',
    );
  }
  const tau = quiver.success ? quiver.data.exponential_window_tau_s : undefined;
  return {
    frequencies: f,
    channels,
    ...(typeof tau === "number" ? { expTau: tau } : {}),
    ...(metadata !== undefined ? { metadata } : {}),
  };
}

/**
 * Reads an FRF table: quiver JSON, or CSV with its `.meta.json` sidecar when
 * there is one.
 *
 * @throws {QuiverError} for unreadable or malformed files.
 *
 * @example
 * ```ts
 * import { readFrfFile } from "./frf_input.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/solver.csv`, "frequency_hz,re [m/N],im [m/N]\n1,0.5,0\n2,0,-1\n");
 * const data = await readFrfFile(`${dir}/solver.csv`);
 * if (data.channels[0].magnitude[1] !== 1 || data.channels[0].form !== "receptance") throw new Error();
 * ```
 */
export async function readFrfFile(path: string, options: CsvTableOptions = {}): Promise<FrfData> {
  const table = await readResultFile(path, options);
  const columns = table.columns.map((c, i) => {
    if (!(c.values instanceof Float64Array)) {
      throw new QuiverError(`column ${i + 1} ("${c.name}") holds text, not numbers`, {
        file: path,
      });
    }
    return { name: c.name, unit: c.unit, values: c.values };
  });
  return frfFromColumns(columns, table.metadata, path, table.lines);
}
