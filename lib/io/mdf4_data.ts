/**
 * An MDF 4 data group's data as one stream of bytes: the DT, DZ, DL and HL
 * blocks its data link leads to, resolved into pieces at opening and read
 * piece by piece ({@linkcode dataSegments}): a DT block in chunks, a DZ
 * block inflated one at a time into a reused buffer (fflate), so memory stays that of one
 * chunk or one DZ block however long the recording.
 *
 * Layouts, from memory of the standard:
 * - DT: header, no links, the records.
 * - DZ: header, no links; data dz_org_block_type (2 chars, "DT"),
 *   dz_zip_type (u8: 0 deflate, 1 transposition then deflate), reserved
 *   (u8), dz_zip_parameter (u32: the columns of the transposition),
 *   dz_org_data_length (u64), dz_data_length (u64), then the zlib stream.
 * - DL: links dl_dl_next, then dl_count data blocks; data dl_flags (u8, bit
 *   0: equal length), reserved (3 bytes), dl_count (u32), then
 *   dl_equal_length (u64) or dl_count offsets (u64) in the data.
 * - HL: link hl_dl_first; data hl_flags (u16), hl_zip_type (u8), reserved.
 *
 * @module
 */
import { BLOCK_HEADER_BYTES, blockName, type Mdf4Block, type Mdf4Blocks } from "./mdf4_blocks.ts";

/** One data block's share of the data: stored as is, or deflated (DZ). */
export type DataPiece =
  | {
    readonly kind: "raw";
    readonly block: number;
    readonly start: number;
    readonly length: number;
  }
  | {
    readonly kind: "zip";
    readonly block: number;
    readonly start: number;
    readonly zipped: number;
    readonly original: number;
    /** Columns of the transposition, 0 for none. */
    readonly columns: number;
  };

/** Bytes of a DZ block's fields before the zlib stream (from memory). */
const DZ_FIELDS = 24;

function piece(blocks: Mdf4Blocks, block: Mdf4Block): DataPiece {
  const name = blockName(block.id, block.offset);
  const start = block.offset + BLOCK_HEADER_BYTES + 8 * block.links.length;
  if (block.id === "DT") {
    return {
      kind: "raw",
      block: block.offset,
      start,
      length: block.length - (start - block.offset),
    };
  }
  blocks.need(block, DZ_FIELDS);
  const d = block.data;
  const original = String.fromCharCode(d.getUint8(0), d.getUint8(1));
  if (original !== "DT") {
    blocks.fail(
      `${name} holds a compressed ${original} block; quiver reads compressed DT blocks only`,
    );
  }
  const zipType = d.getUint8(2);
  if (zipType !== 0 && zipType !== 1) {
    blocks.fail(
      `${name} uses compression type ${zipType}; quiver reads 0 (deflate) and 1 (transposition and deflate)`,
    );
  }
  const columns = zipType === 1 ? d.getUint32(4, true) : 0;
  const originalLength = blocks.u64(block, 8, "original length");
  const zipped = blocks.u64(block, 16, "compressed length");
  if (start + DZ_FIELDS + zipped > block.offset + block.length) {
    blocks.fail(
      `${name} declares ${zipped} compressed bytes, past the end of the block (${block.length} bytes)`,
    );
  }
  if (zipType === 1 && columns === 0) blocks.fail(`${name} transposes with 0 columns`);
  return {
    kind: "zip",
    block: block.offset,
    start: start + DZ_FIELDS,
    zipped,
    original: originalLength,
    columns,
  };
}

/**
 * The pieces of a data group's data in order, from the block its data link
 * points to (DT, DZ, DL or HL); an empty list for a link of 0.
 *
 * @throws {QuiverError} for a block that is not a data block, a list that
 * loops, or a data block that reaches past the end of the file.
 */
export async function dataPieces(blocks: Mdf4Blocks, dg: Mdf4Block): Promise<DataPiece[]> {
  const first = await blocks.follow(dg, 2, ["DT", "DZ", "DL", "HL"], "its data", {
    whole: false,
    dataBytes: 32,
  });
  if (first === null) return [];
  if (first.id === "DT" || first.id === "DZ") return [piece(blocks, first)];
  let list: Mdf4Block | null = first;
  if (first.id === "HL") {
    list = await blocks.follow(first, 0, ["DL"], "its first data list");
  }
  const pieces: DataPiece[] = [];
  const seen = new Set<number>();
  let total = 0;
  while (list !== null) {
    const name = blockName(list.id, list.offset);
    if (seen.has(list.offset)) blocks.fail(`${name} is linked twice: the data lists loop`);
    seen.add(list.offset);
    blocks.need(list, 8);
    const equal = (list.data.getUint8(0) & 1) === 1;
    const count = list.data.getUint32(4, true);
    if (list.links.length < count + 1) {
      blocks.fail(`${name} lists ${count} data blocks but holds ${list.links.length - 1} links`);
    }
    blocks.need(list, equal ? 16 : 8 + 8 * count);
    const equalLength = equal ? blocks.u64(list, 8, "equal length") : 0;
    // The list's blocks' headers read 64 at a time: a long record has thousands of them.
    const headers: (Mdf4Block | null)[] = [];
    for (let from = 0; from < count; from += 64) {
      const batch = Array.from({ length: Math.min(64, count - from) }, (_, k) => from + k + 1);
      headers.push(
        ...await Promise.all(
          batch.map((link) =>
            blocks.follow(list as Mdf4Block, link, ["DT", "DZ"], `data block ${link}`, {
              whole: false,
              dataBytes: DZ_FIELDS,
            })
          ),
        ),
      );
    }
    for (let i = 0; i < count; i++) {
      const block = headers[i];
      if (block === null) blocks.fail(`${name} links data block ${i + 1} to byte 0`);
      const p = piece(blocks, block as Mdf4Block);
      const length = p.kind === "raw" ? p.length : p.original;
      // The list's own account of where each block's data starts must agree with the blocks.
      // Offsets count from the start of the data group's data, across the chain (from memory).
      const listed = equal ? 0 : blocks.u64(list, 8 + 8 * i, `offset ${i + 1}`);
      if (!equal && listed !== total) {
        blocks.fail(
          `${name} places data block ${
            i + 1
          } at data byte ${listed}, but the blocks before it hold ${total}`,
        );
      }
      if (equal && i < count - 1 && length !== equalLength) {
        blocks.fail(
          `${name} declares data blocks of ${equalLength} bytes, but data block ${i + 1} (${
            blockName(p.kind === "raw" ? "DT" : "DZ", p.block)
          }) holds ${length}`,
        );
      }
      total += length;
      pieces.push(p);
    }
    list = await blocks.follow(list, 0, ["DL"], "the next data list");
  }
  return pieces;
}

