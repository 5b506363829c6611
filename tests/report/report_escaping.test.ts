import { createHash } from "node:crypto";
import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";

// Channel names are whatever a file says. Here they carry HTML and a spreadsheet formula
// (an invented hostile recording, for the test only); a name with terminal escape codes is
// refused when it is read (lib/io/names.ts), shown escaped.
const HTML_NAME = "<img src=x onerror=alert(1)>";
const FORMULA_NAME = "=SUM(A1)";
const TERMINAL_NAME = "dead\u001bc"; // ESC c resets a terminal

describe("values from files reach the report, the terminal and CSV cells harmlessly", () => {
  let dir: string;
  let stderr: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-hostile-");
    const rate = 8000;
    const rows = [`time_s,${HTML_NAME} [Pa],${FORMULA_NAME} [Pa]`];
    for (let i = 0; i < 2 * rate; i++) {
      rows.push(`${(i / rate).toFixed(6)},${0.1 * Math.sin(i / 3)},${0.2 * Math.sin(i / 7)}`);
    }
    await writeFile(`${dir}/cab.csv`, rows.join("\n") + "\n");
    await writeFile(
      `${dir}/term.csv`,
      `time_s,${TERMINAL_NAME} [Pa]\n` +
        Array.from({ length: 16 }, (_, i) => `${i / rate},0`).join("\n") + "\n",
    );
    const plan = {
      quiver_plan: 1,
      title: "hostile names",
      recordings: { cab: { file: "cab.csv" } },
      analyses: [
        { id: "bd", command: "bands", recording: "cab", options: { weighting: "Z" } },
        { id: "sp", command: "spectrum", recording: "cab", options: { block: 1024 } },
      ],
      report: {},
    };
    await writeFile(`${dir}/plan.json`, JSON.stringify(plan));
    const r = runQuiver(["run", `${dir}/plan.json`, "--out-dir", `${dir}/out`, "--jobs", "1"]);
    expect(r.code, r.stderr).toBe(0);
    stderr = runQuiver(["spectrum", "term.csv", "--block", "8"], dir).stderr;
  });

  test("the report escapes every name once: no live tag, no double escape", async () => {
    const html = await readFile(`${dir}/out/report.html`, "utf8");
    expect(html).not.toContain("<img src=x");
    expect(html).toContain("&lt;img src=x onerror=alert(1)&gt;");
    expect(html).not.toContain("&amp;lt;");
  });

  test("terminal escape codes in names are shown, not sent", () => {
    expect(stderr).not.toContain("\u001b");
    expect(stderr).toContain('the name "dead\\u001bc" holds a control');
  });

  test("a name that a spreadsheet would run as a formula is written as text", () => {
    const r = runQuiver(["spectrum", "cab.csv", "--block", "1024", "--out", "sp.csv"], dir);
    expect(r.code, r.stderr).toBe(0);
    return readFile(`${dir}/sp.csv`, "utf8").then((csv) => {
      const header = csv.split("\n")[0];
      expect(header).toContain(",'=SUM(A1) [Pa^2/Hz]");
      // And it reads back as the name it was: quiver undoes its own guard.
      const d = runQuiver([
        "compare",
        "sp.csv",
        "sp.csv",
        "--test-column",
        "=SUM(A1)",
        "--sim-column",
        "=SUM(A1)",
        "--out",
        "c.json",
      ], dir);
      expect(d.code, d.stderr).toBe(0);
    });
  });
});

/**
 * Runs the demo campaign, changes the damping result's metadata, forges its size and hash in
 * the manifest so that `quiver report` accepts the folder, and rewrites the report: its HTML.
 */
async function reportOfForgedModes(change: (modes: Record<string, unknown>[]) => void) {
  const dir = await demoFolder();
  // Without the target that reads this result: a forged result that changes a verdict is
  // refused whole (tests/report/report_command_safety.test.ts); here it must be drawn or named.
  const planPath = `${dir}/tamarack_b2_plan.json`;
  const plan = JSON.parse(await readFile(planPath, "utf8"));
  plan.targets = plan.targets.filter((t: { of: { analysis: string } }) =>
    t.of.analysis !== "bracket_modes"
  );
  await writeFile(planPath, JSON.stringify(plan));
  expect(runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", `${dir}/out`]).code)
    .toBe(0);
  const path = `${dir}/out/bracket_modes.json`;
  const json = JSON.parse(await readFile(path, "utf8"));
  change(json.metadata.modes);
  const text = JSON.stringify(json);
  await writeFile(path, text);
  const manifestPath = `${dir}/out/manifest.json`;
  const manifest = JSON.parse(await readFile(manifestPath, "utf8"));
  const step = manifest.steps.find((s: { id: string }) => s.id === "bracket_modes");
  step.outputs.out.bytes = new TextEncoder().encode(text).length;
  step.outputs.out.sha256 = createHash("sha256").update(text).digest("hex");
  await writeFile(manifestPath, JSON.stringify(manifest));
  const r = runQuiver(["report", `${dir}/out`]);
  expect(r.code, r.stderr).toBe(0);
  return await readFile(`${dir}/out/report.html`, "utf8");
}

describe("a crafted result in a finished campaign", () => {
  test("with a forged hash and a value of the wrong type is named in the report, not drawn", async () => {
    // A value of the wrong type is not drawn from a guess: the schema names it.
    const html = await reportOfForgedModes((modes) => {
      modes[1].mode = "<script>alert(3)</script>";
    });
    expect(html).not.toMatch(/<script>alert/);
    expect(html).toMatch(
      /cannot show the result: .*bracket_modes\.json: the damping metadata at modes\.1\.mode is not as quiver writes it/,
    );
  });

  test("a crafted channel name is escaped in the report", async () => {
    const html = await reportOfForgedModes((modes) => {
      modes[0].channel = "<script>alert(1)</script>";
      modes[0].flags = ["<script>alert(2)</script>"];
    });
    expect(html).not.toMatch(/<script>alert/);
    expect(html).toContain("&lt;script&gt;alert(1)");
    expect(html).toContain("&lt;script&gt;alert(2)");
  });

  test("a manifest whose status is not one of its own values is refused", async () => {
    const dir = await demoFolder();
    expect(runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", `${dir}/out`]).code)
      .toBe(0);
    const manifestPath = `${dir}/out/manifest.json`;
    const manifest = JSON.parse(await readFile(manifestPath, "utf8"));
    manifest.status = "<script>alert(3)</script>";
    await writeFile(manifestPath, JSON.stringify(manifest));
    const r = runQuiver(["report", `${dir}/out`]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/not a quiver manifest: status/);
  });
});
