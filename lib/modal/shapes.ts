/**
 * Mode-shape sets and their correlation (`quiver mac`).
 *
 * A shapes file is a tidy CSV, one row per mode and degree of freedom:
 * - complex shapes, as a modal fit writes them: `mode, point, direction,
 *   re, im`, optionally with `frequency_hz`;
 * - real shapes, as a simulation exports them: `mode, frequency_hz, point,
 *   direction, value`.
 * A degree of freedom is the pair (point, direction), matched by name
 * between the two sets, or through a map CSV with the columns
 * `simulation_point, simulation_direction, test_point, test_direction`.
 * Degrees of freedom found on one side only are left out and counted.
 *
 * @module
 */
import { resolve } from "node:path";
import { readFile } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { readResultFile } from "../io/result_file.ts";
import { type CsvDelimiter, numberOfTextCell, parseTextCsv } from "../io/csv_table.ts";
import type { Table } from "../io/table.ts";
import type { MacMetadata } from "./mac_metadata.ts";
import { bestPairing, type ComplexVector, macMatrix } from "./mac.ts";

/** One mode of a set. */
export interface ModeShape {
  /** Mode number as the file gives it. */
  readonly mode: number;
  /** Natural frequency, Hz, when the file gives it. */
  readonly frequencyHz?: number;
  /** Shape value per degree of freedom, keyed `point direction`. */
  readonly values: ReadonlyMap<string, { re: number; im: number }>;
}

/** A degree of freedom's key: point and direction. */
export const dofKey = (point: string, direction: string): string => `${point} ${direction}`;

/**
 * Reads a shapes file (see the module notes for its two layouts).
 *
 * @throws {QuiverError} for a missing column, a cell that is not a number,
 * a degree of freedom given twice in a mode, or a mode with two frequencies.
 *
 * @example
 * ```ts
 * import { parseShapes } from "./shapes.ts";
 * const s = parseShapes("mode,frequency_hz,point,direction,value\n1,44.1,1,z,0.5\n1,44.1,2,z,1\n");
 * if (s[0].frequencyHz !== 44.1 || s[0].values.get("2 z")?.re !== 1) throw new Error();
 * ```
 */
export function parseShapes(text: string, options: { file?: string } = {}): ModeShape[] {
  const table = parseTextCsv(text, options);
  return shapesFromColumns(
    table.header.map((h, c) => ({ name: h.name, values: table.rows.map((r) => r[c]) })),
    { file: options.file, lines: table.lines, delimiter: table.delimiter },
  );
}

/**
 * Mode shapes from named columns of text or numbers (a text CSV, or a
 * quiver JSON table such as `modal --shapes-out` writes).
 *
 * @throws {QuiverError} as {@linkcode parseShapes}.
 *
 * @example
 * ```ts
 * import { shapesFromColumns } from "./shapes.ts";
 * const s = shapesFromColumns([{ name: "mode", values: new Float64Array([1, 1]) }, { name: "point", values: ["a", "b"] },
 *   { name: "direction", values: ["z", "z"] }, { name: "re", values: new Float64Array([1, -1]) }, { name: "im", values: new Float64Array(2) }]);
 * if (s[0].values.get("b z")?.re !== -1) throw new Error();
 * ```
 */
export function shapesFromColumns(
  columns: readonly { name: string; values: readonly string[] | Float64Array }[],
  options: { file?: string; lines?: readonly number[]; delimiter?: CsvDelimiter } = {},
): ModeShape[] {
  const rowCount = columns[0]?.values.length ?? 0;
  const table = {
    rows: Array.from({ length: rowCount }, (_, r) => columns.map((c) => String(c.values[r]))),
    lines: options.lines ?? Array.from({ length: rowCount }, (_, r) => r + 2),
  };
  const names = columns.map((c) => c.name);
  const at = (name: string) => names.indexOf(name);
  const complex = at("re") >= 0 && at("im") >= 0;
  const needed = ["mode", "point", "direction", ...(complex ? ["re", "im"] : ["value"])];
  const missing = needed.filter((n) => at(n) < 0);
  if (missing.length > 0) {
    throw new QuiverError(
      `a shapes table needs the columns mode, point, direction and re, im (or value); missing ${
        missing.join(", ")
      }`,
      { file: options.file },
    );
  }
  type Entry = { frequencyHz?: number; values: Map<string, { re: number; im: number }> };
  const modes = new Map<number, Entry>();
  table.rows.forEach((row, r) => {
    const line = table.lines[r];
    const number = (column: string) => {
      const text = row[at(column)];
      const value = numberOfTextCell(text, options.delimiter ?? ",");
      if (value === undefined) {
        throw new QuiverError(`${column} "${text}" is not a number`, { file: options.file, line });
      }
      return value;
    };
    const mode = number("mode");
    const frequency = at("frequency_hz") >= 0 ? number("frequency_hz") : undefined;
    const entry: Entry = modes.get(mode) ?? { values: new Map() };
    if (!modes.has(mode)) {
      if (frequency !== undefined) entry.frequencyHz = frequency;
      modes.set(mode, entry);
    } else if (frequency !== entry.frequencyHz) {
      throw new QuiverError(`mode ${mode} has two frequencies`, { file: options.file, line });
    }
    const key = dofKey(row[at("point")], row[at("direction")]);
    if (entry.values.has(key)) {
      throw new QuiverError(`mode ${mode} gives point ${key} twice`, { file: options.file, line });
    }
    entry.values.set(
      key,
      complex ? { re: number("re"), im: number("im") } : { re: number("value"), im: 0 },
    );
  });
  if (modes.size === 0) {
    throw new QuiverError("the shapes table has no rows", { file: options.file });
  }
  return [...modes.entries()].sort((a, b) => a[0] - b[0]).map(([mode, m]) => ({
    mode,
    ...(m.frequencyHz !== undefined ? { frequencyHz: m.frequencyHz } : {}),
    values: m.values,
  }));
}

