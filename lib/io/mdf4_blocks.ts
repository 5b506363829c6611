/**
 * ASAM MDF 4 blocks as the file holds them ({@linkcode Mdf4Blocks}): the
 * identification block, then blocks found by following links. Every block
 * starts with a 24-byte header (layout recalled from memory of the
 * standard's block structure):
 *
 * | bytes | field                              |
 * |-------|------------------------------------|
 * | 0–3   | id: "##" and two letters ("##DG")  |
 * | 4–7   | reserved                           |
 * | 8–15  | length of the block, bytes (u64)   |
 * | 16–23 | number of links (u64)              |
 *
 * then the links (u64 file offsets, 0 for none), then the block's data
 * section. Each fault names the file, the block and its byte offset.
 *
 * @module
 */
import type { FileHandle } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { latin1 } from "./byte_text.ts";

/** Bytes of a block header. */
export const BLOCK_HEADER_BYTES = 24;

/** Bytes of the identification block at the start of the file (from memory). */
export const ID_BLOCK_BYTES = 64;

/** One block read from the file: header, links and data section. */
export interface Mdf4Block {
  /** Two letters: "DG", "CG", "CN", ... */
  readonly id: string;
  /** Byte offset in the file. */
  readonly offset: number;
  /** Length of the whole block, bytes. */
  readonly length: number;
  /** The links, file offsets (0 for none). */
  readonly links: readonly number[];
  /** The data section (after the links), as far as it was read. */
  readonly data: DataView;
}

/** A block's name in messages: "the DG block at byte 1234". */
export function blockName(id: string, offset: number): string {
  return `the ${id} block at byte ${offset}`;
}

/**
 * Whether `head` starts with an MDF 4 identification block: "MDF     " and
 * a version "4.xx" (from memory: ID block bytes 0–7 and 8–15).
 *
 * @example
 * ```ts
 * import { looksLikeMdf4 } from "./mdf4_blocks.ts";
 * const head = new TextEncoder().encode("MDF     4.10    quiver  ");
 * if (!looksLikeMdf4(head) || looksLikeMdf4(new TextEncoder().encode("MDF     3.30    "))) throw new Error();
 * ```
 */
export function looksLikeMdf4(head: Uint8Array): boolean {
  if (head.length < 16) return false;
  const text = latin1(head.subarray(0, 12));
  return text.startsWith("MDF     4.");
}

/** A 64-bit count or offset as a number; refused when beyond 2^53. */
function u64(view: DataView, at: number, fail: (detail: string) => never): number {
  const v = view.getBigUint64(at, true);
  if (v > BigInt(Number.MAX_SAFE_INTEGER)) fail(`holds a 64-bit value too large to use (${v})`);
  return Number(v);
}

/**
 * Reads blocks of one MDF 4 file by offset, checking each header against
 * the file's size.
 *
 * @example
 * ```ts
 * import { Mdf4Blocks } from "./mdf4_blocks.ts";
 * import { mkdtemp, open, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * const bytes = new Uint8Array(64 + 32);
 * bytes.set(new TextEncoder().encode("##TX"), 64);
 * const v = new DataView(bytes.buffer);
 * v.setBigUint64(72, 32n, true);
 * bytes.set(new TextEncoder().encode("ok"), 88);
 * await writeFile(`${dir}/t.mf4`, bytes);
 * const h = await open(`${dir}/t.mf4`);
 * const blocks = new Mdf4Blocks(h, `${dir}/t.mf4`, bytes.length);
 * const text = await blocks.text(64, "a name");
 * await h.close();
 * if (text !== "ok") throw new Error(text);
 * ```
 */
export class Mdf4Blocks {
  readonly #handle: FileHandle;
  /** Path, as the user gave it. */
  readonly path: string;
  /** Size of the file, bytes. */
  readonly size: number;

  constructor(handle: FileHandle, path: string, size: number) {
    this.#handle = handle;
    this.path = path;
    this.size = size;
  }

  /** A data error naming the file. */
  fail(detail: string): never {
    throw new QuiverError(detail, { file: this.path });
  }

  /** `count` bytes at `offset` (the caller has checked they lie in the file). */
  async bytes(offset: number, count: number): Promise<Uint8Array> {
    const out = new Uint8Array(count);
    const { bytesRead } = await this.#handle.read(out, 0, count, offset);
    if (bytesRead < count) this.fail(`truncated: fewer than ${count} bytes at byte ${offset}`);
    return out;
  }

  /** Fills `into` from byte `offset` (the caller has checked the bytes lie in the file). */
  async read(into: Uint8Array, offset: number): Promise<void> {
    const { bytesRead } = await this.#handle.read(into, 0, into.length, offset);
    if (bytesRead < into.length) {
      this.fail(`truncated: fewer than ${into.length} bytes at byte ${offset} (the file changed?)`);
    }
  }

