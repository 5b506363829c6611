/**
 * Reading a recording in chunks, so that an analysis that can run on
 * chunks (the spectral core's running averages) needs memory for one chunk
 * only, however long the recording.
 *
 * WAV: the header is read, then the data chunk frame block by frame block.
 *
 * CSV, the fast path for the common clean numeric file (`,` delimiter, `.`
 * decimal mark, no quotes in the data): a first pass over the bytes counts
 * the rows and reads the last time stamp (the rate comes from the end points,
 * as in csv_reader.ts); the second pass tokenises the bytes itself and turns
 * each cell into a number with the same strict grammar as the in-memory
 * reader, so both give identical numbers.
 *
 * Anything unusual (quotes, `;` or decimal commas, a bad cell, a ragged row,
 * an irregular time step) makes the stream give up with
 * {@linkcode StreamFallback}; the caller then reads the file whole with the
 * in-memory reader (papaparse), which either reads it or raises the precise
 * error with file, line and column.
 *
 * @module
 */
import { decimalsWritten, nominalRate } from "./time_axis.ts";
import { notUtf8Text } from "./text_encoding.ts";
import { open } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { type ChannelTransform, parseChannelSetup, setupTransforms } from "./channel_setup.ts";
import { parseHeaderCell, REFERENCE_STEPS, TIME_NAMES } from "./csv_reader.ts";
import type { ReadRecordingOptions } from "./read_recording.ts";
import type { ChannelRole } from "./recording.ts";
import {
  decodeWavFrames,
  FORMAT_FLOAT,
  looksLikeWav,
  parseWav,
  refuseNonFiniteSamples,
} from "./wav.ts";
import { ChannelStatistics } from "./signal_checks.ts";
import { readFile } from "node:fs/promises";

/** Thrown when a file needs the in-memory reader after all. */
export class StreamFallback extends Error {
  constructor(reason: string) {
    super(reason);
    this.name = "StreamFallback";
  }
}

/** A recording opened for chunked reading. */
export interface RecordingStream {
  /** Sample rate, Hz. */
  readonly rate: number;
  /** Time of the first sample, s. */
  readonly startTime: number;
  /** Samples per channel. */
  readonly length: number;
  /** The channels after the set-up (names, units, roles). */
  readonly channels: readonly { name: string; unit: string; role?: ChannelRole }[];
  /**
   * Reads the channels with the given indices in order, chunk by chunk.
   * A chunk's arrays are valid during the callback only: they are reused.
   *
   * @throws {StreamFallback} when the file turns out to need the in-memory reader.
   */
  read(selected: readonly number[], onChunk: (chunk: Float64Array[]) => void): Promise<void>;
}

/** Rows (frames) per chunk. */
export const CHUNK_ROWS = 65536;
const READ_BYTES = 1 << 20;

async function transformsFor(
  channels: { name: string; unit: string }[],
  options: ReadRecordingOptions,
): Promise<ChannelTransform[]> {
  // Without a set-up the transforms still convert units to their SI base (units.ts).
  if (options.setup === undefined) return setupTransforms(channels, { channels: {} });
  let text: string;
  try {
    text = await readFile(options.setup, "utf8");
  } catch {
    throw new QuiverError("cannot read: no such file", { file: options.setup }, "usage");
  }
  return setupTransforms(channels, parseChannelSetup(text, options.setup), options.setup);
}

/**
 * Parses the number in text[start, end) with the grammar of the in-memory
 * reader ([+-]digits[.digits][e[+-]digits]), or returns NaN. The conversion
 * is Number() itself, on the same characters as the in-memory reader's, so
 * both give identical doubles; the checks around it refuse what Number()
 * would accept but the grammar does not (empty cells, Infinity, hex, binary
 * and octal literals, surrounding whitespace; the in-memory reader handles
 * whitespace).
 *
 * @example
 * ```ts
 * import { parseNumberAt } from "./recording_stream.ts";
 * if (parseNumberAt("-1.25e-3", 0, 8) !== -0.00125 || !Number.isNaN(parseNumberAt("0x1f", 0, 4))) throw new Error();
 * ```
 */
