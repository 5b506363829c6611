import { mkdtemp, writeFile } from "node:fs/promises";
import { readFileSync } from "node:fs";
import { describe, expect, test } from "vitest";
import { CsvScanner } from "../../lib/io/csv_engine.ts";
import { csvParseWorkers, readCsvInWorkers } from "../../lib/io/csv_parallel.ts";
import { CHUNK_ROWS, openRecordingStream } from "../../lib/io/recording_stream.ts";
import type { CsvParsing } from "../../lib/io/csv_parallel.ts";
import { QuiverError } from "../../lib/errors.ts";
import { uniformGenerator } from "../helpers/random.ts";

// The parse on several cores must give what the parse in one thread gives: the same
// chunks, the same values to the bit, the same first fault (csv_parallel.ts). The
// reference is the one-thread parse, itself checked against Number(text) and scipy
// elsewhere (number_parsing.test.ts, csv_reader.test.ts).

const ROWS = 3 * CHUNK_ROWS + 4321; // four segments, the last one short
const dir = await mkdtemp("/tmp/quiver-csv-parallel-");

/** Rows of a 3-channel recording at 2048 Hz in varied number spellings; `edit` may change row i. */
function csvText(
  options: { delimiter?: string; comma?: boolean; edit?: (i: number, row: string) => string } = {},
): string {
  const d = options.delimiter ?? ",";
  const uniform = uniformGenerator(77);
  const lines = ["\ufefftime_s" + d + "a [V]" + d + "b [m/s^2]" + d + "c [Pa]"];
  for (let i = 0; i < ROWS; i++) {
    const u = uniform() - 0.5;
    const spellings = [
      u.toPrecision(9),
      u.toExponential(6),
      String(u), // up to 17 significant digits: the Number() path
      ` ${(u * 1e3).toFixed(2)} `, // padded
      String(Math.round(u * 100)), // integers, -0 among them
    ];
    const cells = [
      String(i / 2048),
      spellings[i % 5],
      spellings[(i + 1) % 5],
      spellings[(i + 3) % 5],
    ].map((c) => options.comma === true ? c.replace(".", ",") : c);
    let row = cells.join(d) + (i % 7 === 0 ? "\r" : "");
    if (options.edit !== undefined) row = options.edit(i, row);
    lines.push(row);
    if (i === 100_000) lines.push(""); // a blank row: lines and rows part ways
  }
  return lines.join("\n") + "\n";
}

async function written(name: string, text: string): Promise<string> {
  const path = `${dir}/${name}`;
  await writeFile(path, text);
  return path;
}

/** Every chunk's length and values, and the error, of reading `path`. */
async function readAll(
  path: string,
  parsing: CsvParsing,
  selected = [2, 0, 1],
  options: { decimal?: "," } = {},
): Promise<{ chunks: number[][][]; error?: string }> {
  const chunks: number[][][] = [];
  try {
    const stream = await openRecordingStream(path, { csvParsing: parsing, ...options });
    await stream.read(selected, (chunk) => chunks.push(chunk.map((c) => Array.from(c))));
  } catch (e) {
    return { chunks, error: (e as Error).message };
  }
  return { chunks };
}

function sameBits(a: number[][][], b: number[][][]): boolean {
  if (a.length !== b.length) return false;
  return a.every((chunk, k) =>
    chunk.length === b[k].length &&
    chunk.every((c, j) =>
      c.length === b[k][j].length && c.every((v, i) => Object.is(v, b[k][j][i]))
    )
  );
}

