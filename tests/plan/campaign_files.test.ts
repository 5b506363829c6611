// Issue 27: campaign folders that cannot be written out of, emptied by mistake, or mixed.
// This file: the files a run writes and removes (names from step ids, slices, report names,
// the clean-up of the previous run, a failed step's outputs). Each case is a plan (or a crafted
// manifest, a link) of our own; the runner runs in this process with stand-in commands that
// write what a command would, so that what is tested is the runner's own rule. Path rules:
// OWASP, "Path Traversal" (a name read from input is resolved, links included, and must stay
// inside the folder it is meant for).
import { execFileSync } from "node:child_process";
import { existsSync } from "node:fs";
import { mkdir, mkdtemp, readdir, readFile, rm, symlink, writeFile } from "node:fs/promises";
import process from "node:process";
import { afterEach, beforeEach, describe, expect, test, vi } from "vitest";
import { loadPlan, type PlanCommand, planSteps, type RunOptions } from "../../lib/plan/runner.ts";
import { sha256Hex } from "../../lib/io/table_file.ts";
import { planCommandTable } from "../../cli/plan_commands.ts";
import { base, planIn, refusal, runIn, standIns, writer } from "../helpers/campaign_stand_ins.ts";

let dir = "";
beforeEach(async () => {
  dir = await mkdtemp("/tmp/quiver-camp-");
  await writeFile(`${dir}/road.csv`, "time_s,acc [m/s^2]\n0,0\n0.5,1\n1,0\n");
});

const plan = (content: unknown, name = "plan") => planIn(dir, content, name);
const run = (file: string, more: Partial<RunOptions> = {}) => runIn(dir, file, more);