export function parseNumberAt(text: string, start: number, end: number): number {
  if (end <= start) return NaN;
  let k = start;
  let c = text.charCodeAt(k);
  if (c === 43 || c === 45) c = text.charCodeAt(++k);
  if (!((c >= 48 && c <= 57) || c === 46)) return NaN;
  if (c === 48 && k + 1 < end) {
    const next = text.charCodeAt(k + 1) | 32; // lower case
    if (next === 120 || next === 98 || next === 111) return NaN; // 0x, 0b, 0o
  }
  const last = text.charCodeAt(end - 1);
  if (!((last >= 48 && last <= 57) || last === 46)) return NaN; // trailing space, sign or letter
  const value = +text.slice(start, end);
  return value - value === 0 ? value : NaN; // NaN and ±Infinity fail
}

/** Reads a file chunk by chunk as text, without holding the file; refuses bytes that are not UTF-8. */
async function* textChunks(path: string): AsyncGenerator<string> {
  try {
    yield* decodedChunks(path);
  } catch (error) {
    // The whole-file reader's message for the same fault: one reader, one message.
    if (error instanceof TypeError) throw notUtf8Text(path);
    throw error;
  }
}

async function* decodedChunks(path: string): AsyncGenerator<string> {
  const handle = await open(path, "r");
  try {
    const decoder = new TextDecoder("utf-8", { fatal: true });
    const buffer = new Uint8Array(READ_BYTES);
    for (;;) {
      const { bytesRead } = await handle.read(buffer, 0, READ_BYTES, null);
      if (bytesRead === 0) break;
      yield decoder.decode(buffer.subarray(0, bytesRead), { stream: true });
    }
    const rest = decoder.decode();
    if (rest !== "") yield rest;
  } finally {
    await handle.close();
  }
}

const isBlankLine = (line: string) => /^[\s,]*$/.test(line);

/** Pass 1 over the bytes: row count, header, first and last data rows. */
async function scanCsv(
  path: string,
): Promise<{ header: string; first: string; last: string; rows: number }> {
  const handle = await open(path, "r");
  try {
    const size = (await handle.stat()).size;
    const buffer = new Uint8Array(READ_BYTES);
    let newlines = 0;
    let offset = 0;
    let lastContent = -1; // position of the last byte that is not whitespace
    let newlinesBeforeContentEnd = 0;
    for (;;) {
      const { bytesRead } = await handle.read(buffer, 0, READ_BYTES, offset);
      if (bytesRead === 0) break;
      const view = buffer.subarray(0, bytesRead);
      if (view.indexOf(34) >= 0 || view.indexOf(0) >= 0) throw new StreamFallback("quotes or NUL");
      let chunkLast = -1;
      for (let k = bytesRead - 1; k >= 0; k--) {
        const b = view[k];
        if (b !== 10 && b !== 13 && b !== 32 && b !== 9) {
          chunkLast = k;
          break;
        }
      }
      for (let at = view.indexOf(10); at >= 0; at = view.indexOf(10, at + 1)) {
        newlines++;
        if (at < chunkLast) newlinesBeforeContentEnd = newlines;
      }
      if (chunkLast >= 0) {
        lastContent = offset + chunkLast;
        // Every newline of this chunk before its last content byte, plus all earlier ones.
      }
      offset += bytesRead;
    }
    if (lastContent < 0) throw new StreamFallback("empty");
    const tailStart = Math.max(0, lastContent + 1 - 65536);
    const tail = new Uint8Array(lastContent + 1 - tailStart);
    await handle.read(tail, 0, tail.length, tailStart);
    const tailText = new TextDecoder().decode(tail);
    const last = tailText.slice(tailText.lastIndexOf("\n") + 1).replace(/\r$/, "");
    const head = new Uint8Array(Math.min(size, 65536));
    await handle.read(head, 0, head.length, 0);
    let headText = new TextDecoder().decode(head);
    if (headText.charCodeAt(0) === 0xfeff) headText = headText.slice(1);
    const headLines = headText.split("\n").map((l) => l.replace(/\r$/, ""));
    // Lines up to the last content = newlines before it + 1; data rows = lines − 1.
    return {
      header: headLines[0] ?? "",
      first: headLines[1] ?? "",
      last,
      rows: newlinesBeforeContentEnd,
    };
  } finally {
    await handle.close();
  }
}