/**
 * Reads a shapes file: a text CSV, or a quiver JSON table (`modal
 * --shapes-out` with a `.json` name).
 *
 * @throws {QuiverError} for an unreadable file or one that is not a shapes table.
 *
 * @example
 * ```ts
 * import { readShapesFile } from "./shapes.ts";
 * import { mkdtemp, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/s.json`, JSON.stringify({ metadata: {}, columns: [{ name: "mode", unit: "", values: [1, 1] },
 *   { name: "point", unit: "", values: ["a", "b"] }, { name: "direction", unit: "", values: ["", ""] },
 *   { name: "re", unit: "", values: [1, 0.5] }, { name: "im", unit: "", values: [0, 0] }] }));
 * if ((await readShapesFile(`${dir}/s.json`))[0].values.get("b ")?.re !== 0.5) throw new Error();
 * ```
 */
export async function readShapesFile(path: string): Promise<ModeShape[]> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (error) {
    throw new QuiverError(
      `cannot read: ${(error as Error).message}`,
      { file: resolve(path) },
      "usage",
    );
  }
  if (!text.trimStart().startsWith("{")) return parseShapes(text, { file: path });
  const table = await readResultFile(path);
  return shapesFromColumns(table.columns, { file: path });
}

/**
 * Reads a point map: simulation degree of freedom → test degree of freedom.
 *
 * @throws {QuiverError} for a missing column or a simulation point mapped twice.
 *
 * @example
 * ```ts
 * import { parsePointMap } from "./shapes.ts";
 * const m = parsePointMap("simulation_point,simulation_direction,test_point,test_direction\nN1041,Z,12,+z\n");
 * if (m.get("N1041 Z") !== "12 +z") throw new Error();
 * ```
 */
export function parsePointMap(
  text: string,
  options: { file?: string } = {},
): ReadonlyMap<string, string> {
  const table = parseTextCsv(text, options);
  const names = table.header.map((h) => h.name);
  const columns = ["simulation_point", "simulation_direction", "test_point", "test_direction"];
  const index = columns.map((c) => names.indexOf(c));
  if (index.some((i) => i < 0)) {
    throw new QuiverError(`a point map needs the columns ${columns.join(", ")}`, {
      file: options.file,
    });
  }
  const map = new Map<string, string>();
  table.rows.forEach((row, r) => {
    const from = dofKey(row[index[0]], row[index[1]]);
    if (map.has(from)) {
      throw new QuiverError(`${from} is mapped twice`, {
        file: options.file,
        line: table.lines[r],
      });
    }
    map.set(from, dofKey(row[index[2]], row[index[3]]));
  });
  return map;
}

/** Two shape sets compared. */
export interface ShapeCorrelation {
  /** The degrees of freedom both sets have, in test order. */
  readonly dofs: readonly string[];
  /** Degrees of freedom only the test set has. */
  readonly testOnly: readonly string[];
  /** Degrees of freedom only the simulation set has (after the map). */
  readonly simulationOnly: readonly string[];
  /** MAC of test mode i with simulation mode j. */
  readonly mac: readonly Float64Array[];
  /** MAC of the test modes with each other. */
  readonly autoMac: readonly Float64Array[];
  /** The one-to-one pairs of greatest total MAC. */
  readonly pairs: readonly ModePair[];
}

/** A test mode paired with a simulation mode. */
export interface ModePair {
  readonly testMode: number;
  readonly simulationMode: number;
  readonly testHz: number | undefined;
  readonly simulationHz: number | undefined;
  readonly shiftPercent: number | undefined;
  readonly mac: number;
  /**
   * The strongest rival that makes the pair ambiguous (see
   * {@linkcode AMBIGUITY}): another simulation mode for this test mode, or
   * another test mode for this simulation mode; undefined when the pair is clear.
   */
  readonly rival?: {
    readonly side: "simulation" | "test";
    readonly mode: number;
    readonly mac: number;
  };
}