describe("parsing a CSV file with workers", () => {
  test("gives the chunks and values of the parse in one thread, to the bit", async () => {
    const path = await written("clean.csv", csvText());
    const here = await readAll(path, "here");
    const workers = await readAll(path, "workers");
    expect(here.error).toBeUndefined();
    expect(workers.error).toBeUndefined();
    expect(here.chunks.map((c) => c[0].length)).toEqual([
      CHUNK_ROWS,
      CHUNK_ROWS,
      CHUNK_ROWS,
      4321,
    ]);
    expect(sameBits(workers.chunks, here.chunks)).toBe(true);
    // Spot checks against the text itself: row 150 000 (after the blank row), channel c.
    const row = readFileSync(path, "utf8").split("\n")[150_000 + 2].split(",");
    expect(workers.chunks[2][0][150_000 - 2 * CHUNK_ROWS]).toBe(Number(row[3]));
  });

  test("does use workers, and one segment per chunk (readCsvInWorkers directly)", async () => {
    const path = await written("direct.csv", csvText());
    const scanner = new CsvScanner({ file: path, checkpointEvery: CHUNK_ROWS });
    const bytes = readFileSync(path);
    scanner.push(bytes);
    const scan = scanner.end();
    expect(scan.checkpoints?.offsets.length).toBe(3);
    const file = { bytes: 0, channels: 2, timeColumn: 0, mark: "." as const };
    const workers = csvParseWorkers(scan, file, "workers");
    expect(workers).toBeGreaterThanOrEqual(1);
    const lengths: number[] = [];
    const sums = [0, 0];
    await readCsvInWorkers({
      path,
      file: path,
      size: bytes.length,
      scan,
      width: 4,
      columns: [3, 1],
      factors: [1, 2],
      timeColumn: 0,
      decimal: ".",
      workers,
    }, (chunk) => {
      lengths.push(chunk[0].length);
      for (let i = 0; i < chunk[0].length; i++) {
        sums[0] += chunk[0][i];
        sums[1] += chunk[1][i];
      }
    });
    expect(lengths).toEqual([CHUNK_ROWS, CHUNK_ROWS, CHUNK_ROWS, 4321]);
    const here = await readAll(path, "here", [2, 0]);
    const expected = [0, 0];
    for (const chunk of here.chunks) {
      for (let i = 0; i < chunk[0].length; i++) {
        expected[0] += chunk[0][i];
        expected[1] += 2 * chunk[1][i]; // the factor, applied once
      }
    }
    expect(sums).toEqual(expected);
  });

  test("a checkpoint is the byte offset and line of its data row", () => {
    const text = csvText();
    const bytes = new TextEncoder().encode(text);
    const scanner = new CsvScanner({ checkpointEvery: CHUNK_ROWS });
    for (let at = 0; at < bytes.length; at += 99_991) { // pushes that split rows anywhere
      scanner.push(bytes.subarray(at, Math.min(bytes.length, at + 99_991)));
    }
    const { offsets, lines } = scanner.end().checkpoints!;
    const allLines = text.split("\n");
    for (let k = 0; k < 3; k++) {
      const dataRow = (k + 1) * CHUNK_ROWS;
      // line = header + data rows before + the blank row once past row 100 000
      const line = 2 + dataRow + (dataRow > 100_001 ? 1 : 0);
      expect(lines[k]).toBe(line);
      const offset = new TextEncoder().encode(allLines.slice(0, line - 1).join("\n") + "\n").length;
      expect(offsets[k]).toBe(offset);
      expect(allLines[line - 1].startsWith(String(dataRow / 2048))).toBe(true);
    }
  });

  test("semicolons and decimal commas: the same values", async () => {
    const path = await written("semicolon.csv", csvText({ delimiter: ";", comma: true }));
    const here = await readAll(path, "here");
    const workers = await readAll(path, "workers");
    expect(here.error).toBeUndefined();
    expect(sameBits(workers.chunks, here.chunks)).toBe(true);
  });

  // Faults in several segments: the first in file order is the one reported, with the
  // message of the parse in one thread; chunks before it are handed on alike.
  // Lines: header, data row i on line i + 2, one more after the blank row past row 100 000.
  const faults: [string, (i: number, row: string) => string, RegExp][] = [
    [
      "a bad cell in segment 2, a time jump in segment 3",
      (i, row) =>
        i === 150_000 ? row.replace(/,[^,]*,/, ",1.2.3,") : i === 200_000 ? `9999,1,2,3` : row,
      /fault\.csv:150003:2: "1\.2\.3" is not a number$/,
    ],
    [
      "a time jump in segment 1, a bad cell in segment 2",
      (i, row) =>
        i === 70_000 ? `9999,1,2,3` : i === 150_000 ? row.replace(/,[^,]*,/, ",abc,") : row,
      /fault\.csv:70002:1: time step of .* a gap, jump or jitter/,
    ],
    [
      "a time jump, then a bad cell, both in segment 2",
      (i, row) =>
        i === 140_000 ? `9999,1,2,3` : i === 150_000 ? row.replace(/,[^,]*,/, ",abc,") : row,
      /fault\.csv:140003:1: time step of .* a gap, jump or jitter/,
    ],
    [
      "a short row in the last segment",
      (i, row) => i === ROWS - 10 ? "1,2" : row,
      /fault\.csv:200922: row has 2 fields, the header has 4$/,
    ],
    [
      "a bad cell in the first segment",
      (i, row) => i === 5 ? row.replace(/,[^,]*,/, ",NaN,") : row,
      /fault\.csv:7:2: "NaN" is not a finite number/,
    ],
    [
      "a bad cell on the first row of segment 3",
      (i, row) => i === 2 * CHUNK_ROWS ? row.replace(/,[^,]*,/, ",1e,") : row,
      /fault\.csv:131075:2: "1e" is not a number$/,
    ],
  ];
  for (const [what, edit, message] of faults) {
    test(`${what}: the same error`, async () => {
      const path = await written("fault.csv", csvText({ edit }));
      const here = await readAll(path, "here");
      const workers = await readAll(path, "workers");
      expect(here.error).toMatch(message);
      expect(workers.error).toBe(here.error);
      expect(sameBits(workers.chunks, here.chunks)).toBe(true);
    });
  }

  // A file still being written between the two passes: both parses name it, neither reads on.
  for (
    const [what, change] of [
      [
        "rows appended",
        (text: string) => text + `${ROWS / 2048},1,2,3\n${(ROWS + 1) / 2048},1,2,3\n`,
      ],
      [
        "a good row, then a bad one appended",
        (text: string) => text + `${ROWS / 2048},1,2,3\nx,y\n`,
      ],
      ["a partial row appended", (text: string) => text + `${ROWS / 2048},1.5`],
      [
        "the last 100 rows cut off",
        (text: string) => text.split("\n").slice(0, -101).join("\n") + "\n",
      ],
      ["cut mid-row inside the first segment", (text: string) => text.slice(0, 3_000_000)],
    ] as const
  ) {
    test(`a file that changes between the passes (${what}): the same error from both`, async () => {
      const text = csvText();
      const messages: string[] = [];
      for (const parsing of ["here", "workers"] as const) {
        const path = await written(`changing_${parsing}.csv`, text);
        const stream = await openRecordingStream(path, { csvParsing: parsing });
        await writeFile(path, change(text));
        let delivered = 0;
        const error = await stream.read([0], (chunk) => delivered += chunk[0].length).then(
          () => undefined,
          (e) => e,
        );
        expect(error, parsing).toBeInstanceOf(QuiverError);
        expect(delivered, parsing).toBeLessThanOrEqual(stream.length); // no row beyond those counted
        messages.push(error.message.replace(/changing_\w+\.csv/, "changing.csv"));
      }
      expect(messages[0]).toMatch(/the file changed while it was read/);
      expect(messages[1]).toBe(messages[0]);
    });
  }
});