async function openCsvStream(
  path: string,
  options: ReadRecordingOptions,
): Promise<RecordingStream> {
  if ((options.delimiter ?? "auto") !== "auto" && options.delimiter !== ",") {
    throw new StreamFallback("delimiter");
  }
  if (options.decimal === ",") throw new StreamFallback("decimal comma");
  const { header, first: firstRow, last: lastRow, rows } = await scanCsv(path);
  if (rows < 1 || isBlankLine(firstRow)) throw new StreamFallback("no data or blank lines");
  if (header.includes(";") || header.includes("\t")) throw new StreamFallback("delimiter");
  const cells = header.split(",").map((c) => parseHeaderCell(c.trim()));
  const names = new Set<string>();
  for (const c of cells) {
    if (c.name === "" || names.has(c.name)) throw new StreamFallback("header");
    names.add(c.name);
  }
  const timeColumns = cells.map((c, i) => (TIME_NAMES.has(c.name.toLowerCase()) ? i : -1)).filter((
    i,
  ) => i >= 0);
  if (timeColumns.length > 1) throw new StreamFallback("two time columns");
  const timeColumn = timeColumns[0] ?? -1;
  if (timeColumn >= 0 && cells[timeColumn].unit !== "" && cells[timeColumn].unit !== "s") {
    throw new StreamFallback("time unit");
  }
  const valueOf = (row: string, column: number) => {
    const fields = row.split(",");
    if (fields.length !== cells.length) throw new StreamFallback("ragged row");
    const v = parseNumberAt(fields[column], 0, fields[column].length);
    if (Number.isNaN(v)) throw new StreamFallback("cell");
    return v;
  };
  let rate: number;
  let startTime = 0;
  if (timeColumn >= 0) {
    if (rows < 2) throw new StreamFallback("too short");
    startTime = valueOf(firstRow, timeColumn);
    const total = valueOf(lastRow, timeColumn) - startTime;
    if (!(total > 0)) throw new StreamFallback("time");
    const timeCell = (row: string) => row.split(",")[timeColumn].trim();
    const decimals = Math.max(
      decimalsWritten(timeCell(firstRow)),
      decimalsWritten(timeCell(lastRow)),
    );
    // The same rule as the whole-file reader (time_axis.ts); the stream checks
    // the steps in between as it reads.
    const derived = nominalRate(rows, total, decimals);
    if (options.rate !== undefined) {
      if (Math.abs(derived - options.rate) > 1e-3 * options.rate) throw new StreamFallback("rate");
      rate = options.rate;
    } else {
      rate = derived;
    }
  } else {
    if (options.rate === undefined) throw new StreamFallback("no rate");
    rate = options.rate;
  }
  const channelColumns = cells.map((_, i) => i).filter((i) => i !== timeColumn);
  if (channelColumns.length === 0) throw new StreamFallback("no channels");
  const transforms = await transformsFor(channelColumns.map((i) => cells[i]), options);
  const width = cells.length;
  return {
    rate,
    startTime,
    length: rows,
    channels: transforms.map(({ factor: _f, ...meta }) => meta),
    async read(selected, onChunk) {
      // target[c] is the output index of file column c, or −1.
      const target = new Int32Array(width).fill(-1);
      selected.forEach((s, j) => (target[channelColumns[s]] = j));
      const factors = selected.map((s) => transforms[s].factor);
      // One array per channel, reused for every chunk.
      const chunkRows = Math.min(CHUNK_ROWS, rows);
      const buffers = selected.map(() => new Float64Array(chunkRows));
      let filled = 0;
      let seen = 0;
      let previousTime = NaN;
      let reference = NaN;
      let tolerance = 0;
      const head: number[] = [];
      const flush = () => {
        if (filled === 0) return;
        onChunk(buffers.map((b, j) => {
          const part = b.subarray(0, filled);
          if (factors[j] !== 1) { for (let i = 0; i < part.length; i++) part[i] *= factors[j]; }
          return part;
        }));
        filled = 0;
      };
      const row = (text: string, start: number, end: number) => {
        if (seen >= rows) throw new StreamFallback("more rows than counted");
        let column = 0;
        let fieldStart = start;
        let time = NaN;
        for (;;) {
          const comma = text.indexOf(",", fieldStart);
          const stop = comma < 0 || comma > end ? end : comma;
          if (column >= width) throw new StreamFallback("ragged row");
          const v = parseNumberAt(text, fieldStart, stop);
          if (Number.isNaN(v)) throw new StreamFallback("cell");
          const j = target[column];
          if (j >= 0) buffers[j][filled] = v;
          if (column === timeColumn) time = v;
          column++;
          if (stop === end) break;
          fieldStart = stop + 1;
        }
        if (column !== width) throw new StreamFallback("ragged row");
        if (timeColumn >= 0) {
          if (seen > 0) {
            const dt = time - previousTime;
            if (!(dt > 0)) throw new StreamFallback("time");
            if (Number.isNaN(reference)) {
              // The reference is the median of the first steps, as in csv_reader.ts.
              head.push(dt);
              if (head.length === REFERENCE_STEPS || seen === rows - 1) {
                const sorted = head.slice().sort((x, y) => x - y);
                reference = sorted[Math.floor((sorted.length - 1) / 2)];
                tolerance = (options.timeTolerance ?? 0.01) * reference;
                if (head.some((d) => Math.abs(d - reference) > tolerance)) {
                  throw new StreamFallback("time step");
                }
              }
            } else if (Math.abs(dt - reference) > tolerance) {
              throw new StreamFallback("time step");
            }
          }
          previousTime = time;
        }
        filled++;
        seen++;
        if (filled === chunkRows) flush();
      };
      let carry = "";
      let headerSkipped = false;
      for await (const piece of textChunks(path)) {
        let text = carry + piece;
        if (!headerSkipped) {
          if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
          const nl = text.indexOf("\n");
          if (nl < 0) {
            carry = text;
            continue;
          }
          text = text.slice(nl + 1);
          headerSkipped = true;
        }
        let pos = 0;
        for (let nl = text.indexOf("\n"); nl >= 0; nl = text.indexOf("\n", pos)) {
          const end = nl > pos && text.charCodeAt(nl - 1) === 13 ? nl - 1 : nl;
          if (seen < rows) {
            if (end === pos) throw new StreamFallback("blank line"); // the whole-file reader handles those
            row(text, pos, end);
          } else if (end > pos && text.slice(pos, end).trim() !== "") {
            throw new StreamFallback("more rows than counted");
          }
          pos = nl + 1;
        }
        carry = text.slice(pos);
      }
      const last = carry.replace(/\r$/, "");
      if (last.trim() !== "") row(last, 0, last.length);
      if (seen !== rows) throw new StreamFallback("row count");
      flush();
    },
  };
}

