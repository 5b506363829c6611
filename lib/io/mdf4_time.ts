/**
 * An MDF 4 channel group's time axis: the rate and start time from its time
 * master ({@linkcode groupTiming}), and the check that a stored master is
 * uniform while the samples are read ({@linkcode MasterStepCheck}).
 *
 * A virtual master (cn_type 3) holds no values: its time is its conversion
 * of the record index, t = P2·i + P1 for a linear one (from memory). A
 * stored master (cn_type 2) gives the rate from its first and last times;
 * every step is checked while the samples are read.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import type { Mdf4Blocks } from "./mdf4_blocks.ts";
import { convertOne } from "./mdf4_conversions.ts";
import { type DataPiece, dataSegments, inflatePiece, untranspose } from "./mdf4_data.ts";
import type { Mdf4Group } from "./mdf4_file.ts";
import { decodeChannel, RecordSplitter } from "./mdf4_records.ts";

/** A group's rate, start time, and where they come from. */
export interface GroupTiming {
  readonly rate: number;
  readonly startTime: number;
  readonly from: string;
}

/** `count` bytes from data byte `offset` of a data group's data (a DZ block inflated whole). */
async function bytesAt(
  blocks: Mdf4Blocks,
  pieces: readonly DataPiece[],
  offset: number,
  count: number,
): Promise<Uint8Array> {
  const out = new Uint8Array(count);
  let start = 0, filled = 0;
  for (const p of pieces) {
    const length = p.kind === "raw" ? p.length : p.original;
    const from = offset + filled - start;
    if (from >= 0 && from < length) {
      const take = Math.min(length - from, count - filled);
      if (p.kind === "raw") await blocks.read(out.subarray(filled, filled + take), p.start + from);
      else {
        let data = await inflatePiece(
          blocks,
          p,
          await blocks.bytes(p.start, p.zipped),
          new Uint8Array(p.original + 1),
        );
        if (p.columns > 0) data = untranspose(data, p.columns);
        out.set(data.subarray(from, from + take), filled);
      }
      filled += take;
      if (filled === count) return out;
    }
    start += length;
  }
  return blocks.fail(`the data ends before data byte ${offset + count}`);
}

/** The first and last times of a stored master: two records read, or a pass over unsorted data. */
async function masterEnds(
  blocks: Mdf4Blocks,
  group: Mdf4Group,
  pieces: readonly DataPiece[],
): Promise<[number, number]> {
  if (group.master?.kind !== "stored") throw new RangeError("no stored master");
  const { layout, conversion } = group.master.channel;
  const one = new Float64Array(1);
  const time = (bytes: Uint8Array) => {
    decodeChannel(bytes, group.recordBytes, 1, layout, one);
    return convertOne(conversion, one[0]);
  };
  const n = group.records;
  if (group.idBytes === 0) {
    const first = await bytesAt(blocks, pieces, 0, group.recordBytes);
    const last = await bytesAt(blocks, pieces, (n - 1) * group.recordBytes, group.recordBytes);
    return [time(first), time(last)];
  }
  let first = NaN, last = NaN;
  const splitter = new RecordSplitter({
    idBytes: group.idBytes,
    lengths: group.lengths,
    target: group.recordId,
    rows: 4096,
    file: blocks.path,
  }, (bytes, count) => {
    if (Number.isNaN(first)) first = time(bytes);
    last = time(bytes.subarray((count - 1) * group.recordBytes));
  });
  for await (const segment of dataSegments(blocks, pieces)) splitter.push(segment);
  splitter.end();
  return [first, last];
}

/**
 * The rate and start time of a group: from its virtual master's conversion,
 * its stored master's first and last times, or `rate` when it has no time
 * master; null when none of these gives one.
 *
 * @throws {QuiverError} for a master that does not advance.
 */
export async function groupTiming(
  blocks: Mdf4Blocks,
  group: Mdf4Group,
  pieces: readonly DataPiece[],
  rate: number | undefined,
): Promise<GroupTiming | null> {
  const master = group.master;
  if (master === null) return rate === undefined ? null : { rate, startTime: 0, from: "--rate" };
  const label = master.kind === "virtual" ? master.name : master.channel.name;
  if (master.kind === "virtual") {
    const t0 = convertOne(master.conversion, 0), t1 = convertOne(master.conversion, 1);
    if (!(t1 > t0) || !Number.isFinite(t1 - t0)) {
      blocks.fail(`the virtual time master "${label}" does not advance (${t0} s, then ${t1} s)`);
    }
    // A linear master's rate is exact from its factor; 1/(t1 − t0) could round.
    const step = master.conversion.kind === "linear" ? master.conversion.factor : t1 - t0;
    return { rate: 1 / step, startTime: t0, from: `the virtual time master "${label}"` };
  }
  if (group.records < 2) return null;
  const [first, last] = await masterEnds(blocks, group, pieces);
  if (!(last > first) || !Number.isFinite(last - first)) {
    blocks.fail(
      `the time master "${label}" does not advance from its first record to its last (${first} s, then ${last} s)`,
    );
  }
  return {
    rate: (group.records - 1) / (last - first),
    startTime: first,
    from: `the time master "${label}"`,
  };
}

/**
 * Checks a stored master's steps against 1/rate while the samples are read;
 * at the end refuses the record when the worst step departs from it by
 * more than `tolerance` (relative), naming that step.
 *
 * @example
 * ```ts
 * import { MasterStepCheck } from "./mdf4_time.ts";
 * const c = new MasterStepCheck("t", 10, 0.01, "x.mf4");
 * c.push(new Float64Array([0, 0.1, 0.2]));
 * c.push(new Float64Array([0.3, 0.45]));
 * let message = "";
 * try { c.end(); } catch (e) { message = (e as Error).message; }
 * if (!message.includes("record 4 to 5")) throw new Error(message);
 * ```
 */
export class MasterStepCheck {
  readonly #name: string;
  readonly #step: number;
  readonly #tolerance: number;
  readonly #file: string;
  #previous = NaN;
  #index = 0;
  #worst = { error: 0, at: -1, dt: 0 };

  constructor(name: string, rate: number, tolerance: number, file: string) {
    this.#name = name;
    this.#step = 1 / rate;
    this.#tolerance = tolerance;
    this.#file = file;
  }

  /** The next times, s. */
  push(times: Float64Array): void {
    let previous = this.#previous;
    const step = this.#step;
    for (let i = 0; i < times.length; i++) {
      const dt = times[i] - previous;
      previous = times[i];
      if (this.#index + i === 0) continue; // the first record
      // A step that does not advance (or a NaN time) is the worst there can be.
      const error = dt > 0 ? Math.abs(dt - step) : Infinity;
      if (error > this.#worst.error) this.#worst = { error, at: this.#index + i, dt };
    }
    this.#previous = previous;
    this.#index += times.length;
  }

  /** @throws {QuiverError} when the worst step is out of tolerance. */
  end(): void {
    const { error, at, dt } = this.#worst;
    if (at < 0 || error <= this.#tolerance * this.#step) return;
    throw new QuiverError(
      `the time master "${this.#name}" is not uniform: its worst step, record ${at} to ${
        at + 1
      }, is ${formatNumber(dt, 8)} s against ${
        formatNumber(this.#step, 8)
      } s from its first and last times; quiver reads equally spaced samples`,
      { file: this.#file },
    );
  }
}