/** Bytes of the data the pieces hold. */
export function dataLength(pieces: readonly DataPiece[]): number {
  let total = 0;
  for (const p of pieces) total += p.kind === "raw" ? p.length : p.original;
  return total;
}

/**
 * Undoes a DZ block's transposition (from memory): the first rows·columns
 * bytes were written column by column, rows = ⌊length / columns⌋, and the
 * bytes left over follow as they were.
 *
 * @example
 * ```ts
 * import { untranspose } from "./mdf4_data.ts";
 * const t = untranspose(new Uint8Array([1, 3, 5, 2, 4, 6, 7]), 2);
 * if (t.join() !== "1,2,3,4,5,6,7") throw new Error(t.join());
 * ```
 */
export function untranspose(
  data: Uint8Array,
  columns: number,
  into = new Uint8Array(data.length),
): Uint8Array {
  const rows = Math.floor(data.length / columns);
  const out = into.subarray(0, data.length);
  for (let c = 0; c < columns; c++) {
    const from = c * rows;
    for (let r = 0, to = c; r < rows; r++, to += columns) out[to] = data[from + r];
  }
  out.set(data.subarray(rows * columns), rows * columns);
  return out;
}

/**
 * The zlib stream of the DZ piece `p` (bytes `zipped`) inflated into `out`
 * (reused from block to block: no buffer per block for the collector to
 * find), checked to give the length the block declares.
 *
 * @throws {QuiverError} for a stream that does not inflate or inflates to
 * another length.
 */
export async function inflatePiece(
  blocks: Mdf4Blocks,
  p: Extract<DataPiece, { kind: "zip" }>,
  zipped: Uint8Array,
  out: Uint8Array,
): Promise<Uint8Array> {
  // fflate is loaded with the first DZ block: every other read (and start-up) goes without it.
  const { unzlibSync } = await import("npm:fflate@0.8.3");
  const name = blockName("DZ", p.block);
  // One byte more than declared: a stream that holds more fills it, and is refused below.
  const room = out.subarray(0, p.original + 1);
  let inflated: Uint8Array;
  try {
    inflated = unzlibSync(zipped, { out: room });
  } catch (error) {
    return blocks.fail(`${name} does not inflate (${(error as Error).message})`);
  }
  if (inflated.length !== p.original) {
    blocks.fail(
      `${name} inflates to ${
        inflated.length > p.original ? "more than" : inflated.length
      } bytes, not the ${p.original} it declares`,
    );
  }
  return inflated;
}

/** Bytes read at a time from a DT block. */
const READ_BYTES = 1 << 20;

/**
 * The data's bytes in order, piece by piece: a DT block in chunks of at
 * most 1 MiB, a DZ block inflated whole. A yielded array is valid until
 * the next one is asked for (buffers are reused).
 *
 * @throws {QuiverError} for a DZ block that does not inflate or inflates to
 * another length than it declares.
 */
export async function* dataSegments(
  blocks: Mdf4Blocks,
  pieces: readonly DataPiece[],
): AsyncGenerator<Uint8Array> {
  let buffer = new Uint8Array(0), zipBuffer = new Uint8Array(0);
  let inflateBuffer = new Uint8Array(0), plain = new Uint8Array(0);
  for (const p of pieces) {
    if (p.kind === "raw") {
      for (let at = 0; at < p.length; at += READ_BYTES) {
        const n = Math.min(READ_BYTES, p.length - at);
        if (buffer.length < n) buffer = new Uint8Array(Math.min(READ_BYTES, p.length));
        const chunk = buffer.subarray(0, n);
        await blocks.read(chunk, p.start + at);
        yield chunk;
      }
      continue;
    }
    // The compressed, inflated and untransposed bytes in buffers reused from block to block.
    if (zipBuffer.length < p.zipped) zipBuffer = new Uint8Array(p.zipped);
    const zipped = zipBuffer.subarray(0, p.zipped);
    await blocks.read(zipped, p.start);
    if (inflateBuffer.length < p.original + 1) inflateBuffer = new Uint8Array(p.original + 1);
    const inflated = await inflatePiece(blocks, p, zipped, inflateBuffer);
    if (p.columns > 0 && plain.length < p.original) plain = new Uint8Array(p.original);
    yield p.columns > 0 ? untranspose(inflated, p.columns, plain) : inflated;
  }
}