async function openWavStream(
  path: string,
  options: ReadRecordingOptions,
): Promise<RecordingStream> {
  const handle = await open(path, "r");
  try {
    const size = (await handle.stat()).size;
    const head = new Uint8Array(Math.min(size, 1 << 20));
    await handle.read(head, 0, head.length, 0);
    if (!looksLikeWav(head)) throw new StreamFallback("not WAV");
    const view = new DataView(head.buffer);
    let offset = 12;
    let fmt:
      | { code: number; channels: number; rate: number; blockAlign: number; bits: number }
      | undefined;
    let dataStart = -1;
    let dataBytes = 0;
    while (offset + 8 <= head.length) {
      const id = String.fromCharCode(...head.subarray(offset, offset + 4));
      const chunkSize = view.getUint32(offset + 4, true);
      if (id === "data") {
        dataStart = offset + 8;
        dataBytes = chunkSize;
        break;
      }
      if (id === "fmt " && offset + 8 + 16 <= head.length) {
        let code = view.getUint16(offset + 8, true);
        if (code === 0xfffe && offset + 8 + 26 <= head.length) {
          code = view.getUint16(offset + 8 + 24, true);
        }
        fmt = {
          code,
          channels: view.getUint16(offset + 10, true),
          rate: view.getUint32(offset + 12, true),
          blockAlign: view.getUint16(offset + 20, true),
          bits: view.getUint16(offset + 22, true),
        };
      }
      offset += 8 + chunkSize + (chunkSize % 2);
    }
    if (
      fmt === undefined || dataStart < 0 || dataStart + dataBytes > size ||
      dataBytes % fmt.blockAlign !== 0
    ) {
      throw new StreamFallback("header"); // the in-memory reader names the fault
    }
    if (options.rate !== undefined) throw new StreamFallback("rate given for WAV");
    const f = fmt;
    // Validate the format with the in-memory decoder on a header-only copy.
    const probe = new Uint8Array(dataStart + f.blockAlign);
    probe.set(head.subarray(0, dataStart));
    new DataView(probe.buffer).setUint32(dataStart - 4, f.blockAlign, true);
    const decoded = parseWav(probe, path);
    const frames = dataBytes / f.blockAlign;
    const transforms = await transformsFor(
      decoded.channels.map((c) => ({ name: c.name, unit: c.unit })),
      options,
    );
    return {
      rate: f.rate,
      startTime: 0,
      length: frames,
      channels: transforms.map(({ factor: _f, ...meta }) => meta),
      async read(selected, onChunk) {
        const h = await open(path, "r");
        try {
          // One byte buffer and one sample array per channel, reused for every chunk.
          const rows = Math.min(CHUNK_ROWS, frames);
          const bytes = new Uint8Array(rows * f.blockAlign);
          const view = new DataView(bytes.buffer);
          const samples = Array.from({ length: f.channels }, () => new Float64Array(rows));
          const factors = selected.map((s) => transforms[s].factor);
          for (let first = 0; first < frames; first += CHUNK_ROWS) {
            const count = Math.min(CHUNK_ROWS, frames - first);
            await h.read(bytes, 0, count * f.blockAlign, dataStart + first * f.blockAlign);
            decodeWavFrames(view, 0, count, f, samples);
            if (f.code === FORMAT_FLOAT) refuseNonFiniteSamples(samples, count, first, path);
            onChunk(selected.map((s, j) => {
              const d = samples[s].subarray(0, count);
              if (factors[j] !== 1) { for (let i = 0; i < d.length; i++) d[i] *= factors[j]; }
              return d;
            }));
          }
        } finally {
          await h.close();
        }
      },
    };
  } finally {
    await handle.close();
  }
}