/**
 * When a pair is ambiguous (rule ours): another mode on either side has a MAC
 * with the pair's partner of at least `floor` and within `margin` of the
 * pair's MAC (or above it), so the shapes do not tell the two apart.
 */
export const AMBIGUITY = { margin: 0.05, floor: 0.5 } as const;

/**
 * The rival that makes pair (i, j) of a MAC matrix ambiguous, if any: the
 * highest MAC of row i outside column j, or of column j outside row i, when
 * it is at least {@linkcode AMBIGUITY}.floor and no more than
 * {@linkcode AMBIGUITY}.margin below MAC[i][j].
 *
 * @example
 * ```ts
 * import { pairRival } from "./shapes.ts";
 * const mac = [new Float64Array([0.954, 0.940, 0.02]), new Float64Array([0.1, 0.3, 0.97])];
 * const r = pairRival(mac, 0, 0);
 * if (r?.side !== "simulation" || r.index !== 1) throw new Error();
 * if (pairRival(mac, 1, 2) !== undefined) throw new Error();
 * ```
 */
export function pairRival(
  mac: readonly ArrayLike<number>[],
  i: number,
  j: number,
): { side: "simulation" | "test"; index: number; mac: number } | undefined {
  let best: { side: "simulation" | "test"; index: number; mac: number } | undefined;
  const consider = (side: "simulation" | "test", index: number, value: number) => {
    if (value < AMBIGUITY.floor || value < mac[i][j] - AMBIGUITY.margin) return;
    if (best === undefined || value > best.mac) best = { side, index, mac: value };
  };
  for (let k = 0; k < mac[i].length; k++) if (k !== j) consider("simulation", k, mac[i][k]);
  for (let l = 0; l < mac.length; l++) if (l !== i) consider("test", l, mac[l][j]);
  return best;
}

/**
 * Correlates a test shape set with a simulation set over their common
 * degrees of freedom.
 *
 * @throws {QuiverError} when fewer than two degrees of freedom are common,
 * or a mode lacks a value at a common degree of freedom.
 *
 * @example
 * ```ts
 * import { correlateShapes, parseShapes } from "./shapes.ts";
 * const test = parseShapes("mode,frequency_hz,point,direction,value\n1,40,1,z,1\n1,40,2,z,1\n2,100,1,z,1\n2,100,2,z,-1\n");
 * const sim = parseShapes("mode,frequency_hz,point,direction,value\n1,104,1,z,-2\n1,104,2,z,2\n2,42,1,z,3\n2,42,2,z,3\n");
 * const c = correlateShapes(test, sim);
 * if (c.pairs[0].simulationMode !== 2 || Math.abs(c.pairs[0].shiftPercent! - 5) > 1e-9) throw new Error();
 * ```
 */
export function correlateShapes(
  test: readonly ModeShape[],
  simulation: readonly ModeShape[],
  options: { map?: ReadonlyMap<string, string> } = {},
): ShapeCorrelation {
  const rename = (key: string) => options.map?.get(key) ?? key;
  const simulationKeys = new Set(simulation.flatMap((m) => [...m.values.keys()].map(rename)));
  const testKeys = [...new Set(test.flatMap((m) => [...m.values.keys()]))];
  const dofs = testKeys.filter((k) => simulationKeys.has(k));
  const common = new Set(dofs);
  if (dofs.length < 2) {
    throw new QuiverError(
      `the two shape sets share ${dofs.length} degree(s) of freedom; MAC needs at least two (match point and direction names, or give a map)`,
    );
  }
  const vector = (m: ModeShape, side: string, keyOf: (k: string) => string): ComplexVector => {
    const byKey = new Map([...m.values.entries()].map(([k, v]) => [keyOf(k), v]));
    const re = new Float64Array(dofs.length), im = new Float64Array(dofs.length);
    dofs.forEach((k, i) => {
      const v = byKey.get(k);
      if (v === undefined) throw new QuiverError(`${side} mode ${m.mode} has no value at ${k}`);
      re[i] = v.re;
      im[i] = v.im;
    });
    return { re, im };
  };
  const testVectors = test.map((m) => vector(m, "test", (k) => k));
  const simulationVectors = simulation.map((m) => vector(m, "simulation", rename));
  const mac = macMatrix(testVectors, simulationVectors);
  const pairs = bestPairing(mac).map(([i, j]): ModePair => {
    const testHz = test[i].frequencyHz, simulationHz = simulation[j].frequencyHz;
    const rival = pairRival(mac, i, j);
    return {
      testMode: test[i].mode,
      simulationMode: simulation[j].mode,
      testHz,
      simulationHz,
      shiftPercent: testHz !== undefined && simulationHz !== undefined
        ? (100 * (simulationHz - testHz)) / testHz
        : undefined,
      mac: mac[i][j],
      ...(rival !== undefined
        ? {
          rival: {
            side: rival.side,
            mode: rival.side === "simulation"
              ? simulation[rival.index].mode
              : test[rival.index].mode,
            mac: rival.mac,
          },
        }
        : {}),
    };
  });
  return {
    dofs,
    testOnly: testKeys.filter((k) => !simulationKeys.has(k)),
    simulationOnly: [...simulationKeys].filter((k) => !common.has(k)),
    mac,
    autoMac: macMatrix(testVectors, testVectors),
    pairs,
  };
}

