/**
 * Test geometry for drawing mode shapes: a CSV of `point, x, y, z` (any
 * length unit), with an optional `line_to` column naming another point to
 * draw a line to (one line per row; repeat a point to give it several).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { numberOfTextCell, parseTextCsv } from "../io/csv_table.ts";

/** Points and the lines between them. */
export interface Geometry {
  /** Points with their coordinates. */
  readonly points: readonly { point: string; x: number; y: number; z: number }[];
  /** Lines as pairs of point names. */
  readonly lines: readonly (readonly [string, string])[];
}

/**
 * Reads a geometry file.
 *
 * @throws {QuiverError} for a missing column, a coordinate that is not a
 * number, two positions for one point, or a line to an unknown point.
 *
 * @example
 * ```ts
 * import { parseGeometry } from "./geometry.ts";
 * const g = parseGeometry("point,x,y,z,line_to\na,0,0,0,b\nb,0.2,0,0,\n");
 * if (g.points.length !== 2 || g.lines[0].join() !== "a,b") throw new Error();
 * ```
 */
export function parseGeometry(text: string, options: { file?: string } = {}): Geometry {
  const table = parseTextCsv(text, options);
  const names = table.header.map((h) => h.name);
  const at = (name: string) => names.indexOf(name);
  const missing = ["point", "x", "y", "z"].filter((n) => at(n) < 0);
  if (missing.length > 0) {
    throw new QuiverError(
      `a geometry needs the columns point, x, y, z; missing ${missing.join(", ")}`,
      {
        file: options.file,
      },
    );
  }
  const points = new Map<string, { point: string; x: number; y: number; z: number }>();
  const lines: [string, string][] = [];
  table.rows.forEach((row, r) => {
    const line = table.lines[r];
    const coordinate = (name: string) => {
      const value = numberOfTextCell(row[at(name)], table.delimiter);
      if (value === undefined) {
        throw new QuiverError(`${name} "${row[at(name)]}" is not a number`, {
          file: options.file,
          line,
        });
      }
      return value;
    };
    const point = row[at("point")];
    const here = { point, x: coordinate("x"), y: coordinate("y"), z: coordinate("z") };
    const known = points.get(point);
    if (known !== undefined && (known.x !== here.x || known.y !== here.y || known.z !== here.z)) {
      throw new QuiverError(`point ${point} is given two positions`, { file: options.file, line });
    }
    points.set(point, here);
    const to = at("line_to") >= 0 ? row[at("line_to")] : "";
    if (to !== "") lines.push([point, to]);
  });
  for (const [a, b] of lines) {
    if (!points.has(b)) {
      throw new QuiverError(`a line from ${a} goes to ${b}, which has no position`, {
        file: options.file,
      });
    }
  }
  return { points: [...points.values()], lines };
}
