import { readFileSync } from "node:fs";
import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { QuiverError } from "../../lib/errors.ts";
import { readRecordingFile } from "../../lib/io/read_recording.ts";
import { runQuiver } from "../helpers/cli.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";

// Damaged and unsupported MDF 4 files: the fixtures of tests/reference/make_mdf4_reference.py
// with bytes changed where the script's record of the blocks (mdf4_reference.json) places them.
// Every refusal names the file, the block and its byte offset (common practice for a reader's
// messages); data faults exit 1, usage faults 2 (cli/exit_codes.ts).
interface Mdf4Reference {
  files: Record<
    string,
    { bytes: number; blocks: { name: string; id: string; offset: number; length: number }[] }
  >;
}
const reference = readJsonFixture<Mdf4Reference>("reference/mdf4_reference.json");
const bytesOf = (name: string) =>
  new Uint8Array(readFileSync(fixturePath(`recordings/mdf4/${name}`)));
const block = (file: string, name: string) => {
  const b = reference.files[file].blocks.find((x) => x.name === name);
  if (b === undefined) throw new Error(name);
  return b;
};

async function damaged(name: string, bytes: Uint8Array): Promise<string> {
  const dir = await mkdtemp("/tmp/quiver-mdf4-bad-");
  const path = `${dir}/${name}`;
  await writeFile(path, bytes);
  return path;
}

async function refusal(path: string, group?: string): Promise<QuiverError> {
  try {
    await readRecordingFile(path, group === undefined ? {} : { group });
  } catch (error) {
    if (error instanceof QuiverError) return error;
    throw error;
  }
  throw new Error(`${path} was read`);
}

/** The one-line message and exit code of `quiver info` and of `quiver spectrum`. */
function expectCli(path: string, message: string, code: number, group?: string): void {
  const extra = group === undefined ? [] : ["--group", group];
  const info = runQuiver(["info", path, ...extra]);
  expect([info.code, info.stderr, info.stdout]).toEqual([
    code,
    `quiver info: ${path}: ${message}\n`,
    "",
  ]);
}

describe("damaged MDF 4 files are refused naming file, block and offset", () => {
  test("a truncated block: the file ends inside a CN block", { timeout: 120_000 }, async () => {
    const cn = block("sorted_dt.mf4", "cn_volt");
    const path = await damaged("cut.mf4", bytesOf("sorted_dt.mf4").slice(0, cn.offset + 30));
    const message =
      `the CN block at byte ${cn.offset} declares ${cn.length} bytes, past the end of the file (truncated: 30 bytes remain)`;
    expect((await refusal(path)).message).toBe(`${path}: ${message}`);
    expectCli(path, message, 1);
  });

  test("a link past the end of the file", { timeout: 120_000 }, async () => {
    const bytes = bytesOf("sorted_dt.mf4");
    const cg = block("sorted_dt.mf4", "cg");
    // cg_cn_first is the CG's second link, after the 24-byte header and the first link.
    new DataView(bytes.buffer).setBigUint64(cg.offset + 24 + 8, BigInt(bytes.length + 800), true);
    const path = await damaged("link.mf4", bytes);
    const message = `the CG block at byte ${cg.offset} links its first channel at byte ${
      bytes.length + 800
    }, past the end of the file (${bytes.length} bytes)`;
    expect((await refusal(path)).message).toBe(`${path}: ${message}`);
    expectCli(path, message, 1);
  });

  test(
    "a data block whose size reaches past the end of the file",
    { timeout: 120_000 },
    async () => {
      const dt = block("sorted_dt.mf4", "dt"); // the last block of the file
      const path = await damaged("short.mf4", bytesOf("sorted_dt.mf4").slice(0, dt.offset + 100));
      const message =
        `the DT block at byte ${dt.offset} declares ${dt.length} bytes, past the end of the file (truncated: 100 bytes remain)`;
      expect((await refusal(path)).message).toBe(`${path}: ${message}`);
      expectCli(path, message, 1);
    },
  );

  test("a DZ block that does not inflate", { timeout: 120_000 }, async () => {
    const bytes = bytesOf("zipped_hl.mf4");
    const dz = block("zipped_hl.mf4", "dz1");
    // The zlib stream starts after the header (24 bytes) and the DZ fields (24 bytes).
    bytes.fill(0xff, dz.offset + 48, dz.offset + 56);
    const path = await damaged("zip.mf4", bytes);
    const error = await refusal(path);
    expect(error.message).toMatch(
      new RegExp(
        `^${
          path.replace(/[.]/g, "\\.")
        }: the DZ block at byte ${dz.offset} does not inflate \\(.+\\)$`,
      ),
    );
    expect(error.kind).toBe("data");
    const r = runQuiver(["spectrum", path, "--out", `${path}.psd.csv`]);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(`${path}: the DZ block at byte ${dz.offset} does not inflate (`);
    expect(r.stderr.trim().split("\n").length).toBe(1);
  });

  test("an unknown block id where a data group is expected", { timeout: 120_000 }, async () => {
    const bytes = bytesOf("sorted_dt.mf4");
    const dg = block("sorted_dt.mf4", "dg");
    bytes.set(new TextEncoder().encode("##QZ"), dg.offset);
    const path = await damaged("id.mf4", bytes);
    const message = `expected a DG block (the first data group) at byte ${dg.offset}, found "##QZ"`;
    expect((await refusal(path)).message).toBe(`${path}: ${message}`);
    expectCli(path, message, 1);
  });

  test(
    "an invalidation bit set: the record is named, not read as a value",
    { timeout: 120_000 },
    async () => {
      const bytes = bytesOf("sorted_dt.mf4");
      const dt = block("sorted_dt.mf4", "dt");
      // Record 7 (1-based) of 29 bytes; its invalidation byte is the 29th; bit 0 marks acc invalid.
      bytes[dt.offset + 24 + 6 * 29 + 28] |= 1;
      const path = await damaged("invalid.mf4", bytes);
      expect((await refusal(path)).message).toBe(
        `${path}: channel "acc", record 7: the value is marked invalid; quiver reads valid samples only`,
      );
    },
  );

  test(
    "a time master that is not uniform: refused naming its worst step",
    { timeout: 120_000 },
    async () => {
      const bytes = bytesOf("sorted_dt.mf4");
      const dt = block("sorted_dt.mf4", "dt");
      // Record 101's time (0.25 + 100/1000 s) moved 0.4 ms later: steps 100→101 of 1.4 ms and
      // 101→102 of 0.6 ms, the first the worst (rounding of the float64 times aside).
      const view = new DataView(bytes.buffer);
      const at = dt.offset + 24 + 100 * 29;
      view.setFloat64(at, view.getFloat64(at, true) + 0.0004, true);
      const path = await damaged("jitter.mf4", bytes);
      expect((await refusal(path)).message).toBe(
        `${path}: the time master "t" is not uniform: its worst step, record 100 to 101, is 0.0014 s against 0.001 s from its first and last times; quiver reads equally spaced samples`,
      );
    },
  );
});