/**
 * The correlation as tables: the MAC matrix in tidy form and the pairs,
 * with the auto-MAC and the degree-of-freedom counts in the metadata.
 *
 * @example
 * ```ts
 * import { correlateShapes, correlationTables, parseShapes } from "./shapes.ts";
 * const s = parseShapes("mode,point,direction,re,im\n1,1,z,1,0\n1,2,z,0,1\n");
 * const { matrix, pairs } = correlationTables(correlateShapes(s, s), s, s);
 * if (matrix.columns[2].values[0] !== 1 || pairs.columns[5].values[0] !== 1) throw new Error();
 * ```
 */
export function correlationTables(
  correlation: ShapeCorrelation,
  test: readonly ModeShape[],
  simulation: readonly ModeShape[],
): { matrix: Table<MacMetadata>; pairs: Table<MacMetadata> } {
  const rows = test.flatMap((t, i) =>
    simulation.map((s, j) => [t.mode, s.mode, correlation.mac[i][j]])
  );
  const metadata: MacMetadata = {
    analysis: "mac",
    method:
      "MAC, complex (Allemang & Brown 1982); pairs by the assignment of greatest total MAC (Hungarian method, Kuhn 1955)",
    dofs_used: correlation.dofs.length,
    dofs_test_only: correlation.testOnly.length,
    dofs_simulation_only: correlation.simulationOnly.length,
    test_only: correlation.testOnly,
    simulation_only: correlation.simulationOnly,
    auto_mac: correlation.autoMac.map((r) => Array.from(r)),
    pairs: correlation.pairs.map((p) => ({
      test_mode: p.testMode,
      simulation_mode: p.simulationMode,
      test_hz: p.testHz ?? null,
      simulation_hz: p.simulationHz ?? null,
      shift_percent: p.shiftPercent ?? null,
      mac: p.mac,
      ambiguous: p.rival !== undefined,
      rival: p.rival !== undefined
        ? { side: p.rival.side, mode: p.rival.mode, mac: p.rival.mac }
        : null,
    })),
    ambiguity_rule:
      `a pair is ambiguous when another mode on either side has a MAC with the pair's partner of at least ${AMBIGUITY.floor} and no more than ${AMBIGUITY.margin} below the pair's`,
  };
  const column = (name: string, values: ArrayLike<number | undefined>) => ({
    name,
    unit: name.endsWith("_hz") ? "Hz" : name === "shift_percent" ? "%" : "",
    values: Float64Array.from(values as ArrayLike<number | undefined>, (v) => v ?? NaN),
  });
  return {
    matrix: {
      columns: [
        column("test_mode", rows.map((r) => r[0])),
        column("simulation_mode", rows.map((r) => r[1])),
        column("mac", rows.map((r) => r[2])),
      ],
      metadata: { ...metadata, layout: "tidy: one row per (test mode, simulation mode)" },
    },
    pairs: {
      columns: [
        column("test_mode", correlation.pairs.map((p) => p.testMode)),
        column("simulation_mode", correlation.pairs.map((p) => p.simulationMode)),
        column("test_hz", correlation.pairs.map((p) => p.testHz)),
        column("simulation_hz", correlation.pairs.map((p) => p.simulationHz)),
        column("shift_percent", correlation.pairs.map((p) => p.shiftPercent)),
        column("mac", correlation.pairs.map((p) => p.mac)),
        column("ambiguous", correlation.pairs.map((p) => (p.rival !== undefined ? 1 : 0))),
        column(
          "rival_simulation_mode",
          correlation.pairs.map((p) => p.rival?.side === "simulation" ? p.rival.mode : undefined),
        ),
        column(
          "rival_test_mode",
          correlation.pairs.map((p) => p.rival?.side === "test" ? p.rival.mode : undefined),
        ),
        column("rival_mac", correlation.pairs.map((p) => p.rival?.mac)),
      ],
      metadata: { ...metadata, layout: "one row per paired test mode" },
    },
  };
}
