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
import { open } from "node:fs/promises";
import { QuiverError } from "../errors.ts";
import { type ChannelTransform, parseChannelSetup, setupTransforms } from "./channel_setup.ts";
import { parseHeaderCell, REFERENCE_STEPS, TIME_NAMES } from "./csv_reader.ts";
import type { ReadRecordingOptions } from "./read_recording.ts";
import type { ChannelRole } from "./recording.ts";
import { looksLikeWav, parseWav } from "./wav.ts";
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
   *
   * @throws {StreamFallback} when the file turns out to need the in-memory reader.
   */
  read(selected: readonly number[], onChunk: (chunk: Float64Array[]) => void): Promise<void>;
}

/** Rows (frames) per chunk. */
export const CHUNK_ROWS = 65536;
const READ_BYTES = 1 << 22;

const DOT_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

async function transformsFor(
  channels: { name: string; unit: string }[],
  options: ReadRecordingOptions,
): Promise<ChannelTransform[]> {
  if (options.setup === undefined) return channels.map((c) => ({ ...c, factor: 1 }));
  let text: string;
  try {
    text = await readFile(options.setup, "utf8");
  } catch {
    throw new QuiverError("cannot read: no such file", { file: options.setup }, "usage");
  }
  return setupTransforms(channels, parseChannelSetup(text, options.setup), options.setup);
}

/** Reads lines of a file in order, decoded, without holding the file. */
async function* lines(path: string): AsyncGenerator<string> {
  const handle = await open(path, "r");
  try {
    const decoder = new TextDecoder("utf-8", { fatal: true });
    const buffer = new Uint8Array(READ_BYTES);
    let carry = "";
    let first = true;
    for (;;) {
      const { bytesRead } = await handle.read(buffer, 0, READ_BYTES, null);
      if (bytesRead === 0) break;
      let text = carry + decoder.decode(buffer.subarray(0, bytesRead), { stream: true });
      if (first && text.charCodeAt(0) === 0xfeff) text = text.slice(1);
      first = false;
      const parts = text.split("\n");
      carry = parts.pop() ?? "";
      for (const part of parts) yield part;
    }
    carry += decoder.decode();
    if (carry !== "") yield carry;
  } finally {
    await handle.close();
  }
}

const isBlankLine = (line: string) => /^[\s,]*$/.test(line);

async function openCsvStream(
  path: string,
  options: ReadRecordingOptions,
): Promise<RecordingStream> {
  if ((options.delimiter ?? "auto") !== "auto" && options.delimiter !== ",") {
    throw new StreamFallback("delimiter");
  }
  if (options.decimal === ",") throw new StreamFallback("decimal comma");
  // Pass 1: header, row count, first and last rows.
  let header: string | undefined;
  let firstRow: string | undefined;
  let lastRow: string | undefined;
  let rows = 0;
  for await (const raw of lines(path)) {
    const line = raw.endsWith("\r") ? raw.slice(0, -1) : raw;
    if (isBlankLine(line)) continue;
    if (header === undefined) {
      header = line;
      continue;
    }
    if (line.includes('"') || line.includes("\u0000")) {
      throw new StreamFallback("quotes or NUL in the data");
    }
    if (firstRow === undefined) firstRow = line;
    lastRow = line;
    rows++;
  }
  if (header === undefined || firstRow === undefined || lastRow === undefined) {
    throw new StreamFallback("no data");
  }
  if (header.includes(";") || header.includes("\t")) throw new StreamFallback("delimiter");
  const cells = header.split(",").map((c) => parseHeaderCell(c.trim().replace(/^"(.*)"$/, "$1")));
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
    const text = row.split(",")[column]?.trim() ?? "";
    if (!DOT_NUMBER.test(text)) throw new StreamFallback("cell");
    return Number(text);
  };
  let rate: number;
  let startTime = 0;
  if (timeColumn >= 0) {
    if (rows < 2) throw new StreamFallback("too short");
    startTime = valueOf(firstRow, timeColumn);
    const total = valueOf(lastRow, timeColumn) - startTime;
    if (!(total > 0)) throw new StreamFallback("time");
    const derived = (rows - 1) / total;
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
      const columns = selected.map((s) => channelColumns[s]);
      const factors = selected.map((s) => transforms[s].factor);
      let buffers = columns.map(() => new Float64Array(Math.min(CHUNK_ROWS, rows)));
      let filled = 0;
      let seen = 0;
      let previousTime = NaN;
      let reference = NaN;
      let tolerance = 0;
      const head: number[] = [];
      const flush = () => {
        if (filled === 0) return;
        const chunk = buffers.map((b, j) => {
          const part = b.subarray(0, filled);
          if (factors[j] !== 1) { for (let i = 0; i < part.length; i++) part[i] *= factors[j]; }
          return part;
        });
        onChunk(chunk);
        buffers = columns.map(() => new Float64Array(Math.min(CHUNK_ROWS, rows - seen)));
        filled = 0;
      };
      let isHeader = true;
      for await (const raw of lines(path)) {
        const line = raw.endsWith("\r") ? raw.slice(0, -1) : raw;
        if (isBlankLine(line)) continue;
        if (isHeader) {
          isHeader = false;
          continue;
        }
        const fields = line.split(",");
        if (fields.length !== width) throw new StreamFallback("ragged row");
        for (let c = 0; c < width; c++) {
          const text = fields[c].trim();
          if (!DOT_NUMBER.test(text)) throw new StreamFallback("cell");
          fields[c] = text;
        }
        for (let j = 0; j < columns.length; j++) {
          const v = Number(fields[columns[j]]);
          if (!Number.isFinite(v)) throw new StreamFallback("cell");
          buffers[j][filled] = v;
        }
        if (timeColumn >= 0) {
          const t = Number(fields[timeColumn]);
          if (!Number.isFinite(t)) throw new StreamFallback("cell");
          if (seen > 0) {
            const dt = t - previousTime;
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
          previousTime = t;
        }
        filled++;
        seen++;
        if (filled === buffers[0].length) flush();
      }
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
          for (let first = 0; first < frames; first += CHUNK_ROWS) {
            const count = Math.min(CHUNK_ROWS, frames - first);
            const bytes = new Uint8Array(44 + count * f.blockAlign);
            // A minimal WAV around this block, decoded by the one WAV decoder.
            const v = new DataView(bytes.buffer);
            bytes.set([82, 73, 70, 70], 0);
            v.setUint32(4, bytes.length - 8, true);
            bytes.set([87, 65, 86, 69, 102, 109, 116, 32], 8);
            v.setUint32(16, 16, true);
            v.setUint16(20, f.code, true);
            v.setUint16(22, f.channels, true);
            v.setUint32(24, f.rate, true);
            v.setUint32(28, f.rate * f.blockAlign, true);
            v.setUint16(32, f.blockAlign, true);
            v.setUint16(34, f.bits, true);
            bytes.set([100, 97, 116, 97], 36);
            v.setUint32(40, count * f.blockAlign, true);
            await h.read(bytes, 44, count * f.blockAlign, dataStart + first * f.blockAlign);
            const block = parseWav(bytes.subarray(0, 44 + count * f.blockAlign), path);
            onChunk(selected.map((s) => {
              const factor = transforms[s].factor;
              const d = block.channels[s].data;
              if (factor !== 1) { for (let i = 0; i < d.length; i++) d[i] *= factor; }
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