describe("the runner names every file a step writes", () => {
  test('frf inputs ["mount_l,mount_r"] with its own partial-out/principal-out: refused, the target untouched', async () => {
    await writeFile(`${dir}/victim.txt`, "mine");
    const commands = await planCommandTable();
    const p = base();
    p.analyses = [{
      id: "mounts",
      command: "frf",
      recording: "road",
      options: {
        inputs: ["mount_l,mount_r"],
        outputs: ["acc"],
        "partial-out": `${dir}/victim.txt`,
        "principal-out": "victim.txt",
      },
    }];
    const message = await refusal(run(await plan(p), { commands }));
    // Every problem named with its key path: the comma, and each output option.
    expect(message).toMatch(
      /analyses\[0\]\.options\.partial-out: the plan runner names every file/,
    );
    expect(message).toMatch(/analyses\[0\]\.options\.principal-out: the plan runner names/);
    expect(message).toMatch(/analyses\[0\]\.options\.inputs\[0\]: "mount_l,mount_r" holds a comma/);
    // The comma alone is refused too (the command would read two names where the runner counts one).
    p.analyses[0].options = { inputs: ["mount_l,mount_r"], outputs: ["acc"] };
    expect(await refusal(run(await plan(p), { commands }))).toMatch(
      /analyses\[0\]\.options\.inputs\[0\]: "mount_l,mount_r" holds a comma/,
    );
    expect(await readFile(`${dir}/victim.txt`, "utf8")).toBe("mine");
    expect(existsSync(`${dir}/out`)).toBe(false);
  });

  test("out, format and any *-out in an analysis's or a comparison's options are refused", async () => {
    for (const key of ["out", "format", "rpm-out", "summary-out"]) {
      const p = { ...base(), comparisons: [] as Record<string, unknown>[] };
      p.analyses[0].options = { [key]: "x.json" };
      expect(await refusal(run(await plan(p)))).toMatch(
        new RegExp(`: plan key analyses\\[0\\]\\.options\\.${key}: `),
      );
      p.analyses[0].options = {};
      await writeFile(`${dir}/sim.csv`, "frequency_hz,x\n1,1\n");
      p.comparisons = [{
        id: "c",
        test: "psd",
        simulation: { file: "sim.csv" },
        options: { [key]: "y" },
      }];
      expect(await refusal(run(await plan(p)))).toMatch(
        new RegExp(`: plan key comparisons\\[0\\]\\.options\\.${key}: `),
      );
    }
  });

  test("each output is named from the step id: orders writes <id>.json, <id>_rpm.json, <id>_map.json", async () => {
    const p = base();
    p.analyses = [{ id: "mo", command: "orders", recording: "road", options: {} }];
    const { plan: parsed } = await loadPlan(await plan(p));
    const [step] = planSteps(parsed, `${dir}/plan.json`, `${dir}/out`, standIns);
    expect(step.outputs).toEqual({
      out: `${dir}/out/mo.json`,
      "rpm-out": `${dir}/out/mo_rpm.json`,
      "map-out": `${dir}/out/mo_map.json`,
    });
  });

  test("a comparison's curve may not be another comparison's result", async () => {
    await writeFile(`${dir}/sim.csv`, "frequency_hz,x\n1,1\n");
    const p = {
      ...base(),
      comparisons: [
        { id: "c1", test: "psd", simulation: { file: "sim.csv" } },
        { id: "c2", test: "c1", simulation: { file: "sim.csv" } },
      ],
    };
    expect(await refusal(run(await plan(p)))).toMatch(
      /comparisons\[1\]\.test: "c1" is a comparison; comparison "c2" must take the curve of an analysis/,
    );
    p.comparisons[1] = { id: "c2", test: "psd", simulation: { file: "out/c1.json" } };
    await mkdir(`${dir}/out`);
    await writeFile(`${dir}/out/c1.json`, "{}");
    expect(await refusal(run(await plan(p)))).toMatch(
      /comparisons\[1\]\.simulation\.file: out\/c1\.json is the result of comparison "c1"; comparison "c2"/,
    );
  });

  test("an output that is a symbolic link leading out of the folder is refused; nothing is written", async () => {
    await mkdir(`${dir}/out`);
    await mkdir(`${dir}/elsewhere`);
    await writeFile(`${dir}/elsewhere/victim.json`, "mine");
    await symlink(`${dir}/elsewhere/victim.json`, `${dir}/out/psd.json`);
    expect(await refusal(run(await plan(base())))).toMatch(
      /analyses\[0\]\.id: .*psd\.json leads outside the output folder/,
    );
    // A dangling link is refused as well (the write would replace the link, but a link is not ours).
    await rm(`${dir}/out/psd.json`);
    await symlink(`${dir}/elsewhere/not_yet.json`, `${dir}/out/psd.json`);
    expect(await refusal(run(await plan(base())))).toMatch(/psd\.json is a symbolic link/);
    expect(await readFile(`${dir}/elsewhere/victim.json`, "utf8")).toBe("mine");
    expect(await readdir(`${dir}/elsewhere`)).toEqual(["victim.json"]);
  });
});

describe("slices only narrow", () => {
  const sliced = (options: Record<string, unknown>) => {
    const p = base();
    p.recordings.road = { file: "road.csv", start: 4, end: 12 } as never;
    p.analyses[0].options = options;
    return p;
  };

  test("an analysis's start/end outside its recording's slice is refused naming both", async () => {
    expect(await refusal(run(await plan(sliced({ start: 0 }))))).toMatch(
      /analyses\[0\]\.options\.start: start 0 s lies outside the slice of recording "road" \(4 to 12 s\)/,
    );
    expect(await refusal(run(await plan(sliced({ end: 13 }))))).toMatch(
      /options\.end: end 13 s lies outside the slice of recording "road" \(4 to 12 s\)/,
    );
    expect(await refusal(run(await plan(sliced({ start: 12 }))))).toMatch(
      /options\.start: start 12 s leaves nothing of the slice/,
    );
  });

  test("inside the slice it narrows: start 5 with the recording's end 12", async () => {
    const { plan: parsed } = await loadPlan(await plan(sliced({ start: 5 })));
    const [step] = planSteps(parsed, `${dir}/plan.json`, `${dir}/out`, standIns);
    const argv = step.argv.join(" ");
    expect(argv).toContain("--end 12");
    expect(argv).toContain("--start 5");
    expect(argv).not.toContain("--start 4");
  });
});

