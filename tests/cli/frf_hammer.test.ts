import { readFileSync } from "node:fs";
import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { formatCsv } from "../../lib/io/table.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { type CliResult, runQuiver } from "../helpers/cli.ts";
import { fixturePath } from "../helpers/fixtures.ts";
import { sixHitsCli } from "../helpers/hammer_recording.ts";

const shaker = fixturePath("recordings/shaker_random_3ch.csv");
const shakerArgs = [
  shaker,
  "--rate",
  "1024",
  "--input",
  "table_force",
  "--outputs",
  "arm_acc,bracket_acc",
];

describe("quiver frf", () => {
  test("writes the library's FRF table with the documented columns", async () => {
    const r = runQuiver(["frf", ...shakerArgs, "--block", "256"]);
    expect(r.code).toBe(0);
    const rec = parseCsvRecording(readFileSync(shaker, "utf8"), { rate: 1024 });
    const { table } = await frequencyResponse(rec, {
      input: "table_force",
      outputs: ["arm_acc", "bracket_acc"],
      block: 256,
    });
    expect(r.stdout).toBe(formatCsv(table));
    expect(r.stdout.split("\n")[0]).toBe(
      "frequency_hz,arm_acc_re [(m/s^2)/N],arm_acc_im [(m/s^2)/N],arm_acc_mag [(m/s^2)/N]," +
        "arm_acc_phase_deg [deg],arm_acc_coherence,arm_acc_random_error," +
        "bracket_acc_re [(m/s^2)/N],bracket_acc_im [(m/s^2)/N],bracket_acc_mag [(m/s^2)/N]," +
        "bracket_acc_phase_deg [deg],bracket_acc_coherence,bracket_acc_random_error",
    );
  });

  test("--form receptance divides accelerance by −ω² and drops the 0 Hz line", async () => {
    const dir = await mkdtemp("/tmp/quiver-frf-");
    const base = runQuiver(["frf", ...shakerArgs, "--block", "256", "--out", `${dir}/a.json`]);
    const conv = runQuiver([
      "frf",
      ...shakerArgs,
      "--block",
      "256",
      "--form",
      "receptance",
      "--out",
      `${dir}/x.json`,
    ]);
    expect(base.code).toBe(0);
    expect(conv.code).toBe(0);
    const a = JSON.parse(await readFile(`${dir}/a.json`, "utf8"));
    const x = JSON.parse(await readFile(`${dir}/x.json`, "utf8"));
    const col = (t: { columns: { name: string; values: number[] }[] }, n: string) =>
      t.columns.find((c) => c.name === n)!.values;
    const f = col(x, "frequency_hz");
    expect(f[0]).toBe(4); // 1024/256: the first line after 0 Hz
    expect(x.metadata.first_line_dropped).toBe(true);
    expect(x.metadata.responses[0].form).toBe("receptance");
    expect(x.columns.find((c: { name: string }) => c.name === "arm_acc_re").unit).toBe("m/N");
    // Ewins, Modal Testing, sec. 2.5: X/F = (A/F)/(−ω²).
    const w2 = f.map((v: number) => (2 * Math.PI * v) ** 2);
    assertClose(
      col(x, "arm_acc_re"),
      col(a, "arm_acc_re").slice(1).map((v: number, k: number) => -v / w2[k]),
      {
        relative: 1e-12,
        absolute: 0,
      },
    );
    // Coherence does not depend on the form.
    expect(col(x, "arm_acc_coherence")).toEqual(col(a, "arm_acc_coherence").slice(1));
  });

  const usage: [string, string[], RegExp][] = [
    ["missing --input", [shaker, "--rate", "1024", "--outputs", "arm_acc"], /give --input/],
    [
      "unknown response",
      [...shakerArgs.slice(0, 5), "--outputs", "nope"],
      /no channel named "nope"/,
    ],
    ["unknown estimator", [...shakerArgs, "--estimator", "h3"], /--estimator/],
    ["input as response", [
      shaker,
      "--rate",
      "1024",
      "--input",
      "table_force",
      "--outputs",
      "table_force",
    ], /both input and response/],
  ];
  for (const [label, args, pattern] of usage) {
    test(`${label}: exit 2 with one line`, () => {
      const r = runQuiver(["frf", ...args]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(pattern);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
    });
  }

  test("a form conversion for a channel in volts is refused", async () => {
    const dir = await mkdtemp("/tmp/quiver-frf-");
    await writeFile(
      `${dir}/v.csv`,
      "f [N],y [V]\n" +
        Array.from({ length: 600 }, (_, i) => `${Math.sin(i)},${Math.cos(i)}`).join("\n") +
        "\n",
    );
    const r = runQuiver([
      "frf",
      `${dir}/v.csv`,
      "--rate",
      "100",
      "--input",
      "f",
      "--outputs",
      "y",
      "--block",
      "64",
      "--form",
      "mobility",
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/cannot convert "y" to mobility: its unit \[V\]/);
  });
});

describe("quiver hammer", () => {
  let dir: string;
  let hammer: (args: string[]) => CliResult;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-hammer-");
    hammer = await sixHitsCli(dir);
  });

  test("classifies the hits, logs them and averages the accepted ones", async () => {
    const r = hammer([
      "--outputs",
      "bracket_a,bracket_b",
      "--exp-window",
      "0.5",
      "--out",
      `${dir}/frf.json`,
      "--hits-out",
      `${dir}/hits.csv`,
    ]);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(
      /^6 hits: 4 accepted, 1 double, 1 overload; usable bandwidth [0-9.]+ Hz/m,
    );
    const hits = (await readFile(`${dir}/hits.csv`, "utf8")).trim().split("\n");
    expect(hits[0]).toBe("hit,time_s,peak,status");
    expect(hits.slice(1).map((l) => l.split(",")[3])).toEqual([
      "accepted",
      "accepted",
      "double",
      "accepted",
      "overload",
      "accepted",
    ]);
    const frf = JSON.parse(await readFile(`${dir}/frf.json`, "utf8"));
    expect(frf.metadata.exponential_window_tau_s).toBe(0.5);
    expect(frf.metadata.averages).toBe(4);
    expect(frf.metadata.analysis).toBe("hammer");
  });

  test("a CSV result gets a metadata sidecar carrying the exponential window", async () => {
    const r = hammer([
      "--outputs",
      "bracket_a",
      "--exp-end",
      "0.05",
      "--out",
      `${dir}/frf.csv`,
    ]);
    expect(r.code).toBe(0);
    const meta = JSON.parse(await readFile(`${dir}/frf.csv.meta.json`, "utf8"));
    expect(meta.metadata.exponential_window_tau_s).toBeCloseTo(1 / Math.log(20), 12);
    expect(meta.columns[1]).toEqual({ name: "bracket_a_re", unit: "m/N" });
  });

  test("--exp-window and --exp-end together are refused", () => {
    const r = hammer([
      "--outputs",
      "bracket_a",
      "--exp-window",
      "0.5",
      "--exp-end",
      "0.1",
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/not both/);
  });
});