describe("what quiver does not read is refused by name and listed by quiver info", () => {
  const unsorted = fixturePath("recordings/mdf4/unsorted_dl.mf4");
  const zipped = fixturePath("recordings/mdf4/zipped_hl.mf4");

  test("a group with a variable-length signal (VLSD) and a bus-frame group, asked for", {
    timeout: 120_000,
  }, () => {
    expectCli(
      unsorted,
      'channel group "notes" is not read by quiver: channel "note": a variable-length signal (VLSD)',
      1,
      "notes",
    );
    expectCli(
      zipped,
      'channel group "CAN1" is not read by quiver: a bus-frame channel group (bus events); channel "CAN_DataFrame": a bus event',
      1,
      "CAN1",
    );
  });

  test(
    "several groups with samples: an error listing them with their rates; an unknown group",
    { timeout: 120_000 },
    () => {
      const several =
        '2 channel groups hold samples; name one with --group: "fast" (2000 Hz, 2 channels, 400 records), "slow" (rate found on reading, 1 channel, 20 records), "notes" (not read)';
      expectCli(unsorted, several, 2);
      const r = runQuiver(["spectrum", unsorted, "--out", "/tmp/never-mdf4.csv"]);
      expect([r.code, r.stderr]).toEqual([2, `quiver spectrum: ${unsorted}: ${several}\n`]);
      expectCli(
        unsorted,
        'no channel group "medium"; the file holds "fast" (2000 Hz, 2 channels, 400 records), "slow" (rate found on reading, 1 channel, 20 records), "notes" (not read)',
        2,
        "medium",
      );
    },
  );

  test("quiver info lists the groups with records and rates, and what it does not read", {
    timeout: 120_000,
  }, () => {
    const r = runQuiver(["info", zipped, "--json"]);
    expect(r.code).toBe(0);
    const info = JSON.parse(r.stdout);
    // 1000 records at 512 Hz from the virtual master's linear conversion (the script's values).
    expect([info.format, info.rate_hz, info.samples, info.start_time_s]).toEqual([
      "mdf4",
      512,
      1000,
      0.5,
    ]);
    expect(info.duration_s).toBeCloseTo(1000 / 512, 12);
    expect(info.groups).toEqual([
      {
        name: "rig",
        samples: 1000,
        rate_hz: 512,
        channels: [{ name: "level", unit: "V" }, { name: "count", unit: "V" }],
      },
      { name: "CAN1", samples: 8, rate_hz: null, channels: [] },
    ]);
    expect(info.unsupported).toEqual([
      'channel group "CAN1": a bus-frame channel group (bus events); channel "CAN_DataFrame": a bus event',
    ]);
    const text = runQuiver(["info", zipped]).stdout;
    expect(text).toContain('  "rig": 2 channels, 512 Hz, 1000 samples\n');
    expect(text).toContain(
      'not read: channel group "CAN1": a bus-frame channel group (bus events)',
    );
  });

  test("a group without a time master needs --rate (exit 2)", { timeout: 120_000 }, () => {
    const file = fixturePath("recordings/mdf4/no_master.mf4");
    const r = runQuiver(["info", file]);
    expect([r.code, r.stderr]).toEqual([
      2,
      `quiver info: ${file}: channel group "1" has no time master: give its sample rate (--rate HZ)\n`,
    ]);
  });

  test(
    "a rate given for a group with a time master is refused (exit 2)",
    { timeout: 120_000 },
    () => {
      const r = runQuiver(["info", zipped, "--rate", "1000"]);
      expect([r.code, r.stderr]).toEqual([
        2,
        `quiver info: ${zipped}: channel group "rig" has a time master, which gives its rate; do not give one\n`,
      ]);
    },
  );
});