describe("report file names and plan names", () => {
  test("the report is a plain .html name in the folder: sub/x.html, x/, ., .., x.htm refused", async () => {
    for (const file of ["sub/x.html", "x/", ".", "..", "x.htm", "../x.html", "/tmp/x.html"]) {
      const message = await refusal(run(await plan({ ...base(), report: { file } })));
      expect(message, file).toMatch(
        /: plan key report\.file: the report is one file name ending \.html/,
      );
      expect(message).not.toContain("\n");
    }
  });

  test('recordings and steps called "toString", "constructor", "__proto__" work or are refused cleanly', async () => {
    const p = {
      ...base(),
      recordings: { toString: { file: "road.csv" } },
      analyses: [{ id: "constructor", command: "spectrum", recording: "toString", options: {} }],
    };
    const m = await run(await plan(p));
    expect(m.status).toBe("ok");
    expect(existsSync(`${dir}/out/constructor.json`)).toBe(true);
    // A recording that is not in the plan, named like an Object method.
    const q = { ...base(), analyses: [{ id: "a", command: "spectrum", recording: "valueOf" }] };
    expect(await refusal(run(await plan(q)))).toMatch(/no recording "valueOf" in recordings/);
    const r = { ...base(), analyses: [{ id: "a", command: "spectrum", recording: "__proto__" }] };
    expect(await refusal(run(await plan(r)))).toMatch(/no recording "__proto__" in recordings/);
  });
});