  /**
   * The block a link points to, checked to be one of `expected` ids and to
   * lie in the file; `what` names it in messages ("the first data group").
   * `whole` false reads only the header, links and `dataBytes` of its data
   * (a data block's samples are read later, in chunks).
   */
  async block(
    offset: number,
    expected: readonly string[],
    what: string,
    options: { whole?: boolean; dataBytes?: number } = {},
  ): Promise<Mdf4Block> {
    if (offset < ID_BLOCK_BYTES || offset + BLOCK_HEADER_BYTES > this.size) {
      this.fail(
        `${what} is linked at byte ${offset}, ${
          offset < ID_BLOCK_BYTES ? "inside the identification block" : "past the end of the file"
        } (${this.size} bytes)`,
      );
    }
    const head = await this.bytes(offset, BLOCK_HEADER_BYTES);
    const view = new DataView(head.buffer);
    const mark = latin1(head.subarray(0, 4));
    const id = mark.slice(2);
    if (!mark.startsWith("##") || !expected.includes(id)) {
      this.fail(
        `expected ${
          expected.map((e) => `a ${e}`).join(" or ")
        } block (${what}) at byte ${offset}, found ${
          JSON.stringify(mark.replace(/[^\x20-\x7e]/g, "?"))
        }`,
      );
    }
    const name = blockName(id, offset);
    const fail = (detail: string): never => this.fail(`${name} ${detail}`);
    const length = u64(view, 8, fail);
    const linkCount = u64(view, 16, fail);
    const fixed = BLOCK_HEADER_BYTES + 8 * linkCount;
    if (length < fixed) fail(`declares ${length} bytes, fewer than its ${linkCount} links need`);
    if (offset + length > this.size) {
      fail(
        `declares ${length} bytes, past the end of the file (truncated: ${
          this.size - offset
        } bytes remain)`,
      );
    }
    const read = options.whole === false
      ? Math.min(length, fixed + (options.dataBytes ?? 0))
      : length;
    const body = await this.bytes(offset, read);
    const bodyView = new DataView(body.buffer);
    const links: number[] = [];
    for (let i = 0; i < linkCount; i++) links.push(u64(bodyView, BLOCK_HEADER_BYTES + 8 * i, fail));
    return {
      id,
      offset,
      length,
      links,
      data: new DataView(body.buffer, fixed, read - fixed),
    };
  }

  /**
   * The block at link `index` of `from`, or null for a link of 0; a link
   * past the end of the file is refused naming the block that holds it.
   */
  async follow(
    from: Mdf4Block,
    index: number,
    expected: readonly string[],
    what: string,
    options: { whole?: boolean; dataBytes?: number } = {},
  ): Promise<Mdf4Block | null> {
    const link = from.links[index] ?? 0;
    if (link === 0) return null;
    if (link + BLOCK_HEADER_BYTES > this.size) {
      this.fail(
        `${
          blockName(from.id, from.offset)
        } links ${what} at byte ${link}, past the end of the file (${this.size} bytes)`,
      );
    }
    return await this.block(link, expected, what, options);
  }

  /**
   * The text of a TX block (UTF-8, ended by a zero byte) or of an MD block
   * (XML: its text without the tags), "" for a link of 0.
   */
  async text(offset: number, what: string): Promise<string> {
    if (offset === 0) return "";
    const block = await this.block(offset, ["TX", "MD"], what);
    const bytes = new Uint8Array(block.data.buffer, block.data.byteOffset, block.data.byteLength);
    const end = bytes.indexOf(0);
    const text = new TextDecoder().decode(end < 0 ? bytes : bytes.subarray(0, end));
    if (block.id === "TX") return text;
    // An MD block's XML: the text of its <TX> element when there is one, else all text.
    const tx = /<TX>([\s\S]*?)<\/TX>/.exec(text);
    return (tx ? tx[1] : text.replace(/<[^>]*>/g, " ")).replace(/\s+/g, " ").trim();
  }

  /** The text a link of `from` points to ("" for none). */
  async linkedText(from: Mdf4Block, index: number, what: string): Promise<string> {
    const link = from.links[index] ?? 0;
    if (link !== 0 && link + BLOCK_HEADER_BYTES > this.size) {
      this.fail(
        `${
          blockName(from.id, from.offset)
        } links ${what} at byte ${link}, past the end of the file (${this.size} bytes)`,
      );
    }
    return await this.text(link, what);
  }

  /** A u64 field of a block's data section, refused beyond 2^53. */
  u64(block: Mdf4Block, at: number, field: string): number {
    if (at + 8 > block.data.byteLength) {
      this.fail(`${blockName(block.id, block.offset)} is too short for its ${field}`);
    }
    return u64(
      block.data,
      at,
      (d) => this.fail(`${blockName(block.id, block.offset)} (${field}) ${d}`),
    );
  }

  /** Checks that a block's data section holds `bytes`, naming the block otherwise. */
  need(block: Mdf4Block, bytes: number): void {
    if (block.data.byteLength < bytes) {
      this.fail(
        `${
          blockName(block.id, block.offset)
        } is too short: its data section holds ${block.data.byteLength} bytes, the layout needs ${bytes}`,
      );
    }
  }
}
