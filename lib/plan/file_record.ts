/**
 * The records of files a run reads and writes, for its manifest: path
 * relative to the output folder, size and SHA-256; and a file's stamp, to
 * tell whether it changed.
 *
 * @module
 */
import { createHash } from "node:crypto";
import { lstatSync, statSync } from "node:fs";
import { open } from "node:fs/promises";
import { relative } from "node:path";
import { fileKind } from "../io/file_kinds.ts";
import type { FileRecord } from "./manifest.ts";

// Hashes by path, size and modification time: a recording used by several
// steps of a run is hashed once.
const hashCache = new Map<string, string>();

/**
 * A file's record for a manifest: path relative to the output folder (when
 * inside it), size and SHA-256.
 */
export async function record(path: string, outDir: string): Promise<FileRecord> {
  const stat = statSync(path);
  // A FIFO or device would never end its hash; planSteps refuses them, this is the last guard.
  if (!stat.isFile()) throw new Error(`${path} is ${fileKind(stat)}, not a regular file`);
  const key = `${path}\u0000${stat.size}\u0000${stat.mtimeMs}`;
  let sha256 = hashCache.get(key);
  if (sha256 === undefined) {
    sha256 = await hashFile(path);
    hashCache.set(key, sha256);
  }
  return { path: relative(outDir, path) || path, bytes: stat.size, sha256 };
}

/** SHA-256 of a file's bytes, read in blocks (no cache: the clean-up's proof reads the file now). */
export async function hashFile(path: string): Promise<string> {
  const hash = createHash("sha256");
  const handle = await open(path, "r");
  try {
    const buffer = new Uint8Array(1 << 22);
    for (;;) {
      const { bytesRead } = await handle.read(buffer, 0, buffer.length, null);
      if (bytesRead === 0) break;
      hash.update(buffer.subarray(0, bytesRead));
    }
  } finally {
    await handle.close();
  }
  return hash.digest("hex");
}

/** Identity of a file's present content for "did this change": inode, size, mtime; "" when absent. */
export function fileStamp(path: string): string {
  try {
    const s = lstatSync(path);
    return `${s.dev}:${s.ino}:${s.size}:${s.mtimeMs}`;
  } catch {
    return "";
  }
}