describe("the clean-up deletes only what quiver wrote and can prove", () => {
  let errors: string[] = [];
  beforeEach(() => {
    errors = [];
    vi.spyOn(process.stderr, "write").mockImplementation((s: string | Uint8Array) => {
      errors.push(String(s));
      return true;
    });
  });
  afterEach(() => {
    vi.restoreAllMocks();
  });

  test("last build's b1.json, now the comparison's curve, is kept and the step runs", async () => {
    const first = base();
    first.analyses = [{ id: "b1", command: "spectrum", recording: "road", options: {} }];
    expect((await run(await plan(first, "build1"))).status).toBe("ok");
    const kept = await readFile(`${dir}/out/b1.json`, "utf8");
    // Build 2 compares its spectrum with build 1's, read from the folder it runs into.
    const second = {
      ...base(),
      comparisons: [{ id: "vs_b1", test: "psd", simulation: { file: "out/b1.json" } }],
    };
    const reading: PlanCommand = {
      validate() {},
      async run(argv) {
        await readFile(argv[1]); // the simulation: must still be there
        await writer().run(argv);
      },
    };
    const m = await run(await plan(second, "build2"), {
      commands: { ...standIns, compare: reading },
    });
    expect(m.status).toBe("ok");
    expect(await readFile(`${dir}/out/b1.json`, "utf8")).toBe(kept);
    expect(errors.join("")).toMatch(/left 1 file\(s\) .*b1\.json \(an input of this plan\)/);
  });

  test("a crafted manifest cannot remove the plan, its recordings, or files outside the folder", async () => {
    await mkdir(`${dir}/out`);
    const file = async (path: string) => {
      const bytes = await readFile(path);
      return { bytes: bytes.length, sha256: sha256Hex(bytes) };
    };
    // A recording kept inside the output folder under a name quiver could give (a hit log).
    await writeFile(`${dir}/out/tap_hits.csv`, "time_s,f [N]\n0,0\n0.5,1\n1,0\n");
    const p = {
      ...base(),
      recordings: { road: { file: "road.csv" }, tap: { file: "out/tap_hits.csv" } },
    };
    const planFile = await plan(p);
    const crafted = {
      quiver_version: "0",
      plan: { path: planFile, ...(await file(planFile)), title: "t" },
      out_dir: `${dir}/out`,
      started: "2026-12-01T00:00:00Z",
      finished: "2026-12-01T00:00:01Z",
      status: "ok",
      require_targets: false,
      targets: [],
      steps: [{
        id: "tap",
        kind: "analysis",
        command: "hammer",
        argv: [],
        inputs: [],
        seconds: 0,
        status: "ok",
        outputs: {
          "hits-out": { path: "tap_hits.csv", ...(await file(`${dir}/out/tap_hits.csv`)) },
          out: { path: "../plan.json", ...(await file(planFile)) },
          "records-out": { path: "../road.csv", ...(await file(`${dir}/road.csv`)) },
        },
      }],
      report_files: [{ path: "figures/../../road.csv", ...(await file(`${dir}/road.csv`)) }],
    };
    await writeFile(`${dir}/out/manifest.json`, JSON.stringify(crafted));
    expect((await run(planFile)).status).toBe("ok");
    expect(existsSync(planFile)).toBe(true);
    expect(existsSync(`${dir}/road.csv`)).toBe(true);
    expect(existsSync(`${dir}/out/tap_hits.csv`)).toBe(true);
    const said = errors.join("");
    expect(said).toMatch(/tap_hits\.csv \(an input of this plan\)/);
    expect(said).toMatch(/\.\.\/plan\.json \(not a name quiver gives step "tap"\)/);
  });

  test("a result changed since the run wrote it is left, and named", async () => {
    expect((await run(await plan(base()))).status).toBe("ok");
    await writeFile(`${dir}/out/psd.json`, '{"edited": "by hand"}');
    const p = base();
    p.analyses[0].id = "psd2";
    expect((await run(await plan(p))).status).toBe("ok");
    expect(await readFile(`${dir}/out/psd.json`, "utf8")).toBe('{"edited": "by hand"}');
    expect(errors.join("")).toMatch(/psd\.json \(changed since\)/);
    // Changed but of the same size: the hash tells.
    const same = (await readFile(`${dir}/out/psd2.json`, "utf8")).replace("road", "ROAD");
    await writeFile(`${dir}/out/psd2.json`, same);
    p.analyses[0].id = "psd3";
    errors.length = 0;
    expect((await run(await plan(p))).status).toBe("ok");
    expect(await readFile(`${dir}/out/psd2.json`, "utf8")).toBe(same);
    expect(errors.join("")).toMatch(/psd2\.json \(changed since\)/);
  });

  test("a run that would replace a result edited since is refused before any work", async () => {
    expect((await run(await plan(base()))).status).toBe("ok");
    await writeFile(`${dir}/out/psd.json`, '{"edited": "by hand"}');
    // The same step again: before, the clean-up named psd.json as left and the step then
    // overwrote it. Now nothing is removed or written.
    await expect(run(await plan(base()))).rejects.toThrow(
      /would replace 1 file\(s\) that are not provably results of the previous run here .*: psd\.json; move them away/,
    );
    expect(await readFile(`${dir}/out/psd.json`, "utf8")).toBe('{"edited": "by hand"}');
    expect(existsSync(`${dir}/out/manifest.json`), "the previous manifest stays").toBe(true);
  });

  test("a file quiver never wrote, at a path a step writes, is refused, not replaced", async () => {
    await mkdir(`${dir}/out`);
    await writeFile(`${dir}/out/psd.json`, "my own notes");
    await expect(run(await plan(base()))).rejects.toThrow(/would replace 1 file\(s\).*psd\.json/);
    expect(await readFile(`${dir}/out/psd.json`, "utf8")).toBe("my own notes");
  });

  test("figures/: the previous report's figures go file by file; the user's files there stay", async () => {
    let figure = "a";
    const report = async (outDir: string) => {
      await mkdir(`${outDir}/figures`, { recursive: true });
      await writeFile(`${outDir}/figures/${figure}.svg`, `<svg id="${figure}"/>`);
      await writeFile(`${outDir}/report.html`, "<html></html>");
      return `${outDir}/report.html`;
    };
    const p = { ...base(), report: {} };
    const m1 = await run(await plan(p), { report });
    expect(m1.report_files?.map((f) => f.path).sort()).toEqual(["figures/a.svg", "report.html"]);
    // The user keeps notes and a recording in figures/ after the first run.
    await writeFile(`${dir}/out/figures/notes.txt`, "mine");
    await writeFile(`${dir}/out/figures/take2.csv`, "time_s,x\n0,0\n");
    await writeFile(`${dir}/out/figures/sketch.svg`, "<svg id='mine'/>");
    figure = "b";
    const m2 = await run(await plan(p), { report });
    expect(m2.report_files?.map((f) => f.path).sort()).toEqual(["figures/b.svg", "report.html"]);
    expect((await readdir(`${dir}/out/figures`)).sort()).toEqual([
      "b.svg",
      "notes.txt",
      "sketch.svg",
      "take2.csv",
    ]);
    // A run that draws no figure: the previous figures go, the user's files stay.
    const m3 = await run(await plan(base()));
    expect(m3.report_files).toBeUndefined();
    expect((await readdir(`${dir}/out/figures`)).sort()).toEqual([
      "notes.txt",
      "sketch.svg",
      "take2.csv",
    ]);
    // A manifest from before figures were listed: figures/ is left as it is.
    await writeFile(`${dir}/out/figures/old.svg`, "<svg/>");
    await run(await plan(base()));
    expect((await readdir(`${dir}/out/figures`)).sort()).toEqual([
      "notes.txt",
      "old.svg",
      "sketch.svg",
      "take2.csv",
    ]);
  });

  test("an input under figures/ is refused", async () => {
    await mkdir(`${dir}/out/figures`, { recursive: true });
    await writeFile(`${dir}/out/figures/road.csv`, "time_s,x\n0,0\n1,1\n");
    const p = base();
    p.recordings.road.file = "out/figures/road.csv";
    expect(await refusal(run(await plan(p)))).toMatch(
      /recordings\.road\.file: .*road\.csv lies in .*figures, which the report writes/,
    );
  });
});

