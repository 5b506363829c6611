/**
 * What the CSV reader says it found when the delimiter or the time column is
 * not what the user thinks: each message with its exact text.
 */
import { mkdtemp, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { fixturePath } from "../helpers/fixtures.ts";

let dir = "";
const rows = Array.from({ length: 64 }, (_, i) => [i / 100, Math.sin(i / 3), Math.cos(i / 5)]);

async function csv(name: string, header: string, delimiter = ","): Promise<string> {
  const path = join(dir, name);
  await writeFile(path, `${header}\n${rows.map((r) => r.join(delimiter)).join("\n")}\n`);
  return path;
}

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-detection-test-");
});

describe("a delimiter forced wrongly", () => {
  test("names the one column it found and the delimiter the header suggests (exit 2)", async () => {
    const file = await csv("comma.csv", "time_s,seat_rail_z [m/s^2],driver_ear [Pa]");
    const r = runQuiver(["spectrum", file, "--delimiter", "semicolon", "--block", "16"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toBe(
      `quiver spectrum: ${file}:1: the file has one column with the delimiter semicolon; ` +
        "its header suggests comma (3 columns): give --delimiter comma, or auto\n",
    );
    // Also with a rate given, where the one column would otherwise be read as one channel.
    const withRate = runQuiver([
      "spectrum",
      file,
      "--delimiter",
      "semicolon",
      "--rate",
      "100",
      "--block",
      "16",
    ]);
    expect(withRate.code).toBe(2);
    expect(withRate.stderr).toMatch(/one column with the delimiter semicolon/);
  });

  test("a semicolon file forced to comma; a tab file forced to semicolon", async () => {
    const semi = await csv("semi.csv", "time_s;a [V]", ";");
    expect(runQuiver(["spectrum", semi, "--delimiter", "comma"]).stderr).toBe(
      `quiver spectrum: ${semi}:1: the file has one column with the delimiter comma; ` +
        "its header suggests semicolon (2 columns): give --delimiter semicolon, or auto\n",
    );
    const tab = await csv("tab.csv", "time_s\ta [V]\tb [V]", "\t");
    expect(runQuiver(["spectrum", tab, "--delimiter", "semicolon"]).stderr).toBe(
      `quiver spectrum: ${tab}:1: the file has one column with the delimiter semicolon; ` +
        "its header suggests tab (3 columns): give --delimiter tab, or auto\n",
    );
  });

  test("a real one-column file with a forced delimiter is read, not refused", async () => {
    // A naive "one column means a wrong delimiter" rule would refuse this file.
    const path = join(dir, "one.csv");
    await writeFile(path, `acc [m/s^2]\n${rows.map((r) => r[1]).join("\n")}\n`);
    const r = runQuiver(["info", path, "--delimiter", "semicolon", "--rate", "100"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    expect(r.stdout.split("\n")).toContain("delimiter: semicolon (given with --delimiter)");
    expect(r.stdout.split("\n")).toContain("  column 1: acc [m/s^2]");
  });
});

describe("no time column", () => {
  test("lists the columns found and names --time-column and --rate (exit 2)", async () => {
    const file = await csv("zeit.csv", "Zeit [s],seat_rail_z [g],driver_ear [Pa]");
    const r = runQuiver(["spectrum", file, "--block", "16"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toBe(
      `quiver spectrum: ${file}:1: no time column: the header's columns are "Zeit [s]", ` +
        '"seat_rail_z [g]", "driver_ear [Pa]", none named time_s or time; name the time column ' +
        "with --time-column NAME, or give the sample rate with --rate HZ\n",
    );
  });

  test("a long header is listed up to twelve columns, then counted", async () => {
    const names = Array.from({ length: 15 }, (_, i) => `c${i + 1}`);
    const path = join(dir, "wide.csv");
    await writeFile(path, `${names.join(",")}\n${names.map(() => "1").join(",")}\n`);
    const r = runQuiver(["spectrum", path]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      `quiver spectrum: ${path}:1: no time column: the header's columns are ` +
        `${names.slice(0, 12).map((n) => `"${n}"`).join(", ")} and 3 more, none named time_s ` +
        "or time; name the time column with --time-column NAME, or give the sample rate with --rate HZ\n",
    );
  });

  test("--time-column Zeit reads the file: rate from the column, the rest are channels", async () => {
    const file = await csv("zeit2.csv", "Zeit [s],seat_rail_z [g],driver_ear [Pa]");
    const r = runQuiver(["spectrum", file, "--time-column", "Zeit", "--block", "16"]);
    expect(r.stderr).toMatch(/^spectrum: 2 channel\(s\), psd, /);
    expect(r.code).toBe(0);
    // Time steps of 0.01 s: 100 Hz, so 16-sample blocks give lines 100/16 = 6.25 Hz apart.
    expect(r.stdout.split("\n")[0]).toBe(
      "frequency_hz,seat_rail_z [(m/s^2)^2/Hz],driver_ear [Pa^2/Hz]",
    );
    expect(r.stdout.split("\n")[2].split(",")[0]).toBe("6.25");
  });

  test('--time-column "Time [s]" by its whole cell', async () => {
    const file = await csv("time_s.csv", "Time [s],a [V],b [V]");
    const r = runQuiver(["info", file, "--time-column", "Time [s]"]);
    expect(r.code).toBe(0);
    expect(r.stdout.split("\n")).toContain('time column: "Time" [s], column 1');
  });

  test("--time-column naming no column lists the columns (exit 2)", async () => {
    const file = await csv("zeit3.csv", "Zeit [s],a [V],b [V]");
    const r = runQuiver(["spectrum", file, "--time-column", "Time"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      `quiver spectrum: ${file}:1: --time-column "Time" names no column; the header's columns ` +
        'are "Zeit [s]", "a [V]", "b [V]"\n',
    );
  });

  test("--time-column naming a column in milliseconds is refused as before", async () => {
    const file = await csv("ms.csv", "Zeit [ms],a [V],b [V]");
    const r = runQuiver(["spectrum", file, "--time-column", "Zeit"]);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(
      `quiver spectrum: ${file}:1:1: time column "Zeit" is in [ms]; quiver expects seconds [s]\n`,
    );
  });

  test("two time columns: the message names --time-column", async () => {
    const file = await csv("two.csv", "time_s,time,a [V]");
    const r = runQuiver(["spectrum", file]);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe(
      `quiver spectrum: ${file}:1:2: two time columns ("time_s" in column 1 and "time"); ` +
        "name one with --time-column\n",
    );
    // Naming one makes the other a channel.
    const named = runQuiver(["info", file, "--time-column", "time_s"]);
    expect(named.code).toBe(0);
    expect(named.stdout.split("\n")).toContain("  column 2: time");
  });

  test("a WAV file has no time column to name", () => {
    const wav = fixturePath("recordings/wav/pcm16_stereo.wav");
    const r = runQuiver(["spectrum", wav, "--time-column", "Zeit"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      `quiver spectrum: ${wav}: a WAV file has no time column; do not name one (--time-column)\n`,
    );
  });
});
