/**
 * Reading FRF tables for modal analysis: the CSV or JSON that `frf` and
 * `hammer` write (columns `R_re`, `R_im`, `R_mag`, `R_phase_deg`,
 * `R_coherence` per response R, metadata in the JSON or in the CSV's
 * `.meta.json` sidecar), or a plain table from elsewhere such as a solver
 * export: `frequency_hz` plus `re` and `im`, or `mag` (linear) with an
 * optional `phase_deg`, or `mag_db` (20·log10|H|).
 *
 * @module
 */
import { readSidecar } from "../io/table_file.ts";
import { readFile } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { type CsvTableOptions, type HeaderCell, parseNumericCsv } from "../io/csv_table.ts";
import { formOfResponseUnit, type FrfForm } from "../frf/forms.ts";

/** One FRF of the table. */
export interface FrfChannel {
  /** Response name (`frf` for a plain table). */
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

/** An FRF table ready for modal analysis. */
export interface FrfData {
  /** Frequencies, strictly increasing, Hz. */
  readonly frequencies: Float64Array;
  /** The FRFs. */
  readonly channels: readonly FrfChannel[];
  /** Exponential window time constant applied to the records, s, when known. */
  readonly expTau?: number;
  /** The table's own metadata, when it had any. */
  readonly metadata?: Readonly<Record<string, unknown>>;
}

/** A column as found in a file. */
interface NamedColumn {
  readonly name: string;
  readonly unit: string;
  readonly values: Float64Array;
}

const SUFFIXES = ["_re", "_im", "_mag", "_mag_db", "_phase_deg", "_coherence", "_random_error"];

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
  const prefixes: string[] = [];
  for (const c of columns) {
    const suffix = SUFFIXES.find((s) => c.name.endsWith(s) && c.name.length > s.length);
    if (suffix === undefined) continue;
    const prefix = c.name.slice(0, -suffix.length);
    if (!prefixes.includes(prefix)) prefixes.push(prefix);
  }
  const responseForms = new Map<string, FrfForm>();
  const responses = metadata?.responses;
  if (Array.isArray(responses)) {
    for (const r of responses) {
      if (typeof r?.name === "string" && typeof r?.form === "string") {
        responseForms.set(r.name, r.form);
      }
    }
  }
  const build = (
    name: string,
    get: (part: string) => NamedColumn | undefined,
  ): FrfChannel | undefined => {
    const re = get("re");
    const im = get("im");
    const mag = get("mag");
    const magDb = get("mag_db");
    const phase = get("phase_deg");
    if ((re === undefined) !== (im === undefined)) {
      fail(`FRF "${name}" has only one of its real and imaginary columns`);
    }
    let complex: { re: Float64Array; im: Float64Array } | undefined;
    if (re !== undefined && im !== undefined) complex = { re: re.values, im: im.values };
    const magnitudeSource = mag?.values ?? magDb?.values.map((v) => 10 ** (v / 20));
    if (complex === undefined && magnitudeSource !== undefined && phase !== undefined) {
      const rad = phase.values.map((d) => (d * Math.PI) / 180);
      complex = {
        re: magnitudeSource.map((m, k) => m * Math.cos(rad[k])),
        im: magnitudeSource.map((m, k) => m * Math.sin(rad[k])),
      };
    }
    const magnitude = complex !== undefined
      ? complex.re.map((v, k) => Math.hypot(v, (complex as { im: Float64Array }).im[k]))
      : magnitudeSource;
    if (magnitude === undefined) return undefined;
    const unit = (re ?? mag ?? magDb)?.unit ?? "";
    const form = responseForms.get(name) ?? formOfFrfUnit(unit);
    return {
      name,
      unit,
      magnitude,
      ...(complex !== undefined ? complex : {}),
      ...(get("coherence") !== undefined ? { coherence: get("coherence")?.values } : {}),
      ...(form !== undefined ? { form } : {}),
    };
  };
  const channels: FrfChannel[] = [];
  for (const prefix of prefixes) {
    const channel = build(prefix, (part) => byName.get(`${prefix}_${part}`));
    if (channel !== undefined) channels.push(channel);
  }
  if (channels.length === 0) {
    const plain = build("frf", (part) => byName.get(part));
    if (plain !== undefined) channels.push(plain);
  }
  if (channels.length === 0) {
    fail(
      'no FRF columns: expected R_re/R_im (or R_mag) per response, or plain "re"/"im", "mag" or "mag_db"',
    );
  }
  const tau = metadata?.exponential_window_tau_s;
  return {
    frequencies: f,
    channels,
    ...(typeof tau === "number" ? { expTau: tau } : {}),
    ...(metadata !== undefined ? { metadata } : {}),
  };
}

interface JsonTable {
  metadata?: Record<string, unknown>;
  columns: { name: string; unit?: string; values: number[] }[];
}

function isJsonTable(value: unknown): value is JsonTable {
  const v = value as JsonTable;
  return typeof v === "object" && v !== null && Array.isArray(v.columns) &&
    v.columns.every((c) => typeof c?.name === "string" && Array.isArray(c.values));
}

async function readText(path: string): Promise<string | undefined> {
  try {
    return await readFile(path, "utf8");
  } catch (error) {
    if ((error as { code?: string }).code === "ENOENT") return undefined;
    throw new QuiverError(`cannot read: ${(error as Error).message}`, { file: path }, "usage");
  }
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
  const text = await readText(path);
  if (text === undefined) {
    throw new QuiverError("cannot read: no such file", { file: path }, "usage");
  }
  if (text.trimStart().startsWith("{")) {
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch (error) {
      throw new QuiverError(`not valid JSON: ${(error as Error).message}`, { file: path });
    }
    if (!isJsonTable(json)) {
      throw new QuiverError("JSON without a columns array of {name, values}", { file: path });
    }
    const columns = json.columns.map((c, i) => {
      if (!c.values.every((v) => typeof v === "number" && Number.isFinite(v))) {
        throw new QuiverError(
          `column ${i + 1} ("${c.name}") holds values that are not finite numbers`,
          {
            file: path,
          },
        );
      }
      return { name: c.name, unit: c.unit ?? "", values: new Float64Array(c.values) };
    });
    return frfFromColumns(columns, json.metadata, path);
  }
  const table = parseNumericCsv(text, { ...options, file: path });
  const metadata = (await readSidecar(path, text, table.header))?.metadata;
  const columns = table.header.map((h: HeaderCell, i) => ({
    name: h.name,
    unit: h.unit,
    values: table.columns[i],
  }));
  return frfFromColumns(columns, metadata, path, table.lines);
}
