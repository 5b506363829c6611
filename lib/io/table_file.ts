/**
 * A CSV result and its metadata sidecar (`<file>.meta.json`) as one pair.
 *
 * The sidecar carries the SHA-256 of the CSV's bytes and the CSV's column
 * names and units. Every reader of quiver tables checks both, so a CSV from
 * one run beside a sidecar from another (a kill between the two renames, a
 * copy of one half) is refused instead of being read with the wrong
 * metadata (an RMS table read as a PSD). Writing puts both halves in
 * temporary files first and renames them only when both are complete; if
 * the second rename fails, the first new half is removed, so a failed write
 * leaves no new half behind.
 *
 * @module
 */
import { createHash } from "node:crypto";
import { readFile, rm } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { commitTemporary, writeTemporary } from "./atomic_write.ts";

/** The sidecar format's version. */
export const SIDECAR_VERSION = 1;

/** Path of the metadata sidecar of a CSV file. */
export function sidecarPath(csvPath: string): string {
  return `${csvPath}.meta.json`;
}

/** SHA-256 of text as UTF-8, hex. */
export function sha256Hex(content: string | Uint8Array): string {
  return createHash("sha256").update(content).digest("hex");
}

/** The sidecar of a CSV text. */
export interface Sidecar {
  readonly quiver_sidecar: number;
  readonly csv_sha256: string;
  readonly columns: readonly { name: string; unit: string }[];
  readonly metadata: Record<string, unknown>;
}

/**
 * Writes `csvText` to `path` and its sidecar beside it, as a pair.
 *
 * @example
 * ```ts
 * import { writeCsvPair, readSidecar } from "./table_file.ts";
 * import { mkdtemp, readFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * const csv = "frequency_hz,a [V]\n0,1\n";
 * await writeCsvPair(`${dir}/t.csv`, csv, [{ name: "frequency_hz", unit: "" }, { name: "a", unit: "V" }], { kind: "rms" });
 * const s = await readSidecar(`${dir}/t.csv`, await readFile(`${dir}/t.csv`), [{ name: "frequency_hz", unit: "" }, { name: "a", unit: "V" }]);
 * if (s?.metadata.kind !== "rms") throw new Error();
 * ```
 */
export async function writeCsvPair(
  path: string,
  csvText: string,
  columns: readonly { name: string; unit: string }[],
  metadata: Record<string, unknown>,
): Promise<void> {
  const sidecar: Sidecar = {
    quiver_sidecar: SIDECAR_VERSION,
    csv_sha256: sha256Hex(csvText),
    columns: columns.map(({ name, unit }) => ({ name, unit })),
    metadata,
  };
  const csv = await writeTemporary(path, csvText);
  let meta;
  try {
    meta = await writeTemporary(sidecarPath(path), JSON.stringify(sidecar, null, 2) + "\n");
  } catch (error) {
    await rm(csv, { force: true });
    throw error;
  }
  try {
    await commitTemporary(csv, path);
  } catch (error) {
    await rm(meta, { force: true });
    throw error;
  }
  try {
    await commitTemporary(meta, sidecarPath(path));
  } catch (error) {
    // The new CSV must not stand beside the old sidecar.
    await rm(path, { force: true });
    throw error;
  }
}

/**
 * The sidecar of the CSV at `path` whose bytes are `csvBytes` and whose
 * header reads `header`, or undefined when it has none (a plain table from
 * elsewhere).
 *
 * @throws {QuiverError} when the sidecar is not valid, does not carry the
 * CSV's hash, or does not match the CSV's bytes or header.
 *
 * @example
 * ```ts
 * import { readSidecar, writeCsvPair } from "./table_file.ts";
 * import { mkdtemp, readFile, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * const columns = [{ name: "frequency_hz", unit: "" }, { name: "a", unit: "V" }];
 * await writeCsvPair(`${dir}/t.csv`, "frequency_hz,a [V]\n0,1\n", columns, { kind: "rms" });
 * await writeFile(`${dir}/t.csv`, "frequency_hz,a [V]\n0,2\n"); // the CSV changed: the pair no longer holds
 * let refused = false;
 * try { await readSidecar(`${dir}/t.csv`, await readFile(`${dir}/t.csv`), columns); } catch { refused = true; }
 * if (!refused) throw new Error();
 * ```
 */
export async function readSidecar(
  path: string,
  csvBytes: string | Uint8Array,
  header: readonly { name: string; unit: string }[],
): Promise<Sidecar | undefined> {
  const where = { file: sidecarPath(path) };
  let text: string;
  try {
    text = await readFile(sidecarPath(path), "utf8");
  } catch {
    return undefined;
  }
  let json: Partial<Sidecar>;
  try {
    json = JSON.parse(text);
  } catch (error) {
    throw new QuiverError(`not valid JSON: ${(error as Error).message}`, where);
  }
  if (typeof json.csv_sha256 !== "string" || typeof json.metadata !== "object") {
    throw new QuiverError(
      "this sidecar does not carry its CSV's hash, so it cannot be shown to belong to it; write the result again",
      where,
    );
  }
  if (json.csv_sha256 !== sha256Hex(csvBytes)) {
    throw new QuiverError(
      `does not belong to ${path}: the CSV's hash differs from the one the sidecar was written with (the two halves come from different runs); write the result again`,
      where,
    );
  }
  const columns = json.columns ?? [];
  // `header` is as read back: a formula guard in a name is already undone (csv_table.ts).
  const same = columns.length === header.length &&
    columns.every((c, i) => c.name === header[i].name && c.unit === header[i].unit);
  if (!same) {
    throw new QuiverError(
      `its columns (${
        columns.map((c) => `${c.name} [${c.unit}]`).join(", ")
      }) differ from the CSV header`,
      where,
    );
  }
  return json as Sidecar;
}
