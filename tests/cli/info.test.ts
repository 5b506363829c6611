import { mkdtemp, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";

const shaker = fixturePath("recordings/bench_shaker_2ch.csv");
const shakerNoTime = fixturePath("recordings/shaker_random_3ch.csv");
const wav16 = fixturePath("recordings/wav/pcm16_stereo.wav");

// The generators' own statements (numpy/scipy scripts under tests/reference/), not quiver's reading.
const welch = readJsonFixture<{ provenance: { rate_hz: number; samples: number } }>(
  "reference/welch_reference.json",
);
const wavRef = readJsonFixture<{ files: Record<string, { rate: number; channels: number[][] }> }>(
  "reference/wav_reference.json",
);

async function tempDir(): Promise<string> {
  return await mkdtemp("/tmp/quiver-info-test-");
}

describe("quiver info", () => {
  test("a CSV: delimiter, decimal mark, time column, rate, length and channels, line by line", () => {
    const r = runQuiver(["info", shaker]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    // make_welch_reference.py writes 4096 rows at 1024 Hz: 4 s.
    expect(welch.provenance.rate_hz).toBe(1024);
    expect(welch.provenance.samples).toBe(4096);
    expect(r.stdout).toBe(
      [
        `file: ${shaker}`,
        "format: CSV",
        "delimiter: comma (the header holds no semicolon or tab)",
        "decimal mark: point (implied by the comma delimiter)",
        'time column: "time_s", column 1',
        "sample rate: 1024 Hz (from the time column)",
        "length: 4096 samples, 4 s",
        "channels: 2",
        "  column 2: drive_force [N]",
        "  column 3: mount_acc [m/s^2]",
        "set-up: none (units as in the file, converted to SI base units)",
        "",
      ].join("\n"),
    );
  });

  test("a CSV without a time column says so and that the rate is missing; exit 0", () => {
    const r = runQuiver(["info", shakerNoTime]);
    expect(r.code).toBe(0);
    const lines = r.stdout.split("\n");
    expect(lines).toContain(
      "time column: none (no column named time_s or time; --time-column names one)",
    );
    expect(lines).toContain("sample rate: unknown without a time column: give --rate HZ");
    // make_frf_reference.py: 8192 samples of a 1024 Hz shaker run; 8 s.
    expect(lines).toContain("length: 8192 samples");
    const withRate = runQuiver(["info", shakerNoTime, "--rate", "1024"]).stdout.split("\n");
    expect(withRate).toContain("sample rate: 1024 Hz (from --rate)");
    expect(withRate).toContain("length: 8192 samples, 8 s");
  });

  test("a WAV: rate and length from the header, channels in full-scale units", () => {
    const ref = wavRef.files.pcm16_stereo; // scipy.io.wavfile.read
    const r = runQuiver(["info", wav16]);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe(
      [
        `file: ${wav16}`,
        "format: WAV",
        `sample rate: ${ref.rate} Hz (from the WAV header)`,
        `length: ${ref.channels[0].length} samples, ${ref.channels[0].length / ref.rate} s`,
        `channels: ${ref.channels.length}`,
        "  channel 1: ch1 [FS]",
        "  channel 2: ch2 [FS]",
        "set-up: none (units as in the file, converted to SI base units)",
        "",
      ].join("\n"),
    );
    expect(ref.rate).toBe(8000);
    expect(ref.channels[0].length).toBe(64);
  });

  test("--json gives the same facts for a machine", () => {
    const r = runQuiver(["info", shaker, "--json"]);
    expect(r.code).toBe(0);
    const info = JSON.parse(r.stdout);
    expect(info).toMatchObject({
      file: shaker,
      format: "csv",
      delimiter: { char: "," },
      decimal_mark: { char: "." },
      time_column: { name: "time_s", unit: "", column: 1 },
      rate_hz: 1024,
      start_time_s: 0,
      samples: 4096,
      duration_s: 4,
      setup: null,
    });
    expect(info.channels).toEqual([
      {
        column: 2,
        name: "drive_force",
        unit: "N",
        read_as: { name: "drive_force", unit: "N", factor: 1 },
      },
      {
        column: 3,
        name: "mount_acc",
        unit: "m/s^2",
        read_as: { name: "mount_acc", unit: "m/s^2", factor: 1 },
      },
    ]);
    const wav = JSON.parse(runQuiver(["info", wav16, "--json"]).stdout);
    expect(wav).toMatchObject({
      format: "wav",
      delimiter: null,
      time_column: null,
      rate_hz: 8000,
      samples: 64,
    });
  });

  test("a European export: semicolon, decimal comma, a time column not in front", async () => {
    const dir = await tempDir();
    const file = join(dir, "bench.csv");
    // A naive "the first column is time" rule would take acc as the time axis.
    await writeFile(file, "acc [g];Time [s]\n0,5;0,000\n0,25;0,002\n-0,5;0,004\n1;0,006\n");
    const r = runQuiver(["info", file]);
    expect(r.code).toBe(0);
    const lines = r.stdout.split("\n");
    expect(lines).toContain("delimiter: semicolon (the header holds a semicolon)");
    expect(lines).toContain("decimal mark: comma (found in the first data row)");
    expect(lines).toContain('time column: "Time" [s], column 2');
    // Four rows 2 ms apart: 500 Hz, 4 samples = 8 ms.
    expect(lines).toContain("sample rate: 500 Hz (from the time column)");
    expect(lines).toContain("length: 4 samples, 0.008 s");
    // ISO 80000-3: standard gravity 9.80665 m/s^2.
    expect(lines).toContain("  column 1: acc [g] -> acc [m/s^2] × 9.80665");
  });

  test("a decimal mark the first data row does not show is looked for in the last", async () => {
    const dir = await tempDir();
    const late = join(dir, "late.csv");
    // The first row holds whole numbers only; a rule looking at it alone would find no mark.
    await writeFile(late, "time;a [V]\n0;1\n0,5;2\n1;3,25\n");
    const lines = runQuiver(["info", late]).stdout.split("\n");
    expect(lines).toContain(
      "decimal mark: comma (found in the last data row; the first shows none)",
    );
    const whole = join(dir, "whole.csv");
    await writeFile(whole, "a [V];b [V]\n0;1\n2;3\n");
    expect(runQuiver(["info", whole, "--rate", "2"]).stdout.split("\n")).toContain(
      "decimal mark: none in the first and last data rows (whole numbers there)",
    );
  });

  test("--time-column names a time column the automatic rule does not know", async () => {
    const dir = await tempDir();
    const file = join(dir, "zeit.csv");
    await writeFile(file, "Zeit [s],acc [m/s^2]\n10,1\n10.01,2\n10.02,3\n");
    const before = runQuiver(["info", file]).stdout.split("\n");
    expect(before).toContain(
      "time column: none (no column named time_s or time; --time-column names one)",
    );
    for (const name of ["Zeit", "Zeit [s]"]) {
      const r = runQuiver(["info", file, "--time-column", name]);
      expect(r.code).toBe(0);
      const lines = r.stdout.split("\n");
      expect(lines).toContain('time column: "Zeit" [s], column 1');
      // Steps of 0.01 s: 100 Hz; the first time is 10 s; 3 samples = 0.03 s.
      expect(lines).toContain("sample rate: 100 Hz (from the time column)");
      expect(lines).toContain("start time: 10 s");
      expect(lines).toContain("length: 3 samples, 0.03 s");
      expect(lines).toContain("channels: 1");
    }
  });

  test("--setup shows what the set-up changes: names, units, factors, roles", async () => {
    const dir = await tempDir();
    const setup = join(dir, "setup.json");
    await writeFile(
      setup,
      JSON.stringify({
        channels: {
          ch1: {
            name: "seat_rail_z",
            unit: "m/s^2",
            full_scale_volts: 5,
            sensitivity_mv_per_unit: 10.2,
            role: "response",
          },
        },
      }),
    );
    const r = runQuiver(["info", wav16, "--setup", setup]);
    expect(r.code).toBe(0);
    const lines = r.stdout.split("\n");
    // Engineering value = volts × 1000 / sensitivity: 5 V × 1000 / 10.2 mV per m/s^2
    // = 490.19607843… (m/s^2) per unit of full scale, shown to 10 significant figures.
    expect(5 * 1000 / 10.2).toBeCloseTo(490.1960784, 7);
    expect(lines).toContain(
      "  channel 1: ch1 [FS] -> seat_rail_z [m/s^2] × 490.1960784, role response",
    );
    expect(lines).toContain("  channel 2: ch2 [FS]");
    expect(lines).toContain(`set-up: ${setup} (1 of 2 channels changed on reading)`);
    const json = JSON.parse(runQuiver(["info", wav16, "--setup", setup, "--json"]).stdout);
    expect(json.setup).toBe(setup);
    expect(json.channels[0].read_as.name).toBe("seat_rail_z");
    expect(Math.abs(json.channels[0].read_as.factor - 5000 / 10.2)).toBeLessThan(1e-12);
  });

  test("bad input: a missing file by its absolute path, no file, two files", async () => {
    const dir = await tempDir();
    const missing = runQuiver(["info", "nope.csv"], dir);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toBe(
      `quiver info: ${join(dir, "nope.csv")}: cannot read: no such file\n`,
    );
    expect(missing.stdout).toBe("");
    const none = runQuiver(["info"]);
    expect(none.code).toBe(2);
    expect(none.stderr).toBe("quiver info: info takes one recording, got 0\n");
    expect(runQuiver(["info", shaker, wav16]).stderr).toBe(
      "quiver info: info takes one recording, got 2\n",
    );
  });

  test("--group is refused for a CSV or a WAV, which hold one recording each", () => {
    for (const [file, label] of [[shaker, "CSV"], [wav16, "WAV"]]) {
      const r = runQuiver(["info", file, "--group", "1"]);
      expect(r.code).toBe(2);
      expect(r.stderr).toBe(
        `quiver info: ${file}: a ${label} file holds one recording; do not name a group (--group)\n`,
      );
      expect(r.stdout).toBe("");
      const s = runQuiver(["spectrum", file, "--group", "1", "--out", "/tmp/never.csv"]);
      expect(s.code).toBe(2);
    }
  });
});
