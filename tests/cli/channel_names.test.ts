import { mkdtemp, writeFile } from "node:fs/promises";
import { existsSync } from "node:fs";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { fixturePath } from "../helpers/fixtures.ts";

// A misspelt channel gets the nearest name, as a misspelt option does, whichever option named it.
describe("a misspelt channel name: exit 2, the nearest name offered, nothing written", () => {
  let dir: string;
  const HAS = 'the recording has "front_left", "rear_left", "tacho"';
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-channel-names-");
    const rows = ["front_left [m/s^2],rear_left [m/s^2],tacho [V]"];
    for (let i = 0; i < 400; i++) {
      rows.push(`${Math.sin(i / 3)},${Math.cos(i / 5)},${i % 20 < 10 ? 5 : 0}`);
    }
    await writeFile(`${dir}/car.csv`, rows.join("\n") + "\n");
  });

  const cases: [string, string[], string, string][] = [
    [
      "spectrum --channels",
      ["spectrum", "car.csv", "--channels", "frnt_left"],
      "frnt_left",
      "front_left",
    ],
    [
      "orders --tacho",
      [
        "orders",
        "car.csv",
        "--tacho",
        "tach",
        "--ppr",
        "1",
        "--channels",
        "front_left",
      ],
      "tach",
      "tacho",
    ],
    [
      "orders --rpm-channel",
      [
        "orders",
        "car.csv",
        "--rpm-channel",
        "tachoo",
        "--channels",
        "front_left",
      ],
      "tachoo",
      "tacho",
    ],
    [
      "frf --input",
      ["frf", "car.csv", "--input", "Front_Left", "--outputs", "rear_left"],
      "Front_Left",
      "front_left",
    ],
    [
      "calibrate --channel",
      ["calibrate", "car.csv", "--channel", "tacko", "--level", "94"],
      "tacko",
      "tacho",
    ],
  ];
  for (const [what, args, typed, meant] of cases) {
    test(what, () => {
      const r = runQuiver([...args, "--rate", "1000", "--out", "out.csv"], dir);
      expect(r.code).toBe(2);
      expect(r.stderr).toBe(
        `quiver ${
          args[0]
        }: car.csv: no channel named "${typed}" (did you mean "${meant}"?); ${HAS}\n`,
      );
      expect(existsSync(`${dir}/out.csv`)).toBe(false);
    });
  }

  test("no near name: the list alone", () => {
    const r = runQuiver(["level", "car.csv", "--rate", "1000", "--channels", "seat"], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`quiver level: car.csv: no channel named "seat"; ${HAS}\n`);
  });

  test("compare --sim-column", () => {
    const s = runQuiver([
      "compare",
      fixturePath("recordings/bracket_test_frf.csv"),
      fixturePath("recordings/bracket_sim_frf.csv"),
      "--sim-column",
      "maag",
    ]);
    expect(s.code).toBe(1);
    expect(s.stderr).toBe(
      `quiver compare: ${
        fixturePath("recordings/bracket_sim_frf.csv")
      }: no column "maag" (did you mean "mag"?) (nor maag_re/_im, _mag, _mag_db); the table has frequency_hz, mag, phase_deg\n`,
    );
  });
});
