import { existsSync } from "node:fs";
import { mkdir, mkdtemp, readdir, readFile, symlink, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

// A small campaign of our own: one recording, one spectrum. Every case below changes one
// thing and must be refused before any work, with the input untouched and nothing written.
describe("a plan cannot write outside its folder, over its inputs, or twice to one file", () => {
  let dir: string;
  const base = {
    quiver_plan: 1,
    title: "t",
    recordings: { road: { file: "road.csv", setup: "road_setup.json" } },
    analyses: [{ id: "psd", command: "spectrum", recording: "road", options: { block: 256 } }],
  };
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-safe-");
    const rows = ["time_s,acc [m/s^2]"];
    for (let i = 0; i < 4096; i++) rows.push(`${i / 1024},${Math.sin(i / 5)}`);
    await writeFile(`${dir}/road.csv`, rows.join("\n") + "\n");
    await writeFile(`${dir}/road_setup.json`, JSON.stringify({ channels: {} }));
    await mkdir(`${dir}/elsewhere`);
  });

  const refused = async (name: string, plan: unknown, outDir: string, pattern: RegExp) => {
    await writeFile(`${dir}/${name}.json`, JSON.stringify(plan));
    const before = await readFile(`${dir}/road.csv`, "utf8");
    const r = runQuiver(["run", `${dir}/${name}.json`, "--out-dir", outDir]);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr).toMatch(pattern);
    expect(await readFile(`${dir}/road.csv`, "utf8")).toBe(before);
    return r;
  };

  test('report.file "../road.csv" (would replace a recording with HTML)', async () => {
    await refused(
      "up",
      { ...base, report: { file: "../road.csv" } },
      `${dir}/out1`,
      /report\.file/,
    );
    expect(existsSync(`${dir}/out1`)).toBe(false);
  });

  test("report.file outside, absolute, or named like the plan", async () => {
    await refused(
      "far",
      { ...base, report: { file: "../../elsewhere/x.csv" } },
      `${dir}/out2`,
      /report\.file/,
    );
    await refused(
      "abs",
      { ...base, report: { file: "/tmp/x.html" } },
      `${dir}/out3`,
      /report\.file/,
    );
    // --out-dir is the plan's own folder and the report is named like the plan.
    await writeFile(`${dir}/self.html`, JSON.stringify({ ...base, report: { file: "self.html" } }));
    const r = runQuiver(["run", `${dir}/self.html`, "--out-dir", dir]);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr).toMatch(/the plan itself: the report would overwrite this input/);
  });

  test("a symbolic link that leads out of the output folder", async () => {
    await mkdir(`${dir}/out4`);
    await symlink(`${dir}/elsewhere`, `${dir}/out4/figs`);
    await refused(
      "link",
      { ...base, report: { file: "figs/report.html" } },
      `${dir}/out4`,
      /report\.file: the report is one file name ending \.html, in the output folder itself/,
    );
    expect(await readdir(`${dir}/elsewhere`)).toEqual([]);
  });

  test("a figures/ folder that is a link leading out of the output folder", async () => {
    await mkdir(`${dir}/out7`);
    await symlink(`${dir}/elsewhere`, `${dir}/out7/figures`);
    await refused(
      "figs",
      { ...base, report: {} },
      `${dir}/out7`,
      /plan key report: .*figures\/figure\.svg leads outside the output folder/,
    );
    expect(await readdir(`${dir}/elsewhere`)).toEqual([]);
  });

  test("two steps that write one file (orders mo writes mo_rpm.json; a step is called mo_rpm)", async () => {
    const plan = {
      ...base,
      analyses: [
        {
          id: "mo",
          command: "orders",
          recording: "road",
          options: { tacho: "acc", ppr: 1, channels: ["acc"] },
        },
        { id: "mo_rpm", command: "spectrum", recording: "road", options: {} },
      ],
    };
    await refused("twice", plan, `${dir}/out5`, /mo_rpm\.json, which step "mo" \(rpm-out\) writes/);
  });

  test("--out-dir . with a step named like an input (the set-up)", async () => {
    const plan = {
      ...base,
      analyses: [{ id: "road_setup", command: "spectrum", recording: "road", options: {} }],
    };
    await refused("clobber", plan, dir, /road_setup\.json would overwrite the input/);
  });

  test("--out-dir . with a step named like another step's input (a simulation file)", async () => {
    await writeFile(`${dir}/sim.json`, JSON.stringify({ columns: [] }));
    const plan = {
      ...base,
      analyses: [{ id: "sim", command: "spectrum", recording: "road", options: {} }],
      comparisons: [{ id: "c", test: "sim", simulation: { file: "sim.json" } }],
    };
    await refused("clobber2", plan, dir, /comparisons\[0\]\.simulation\.file: .*would overwrite/);
  });

  test('an option key such as "format=csv" is refused', async () => {
    const plan = {
      ...base,
      analyses: [{
        id: "psd",
        command: "spectrum",
        recording: "road",
        options: { "format=csv": true },
      }],
    };
    await refused("smuggle", plan, `${dir}/out6`, /analyses\[0\]\.options\.format=csv/);
  });
});

describe("a command cannot overwrite its own inputs", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-own-");
    const rows = ["time_s,acc [m/s^2]"];
    for (let i = 0; i < 4096; i++) rows.push(`${i / 1024},${Math.sin(i / 5)}`);
    await writeFile(`${dir}/rec.csv`, rows.join("\n") + "\n");
    await writeFile(`${dir}/s.json`, JSON.stringify({ channels: {} }));
  });
  for (
    const [label, args, pattern] of [
      ["spectrum rec.csv --out rec.csv", ["spectrum", "rec.csv", "--out", "rec.csv"], /rec\.csv/],
      [
        "spectrum rec.csv --out ./rec.csv",
        ["spectrum", "rec.csv", "--out", `./rec.csv`],
        /rec\.csv/,
      ],
      [
        "--setup s.json --out s.json",
        ["spectrum", "rec.csv", "--setup", "s.json", "--out", "s.json"],
        /s\.json/,
      ],
      [
        "orders --out x.csv --map-out x.csv",
        [
          "orders",
          "rec.csv",
          "--tacho",
          "acc",
          "--ppr",
          "1",
          "--channels",
          "acc",
          "--out",
          "x.csv",
          "--map-out",
          "x.csv",
        ],
        /name the same file/,
      ],
    ] as const
  ) {
    test(label, async () => {
      const before = await readFile(`${dir}/rec.csv`, "utf8");
      const r = runQuiver([...args], dir);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(pattern);
      expect(await readFile(`${dir}/rec.csv`, "utf8")).toBe(before);
    });
  }
});