describe("a failed step leaves none of its outputs", () => {
  test("a step that writes one output and fails on the next: the first is removed; a file it did not touch stays", async () => {
    const p = base();
    p.analyses = [{ id: "tap", command: "hammer", recording: "road", options: {} }];
    await mkdir(`${dir}/out`);
    // A file of the user's beside the outputs (one at an output's own path is refused before
    // any work: see above).
    await writeFile(`${dir}/out/notes.txt`, "mine");
    const failing = writer((_argv, written) =>
      written.length === 2
        ? Promise.reject(new Error("no space left on device (simulated)"))
        : Promise.resolve()
    );
    const m = await run(await plan(p), { commands: { ...standIns, hammer: failing } });
    expect(m.status).toBe("failed");
    expect(m.steps[0].error).toMatch(
      /\(simulated\) \(its partial outputs removed: tap\.json, tap_hits\.csv\)/,
    );
    expect(existsSync(`${dir}/out/tap.json`)).toBe(false);
    expect(existsSync(`${dir}/out/tap_hits.csv`)).toBe(false);
    expect(existsSync(`${dir}/out/tap_records.json`)).toBe(false);
    expect(await readFile(`${dir}/out/notes.txt`, "utf8")).toBe("mine");
  });

  test("on a full tmpfs (a real ENOSPC, needs root to mount): the outputs written before are removed", async (context) => {
    const mount = `${dir}/out`;
    await mkdir(mount);
    try {
      execFileSync("mount", ["-t", "tmpfs", "-o", "size=64k", "tmpfs", mount], { stdio: "ignore" });
    } catch {
      context.skip(); // not root: the simulated failure above covers the rule
      return;
    }
    try {
      const p = base();
      p.analyses = [{ id: "tap", command: "hammer", recording: "road", options: {} }];
      // Writes each output; the records are 1 MB, more than the 64 kB the disk holds.
      const big: PlanCommand = {
        validate() {},
        async run(argv) {
          for (const key of ["--out", "--hits-out", "--records-out"]) {
            const path = argv[argv.indexOf(key) + 1];
            const size = key === "--records-out" ? 1 << 20 : 100;
            await writeFile(path, new Uint8Array(size));
          }
        },
      };
      const m = await run(await plan(p), { commands: { ...standIns, hammer: big } });
      expect(m.status).toBe("failed");
      expect(m.steps[0].error).toMatch(/ENOSPC|no space/i);
      expect((await readdir(mount)).filter((n) => n.startsWith("tap"))).toEqual([]);
    } finally {
      execFileSync("umount", [mount]);
    }
  });
});
