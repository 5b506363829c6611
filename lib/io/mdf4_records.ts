/**
 * MDF 4 records: one channel group's records picked out of a data group's
 * byte stream ({@linkcode RecordSplitter}), and a channel's values decoded
 * from them ({@linkcode decodeChannel}).
 *
 * A record (from memory of the standard): the record id (dg_rec_id_size
 * bytes: 0 in a sorted data group, 1, 2, 4 or 8 in an unsorted one, little
 * endian), then cg_data_bytes of channel values, then cg_inval_bytes of
 * invalidation bits. A record of a VLSD channel group is its id, a u32
 * length and that many bytes.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";

/** Where a channel's value sits in a record's data bytes, and its type. */
export interface ChannelLayout {
  /** cn_data_type: 0/1 unsigned LE/BE, 2/3 signed LE/BE, 4/5 IEEE float LE/BE. */
  readonly dataType: number;
  /** cn_byte_offset: first byte after the record id. */
  readonly byteOffset: number;
  /** cn_bit_offset: 0–7, bits to skip in the first byte. */
  readonly bitOffset: number;
  /** cn_bit_count. */
  readonly bitCount: number;
}

/** Why quiver cannot decode a channel of this layout, or null when it can. */
export function layoutProblem(l: ChannelLayout): string | null {
  if (l.dataType > 5) return null; // the caller names the type
  if (l.dataType >= 4) {
    return l.bitOffset === 0 && (l.bitCount === 32 || l.bitCount === 64)
      ? null
      : `a ${l.bitCount}-bit float at bit offset ${l.bitOffset} (quiver reads 32- and 64-bit floats)`;
  }
  return l.bitCount >= 1 && l.bitCount <= 64 ? null : `an integer of ${l.bitCount} bits`;
}

/** Bytes a channel's value spans in the record. */
export function layoutBytes(l: ChannelLayout): number {
  return Math.ceil((l.bitOffset + l.bitCount) / 8);
}

/**
 * Decodes one channel's value from each of `count` records of `recordBytes`
 * bytes in `bytes` into `out` (raw values, before the conversion). Integers
 * at a bit offset or of a bit count that is not 8, 16, 32 or 64 are read as
 * the bytes they span (LE or BE), shifted right by the bit offset and
 * masked to the bit count (from memory), then sign-extended when signed.
 *
 * @example
 * ```ts
 * import { decodeChannel } from "./mdf4_records.ts";
 * // A 12-bit signed value at bit 4 of a 2-byte record: 0xFFF0 holds −1.
 * const out = new Float64Array(1);
 * decodeChannel(new Uint8Array([0xf0, 0xff]), 2, 1, { dataType: 2, byteOffset: 0, bitOffset: 4, bitCount: 12 }, out);
 * if (out[0] !== -1) throw new Error(String(out[0]));
 * ```
 */
export function decodeChannel(
  bytes: Uint8Array,
  recordBytes: number,
  count: number,
  layout: ChannelLayout,
  out: Float64Array,
): void {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const { dataType, byteOffset: o, bitOffset, bitCount } = layout;
  const le = dataType % 2 === 0;
  const signed = dataType === 2 || dataType === 3;
  if (dataType >= 4) {
    if (bitCount === 32) {
      for (let r = 0, at = o; r < count; r++, at += recordBytes) out[r] = view.getFloat32(at, le);
    } else {
      for (let r = 0, at = o; r < count; r++, at += recordBytes) out[r] = view.getFloat64(at, le);
    }
    return;
  }
  if (bitOffset === 0 && bitCount === 8) {
    for (let r = 0, at = o; r < count; r++, at += recordBytes) {
      out[r] = signed ? view.getInt8(at) : view.getUint8(at);
    }
    return;
  }
  if (bitOffset === 0 && bitCount === 16) {
    for (let r = 0, at = o; r < count; r++, at += recordBytes) {
      out[r] = signed ? view.getInt16(at, le) : view.getUint16(at, le);
    }
    return;
  }
  if (bitOffset === 0 && bitCount === 32) {
    for (let r = 0, at = o; r < count; r++, at += recordBytes) {
      out[r] = signed ? view.getInt32(at, le) : view.getUint32(at, le);
    }
    return;
  }
  const span = layoutBytes(layout);
  if (span <= 6) {
    // Up to 48 bits: exact in a double.
    const scale = 2 ** bitOffset, range = 2 ** bitCount, half = 2 ** (bitCount - 1);
    for (let r = 0, at = o; r < count; r++, at += recordBytes) {
      let raw = 0;
      if (le) { for (let k = span - 1; k >= 0; k--) raw = raw * 256 + bytes[at + k]; }
      else for (let k = 0; k < span; k++) raw = raw * 256 + bytes[at + k];
      let v = Math.floor(raw / scale) % range;
      if (signed && v >= half) v -= range;
      out[r] = v;
    }
    return;
  }
  // Wider: through BigInt (values beyond 2^53 lose their last bits as doubles).
  const mask = (1n << BigInt(bitCount)) - 1n, half = 1n << BigInt(bitCount - 1);
  const shift = BigInt(bitOffset);
  for (let r = 0, at = o; r < count; r++, at += recordBytes) {
    let raw = 0n;
    if (le) { for (let k = span - 1; k >= 0; k--) raw = (raw << 8n) | BigInt(bytes[at + k]); }
    else for (let k = 0; k < span; k++) raw = (raw << 8n) | BigInt(bytes[at + k]);
    let v = (raw >> shift) & mask;
    if (signed && v >= half) v -= half << 1n;
    out[r] = Number(v);
  }
}

