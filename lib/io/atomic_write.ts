/**
 * Safe output: a file is written under a temporary name in the same folder
 * and renamed into place, so a killed run leaves the old file or the new
 * one, never half of one.
 *
 * @module
 */
import { open, rename, rm } from "node:fs/promises";
import { basename, dirname, join } from "node:path";
import process from "node:process";

/**
 * Writes `content` to `path` atomically (temporary file + fsync + rename).
 *
 * @example
 * ```ts
 * import { writeFileAtomic } from "./atomic_write.ts";
 * import { readFile, mkdtemp } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFileAtomic(`${dir}/a.csv`, "x\n1\n");
 * if ((await readFile(`${dir}/a.csv`, "utf8")) !== "x\n1\n") throw new Error();
 * ```
 */
export async function writeFileAtomic(
  path: string,
  content: string | Uint8Array,
): Promise<void> {
  const temporary = join(
    dirname(path),
    `.${basename(path)}.tmp-${process.pid}-${Math.random().toString(36).slice(2)}`,
  );
  try {
    const handle = await open(temporary, "wx");
    try {
      await handle.writeFile(content);
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(temporary, path);
  } catch (error) {
    await rm(temporary, { force: true });
    throw error;
  }
}