/**
 * Reads the channels with the given indices through `onChunk` and returns
 * their signal warnings (signal_checks.ts). The statistics see each chunk
 * before `onChunk`, which may then change it in place.
 *
 * @throws {StreamFallback} as {@linkcode RecordingStream.read} does.
 */
export async function readChecked(
  stream: RecordingStream,
  indices: readonly number[],
  onChunk: (chunk: Float64Array[]) => void,
): Promise<string[]> {
  const statistics = indices.map(() => new ChannelStatistics());
  await stream.read(indices, (chunk) => {
    chunk.forEach((c, i) => statistics[i].push(c));
    onChunk(chunk);
  });
  return indices.flatMap((channel, i) => statistics[i].warnings(stream.channels[channel]));
}

/**
 * Opens a recording for chunked reading, or throws {@linkcode StreamFallback}
 * when the file needs the in-memory reader.
 *
 * @throws {QuiverError} for a missing file or a bad set-up.
 */
export async function openRecordingStream(
  path: string,
  options: ReadRecordingOptions = {},
): Promise<RecordingStream> {
  let magic: Uint8Array;
  try {
    const h = await open(path, "r");
    try {
      magic = new Uint8Array(12);
      await h.read(magic, 0, 12, 0);
    } finally {
      await h.close();
    }
  } catch (error) {
    if (error instanceof StreamFallback) throw error;
    throw new StreamFallback("unreadable"); // the in-memory reader says why
  }
  if (looksLikeWav(magic)) return await openWavStream(path, options);
  try {
    return await openCsvStream(path, options);
  } catch (error) {
    if (error instanceof QuiverError || error instanceof StreamFallback) throw error;
    throw new StreamFallback(error instanceof Error ? error.message : String(error));
  }
}