/**
 * Picks one channel group's records out of a data group's bytes, pushed in
 * segments of any size: records that span segments are joined, other
 * groups' records skipped. Whole records are handed on in batches of up to
 * `rows` records in one reused buffer.
 *
 * @example
 * ```ts
 * import { RecordSplitter } from "./mdf4_records.ts";
 * // Unsorted, 1-byte ids: group 1 has 2-byte records, group 2 has 1-byte ones.
 * const got: number[] = [];
 * const s = new RecordSplitter({ idBytes: 1, lengths: new Map([[1, 2], [2, 1]]), target: 1, rows: 4, file: "x.mf4" },
 *   (b, n) => got.push(...b.subarray(0, 2 * n)));
 * s.push(new Uint8Array([1, 10, 11, 2, 99, 1]));
 * s.push(new Uint8Array([12, 13]));
 * s.end();
 * if (got.join() !== "10,11,12,13") throw new Error(got.join());
 * ```
 */
export class RecordSplitter {
  readonly #idBytes: number;
  readonly #lengths: ReadonlyMap<number, number>;
  readonly #target: number;
  readonly #recordBytes: number;
  readonly #buffer: Uint8Array;
  readonly #rows: number;
  readonly #file: string;
  readonly #onRecords: (bytes: Uint8Array, count: number) => void;
  #fill = 0; // bytes in the buffer
  #copy = 0; // bytes of the current target record still to copy
  #skip = 0; // bytes of another group's record still to skip
  #id = 0;
  #idHave = 0;
  #vlsdLength = -1; // bytes of a VLSD record's length field seen, -1 when none pending
  #vlsdValue = 0;
  #at = 0; // data bytes seen
  /** Records of the target group found. */
  records = 0;

  constructor(
    o: {
      /** dg_rec_id_size: 0 (sorted), 1, 2, 4 or 8. */
      idBytes: number;
      /** Bytes after the id of each group's records, by record id; -1 for a VLSD group. */
      lengths: ReadonlyMap<number, number>;
      /** The record id of the group wanted (any, when idBytes is 0). */
      target: number;
      /** Records per batch. */
      rows: number;
      /** For messages. */
      file: string;
    },
    onRecords: (bytes: Uint8Array, count: number) => void,
  ) {
    this.#idBytes = o.idBytes;
    this.#lengths = o.lengths;
    this.#target = o.target;
    this.#recordBytes = o.lengths.get(o.target) ?? 0;
    this.#rows = o.rows;
    this.#file = o.file;
    this.#buffer = new Uint8Array(o.rows * this.#recordBytes);
    this.#onRecords = onRecords;
  }

  #flush(): void {
    const count = this.#fill / this.#recordBytes;
    if (count > 0) this.#onRecords(this.#buffer.subarray(0, this.#fill), count);
    this.#fill = 0;
  }

  /** The next bytes of the data. @throws {QuiverError} for a record id of no group. */
  push(segment: Uint8Array): void {
    const n = segment.length;
    const capacity = this.#buffer.length;
    let p = 0;
    if (this.#idBytes === 0) {
      // Sorted: the bytes are the group's records back to back.
      while (p < n) {
        const take = Math.min(capacity - this.#fill, n - p);
        this.#buffer.set(segment.subarray(p, p + take), this.#fill);
        this.#fill += take;
        p += take;
        if (this.#fill === capacity) {
          this.records += this.#rows;
          this.#flush();
        }
      }
      this.#at += n;
      return;
    }
    while (p < n) {
      if (this.#skip > 0) {
        const take = Math.min(this.#skip, n - p);
        this.#skip -= take;
        p += take;
      } else if (this.#copy > 0) {
        const take = Math.min(this.#copy, n - p);
        this.#buffer.set(segment.subarray(p, p + take), this.#fill);
        this.#fill += take;
        this.#copy -= take;
        p += take;
        if (this.#copy === 0) {
          this.records++;
          if (this.#fill === capacity) this.#flush();
        }
      } else if (this.#vlsdLength >= 0) {
        this.#vlsdValue += segment[p++] * 256 ** this.#vlsdLength;
        if (++this.#vlsdLength === 4) {
          this.#skip = this.#vlsdValue;
          this.#vlsdLength = -1;
        }
      } else {
        this.#id += segment[p++] * 256 ** this.#idHave;
        if (++this.#idHave < this.#idBytes) continue;
        const id = this.#id;
        this.#id = 0;
        this.#idHave = 0;
        const length = this.#lengths.get(id);
        if (length === undefined) {
          throw new QuiverError(
            `record id ${id} at data byte ${
              this.#at + p - this.#idBytes
            } belongs to no channel group of its data group`,
            { file: this.#file },
          );
        }
        if (length < 0) {
          this.#vlsdLength = 0;
          this.#vlsdValue = 0;
        } else if (id === this.#target) this.#copy = length;
        else this.#skip = length;
      }
    }
    this.#at += n;
  }

  /** The end of the data. @throws {QuiverError} for a record cut short. */
  end(): void {
    const partial = this.#idBytes === 0
      ? this.#fill % this.#recordBytes !== 0
      : this.#copy > 0 || this.#skip > 0 || this.#idHave > 0 || this.#vlsdLength >= 0;
    if (partial) {
      throw new QuiverError(
        `the data ends inside a record (after ${this.#at} bytes)`,
        { file: this.#file },
      );
    }
    if (this.#idBytes === 0) this.records += this.#fill / this.#recordBytes;
    this.#flush();
  }
}
