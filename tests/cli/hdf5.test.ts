import { existsSync, readFileSync } from "node:fs";
import { mkdtemp } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";

const file = (name: string) => fixturePath(`recordings/hdf5/${name}`);
const ref = readJsonFixture<{ files: Record<string, Record<string, unknown>> }>(
  "reference/hdf5_reference.json",
);
const SLOW = { timeout: 240_000 };

/** The numbers of a spectrum's output CSV, row by row, and its header. */
function spectrumTable(path: string): { header: string; rows: number[][] } {
  const [header, ...lines] = readFileSync(path, "utf8").trim().split("\n");
  return { header, rows: lines.map((l) => l.split(",").map(Number)) };
}

describe("quiver on HDF5 and MAT v7.3 files", () => {
  test(
    "the same samples as CSV and as HDF5 give the same spectrum, to the bit",
    SLOW,
    async () => {
      const dir = await mkdtemp("/tmp/quiver-hdf5-cli-");
      // make_hdf5_reference.py writes road's acc_x and acc_y to both files, to 17 digits in the CSV.
      const a = runQuiver([
        "spectrum",
        file("two_groups.h5"),
        "--group",
        "/road",
        "--block",
        "256",
        "--out",
        `${dir}/h5.csv`,
      ]);
      expect(a.code).toBe(0);
      const b = runQuiver([
        "spectrum",
        file("road_same_samples.csv"),
        "--block",
        "256",
        "--out",
        `${dir}/csv.csv`,
      ]);
      expect(b.code).toBe(0);
      const h5 = spectrumTable(`${dir}/h5.csv`), csv = spectrumTable(`${dir}/csv.csv`);
      expect(h5.header).toBe(csv.header);
      expect(h5.rows.length).toBe(129);
      // The same doubles in (17 digits parse back exactly: IEEE 754 round trip) give the same PSD.
      expect(h5.rows).toEqual(csv.rows);
    },
  );

  test(
    "the same samples as CSV and as MAT v7.3 (a float64 row and a float32 column vector) give the same spectrum, to the bit",
    SLOW,
    async () => {
      const dir = await mkdtemp("/tmp/quiver-hdf5-cli-");
      for (
        const [input, out] of [[file("recording.mat"), "mat"], [
          file("mat_same_samples.csv"),
          "csv",
        ]]
      ) {
        const r = runQuiver(["spectrum", input, "--block", "512", "--out", `${dir}/${out}.csv`]);
        expect(r.code).toBe(0);
      }
      const mat = spectrumTable(`${dir}/mat.csv`), csv = spectrumTable(`${dir}/csv.csv`);
      expect(mat.header).toBe(csv.header);
      expect(mat.rows).toEqual(csv.rows); // the same doubles in, as above
    },
  );

  test(
    "info on an HDF5 file: the group's channels with units, rate, length, every group, what is not read",
    SLOW,
    () => {
      const r = runQuiver(["info", file("two_groups.h5"), "--group", "rig"]);
      expect(r.stderr).toBe("");
      expect(r.code).toBe(0);
      // make_hdf5_reference.py: /rig at 2048 Hz and /road at 1024 Hz, 2048 samples each.
      expect(r.stdout.split("\n").slice(1)).toEqual([
        "format: HDF5",
        "sample rate: 2048 Hz (from the sample_rate attribute of dataset /rig/accel)",
        "length: 2048 samples, 1 s",
        "channels: 2",
        "  channel 1: accel [m/s^2]",
        "  channel 2: force [N]",
        "set-up: none (units as in the file, converted to SI base units)",
        "groups: 2",
        '  "/rig": 2 channels, 2048 Hz, 2048 samples',
        '  "/road": 2 channels, 1024 Hz, 2048 samples',
        "not read: /rig/notes: text",
        "",
      ]);
    },
  );

  test("info on a MAT v7.3 file: channels, the rate from fs, the variables not read", SLOW, () => {
    const r = runQuiver(["info", file("recording.mat"), "--json"]);
    expect(r.code).toBe(0);
    const info = JSON.parse(r.stdout);
    const m = ref.files["recording.mat"] as { rate: number; samples: number; channels: string[] };
    expect(info.format).toBe("mat73");
    expect(info.rate_hz).toBe(m.rate);
    expect(info.samples).toBe(m.samples);
    expect(info.duration_s).toBe(m.samples / m.rate);
    expect(info.channels.map((c: { name: string }) => c.name)).toEqual(m.channels);
    expect(info.unsupported).toEqual([
      "label: text (char)",
      "ok: logical values",
      "meta: a struct",
    ]);
  });

  test.each([
    [
      "mixed lengths",
      ["spectrum", file("mixed_lengths.h5")],
      1,
      "group /bad holds datasets of different lengths: long (120), short (100) samples",
    ],
    ["several groups, none named", ["spectrum", file("two_groups.h5")], 2, "name one with --group"],
    [
      "a chunk that does not inflate",
      ["spectrum", file("bad_chunk.h5"), "--block", "256"],
      1,
      "dataset /run/acc: the chunk of samples 768–1023 cannot be read",
    ],
    ["a truncated file", ["info", file("truncated.h5")], 1, "HDF5 cannot open the file: truncated"],
    [
      "--group on a MAT-file",
      ["spectrum", file("recording.mat"), "--group", "x"],
      2,
      "a MAT v7.3 file holds one recording",
    ],
    [
      "--time-column on HDF5",
      ["info", file("matrix.h5"), "--time-column", "t"],
      2,
      "a HDF5 file has no time column",
    ],
  ])(
    "%s: its exit code, one line naming the file, output untouched",
    SLOW,
    async (_, args, code, message) => {
      const dir = await mkdtemp("/tmp/quiver-hdf5-cli-");
      const out = `${dir}/out.csv`;
      const r = runQuiver(args[0] === "info" ? args : [...args, "--out", out]);
      expect(r.code).toBe(code);
      const lines = r.stderr.trim().split("\n");
      expect(lines.length).toBe(1);
      expect(lines[0]).toContain(`${args[1]}: `);
      expect(lines[0]).toContain(message);
      expect(existsSync(out)).toBe(false);
    },
  );
});
