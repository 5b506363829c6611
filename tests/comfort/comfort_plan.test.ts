/**
 * comfort and hand-arm as plan steps: their one line in the table of
 * analyses gives the plan runner their commands, the history side output,
 * the target quantities (aw of an axis or the sum, a_hv, a8) and the report
 * section (per-axis table, Annex C reactions, running r.m.s., safety note).
 */
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, expect, test } from "vitest";
import { runPlan } from "../../lib/plan/runner.ts";
import { planCommandTable } from "../../cli/plan_commands.ts";
import { writeReport } from "../../lib/report/html_report.ts";
import { ANALYSES } from "../../lib/analyses.ts";
import { analyticResponse } from "../../lib/comfort/vibration_weighting.ts";

let dir: string;
const RATE = 6000;
// Whole periods in every second, so that the steady values are exact closed forms.
const FREQUENCIES = [1, 2, 6, 16, 32, 125];

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-comfort-plan-");
  const rows = Array.from({ length: RATE * 20 }, (_, i) => {
    const t = i / RATE;
    // A 5 s fade-in, so the filters start without a jolt.
    const e = t < 5 ? (1 - Math.cos(Math.PI * t / 5)) / 2 : 1;
    return [t.toFixed(6), ...FREQUENCIES.map((f) => (e * Math.sin(2 * Math.PI * f * t)).toFixed(9))]
      .join(",");
  });
  await writeFile(
    `${dir}/road.csv`,
    "time_s,sx [m/s^2],sy [m/s^2],sz [m/s^2],wx [m/s^2],wy [m/s^2],wz [m/s^2]\n" +
      rows.join("\n") + "\n",
  );
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

test("comfort and hand-arm steps run, give aw, a_hv and a8 targets, and their report sections", async () => {
  const plan = {
    quiver_plan: 1,
    title: "ride",
    recordings: { road: { file: "road.csv" } },
    analyses: [
      {
        id: "seat",
        command: "comfort",
        recording: "road",
        options: { x: "sx", y: "sy", z: "sz", location: "seat", purpose: "comfort" },
      },
      {
        id: "wheel",
        command: "hand-arm",
        recording: "road",
        options: { x: "wx", y: "wy", z: "wz", "exposure-hours": 2 },
      },
    ],
    targets: [
      {
        id: "av",
        type: "max",
        value: 10,
        of: { analysis: "seat", quantity: "aw", channel: "sum" },
      },
      { id: "z", type: "max", value: 10, of: { analysis: "seat", quantity: "aw", channel: "z" } },
      { id: "ahv", type: "max", value: 10, of: { analysis: "wheel", quantity: "a_hv" } },
      { id: "a8", type: "max", value: 10, of: { analysis: "wheel", quantity: "a8" } },
    ],
    report: { title: "ride" },
  };
  await writeFile(`${dir}/plan.json`, JSON.stringify(plan));
  const manifest = await runPlan(`${dir}/plan.json`, {
    outDir: `${dir}/out`,
    commands: await planCommandTable(),
    progress: { start() {}, end() {} },
    report: (outDir, manifest, plan) => writeReport(outDir, manifest, plan, ANALYSES),
  });
  expect(manifest.status).toBe("ok");
  expect(Object.keys(manifest.steps[0].outputs)).toEqual(["out", "history-out"]);
  const gain = (w: "wd" | "wk" | "wh", f: number) => {
    const h = analyticResponse(w, f);
    return Math.hypot(h.re, h.im);
  };
  // Steady r.m.s. over 20 s with a 5 s raised-cosine fade-in: A²/2·(T − R + 3R/8)/T.
  const fade = Math.sqrt((20 - 5 + 15 / 8) / 20) / Math.SQRT2;
  const z = gain("wk", 6) * fade;
  const av = Math.hypot(gain("wd", 1) * fade, gain("wd", 2) * fade, z);
  const ahv = Math.hypot(gain("wh", 16) * fade, gain("wh", 32) * fade, gain("wh", 125) * fade);
  const targets = manifest.targets as readonly { id: string; value?: number }[];
  const value = (id: string) => targets.find((t) => t.id === id)?.value as number;
  expect(Math.abs(value("av") / av - 1)).toBeLessThan(0.003);
  expect(Math.abs(value("z") / z - 1)).toBeLessThan(0.003);
  expect(Math.abs(value("ahv") / ahv - 1)).toBeLessThan(0.003);
  expect(Math.abs(value("a8") / (ahv / 2) - 1)).toBeLessThan(0.003);
  const html = await readFile(`${dir}/out/report.html`, "utf8");
  expect(html).toContain('<table class="vibration">');
  expect(html).toContain("ISO 2631-1 Annex C");
  expect(html).toContain("running r.m.s. (τ = 1 s)");
  expect(html.match(/not a certified measurement of a person/g)?.length).toBeGreaterThanOrEqual(2);
});
