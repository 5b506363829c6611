/**
 * loudness as a plan step: its one line in the table of analyses gives the
 * plan runner its command, the side outputs, the target quantities
 * (loudness_sone, n5_sone, sharpness_acum) and the report section.
 */
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, expect, test } from "vitest";
import { runPlan } from "../../lib/plan/runner.ts";
import { planCommandTable } from "../../cli/plan_commands.ts";
import { writeReport } from "../../lib/report/html_report.ts";
import { ANALYSES } from "../../lib/analyses.ts";

let dir: string;
const RATE = 16000;

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-loudness-plan-");
  // 1 kHz at 50 dB SPL for 3 s.
  const a = Math.SQRT2 * 20e-6 * 10 ** 2.5;
  const rows = Array.from(
    { length: RATE * 3 },
    (_, i) => `${i / RATE},${(a * Math.sin(2 * Math.PI * 1000 * i / RATE)).toExponential(9)}`,
  );
  await writeFile(`${dir}/cabin.csv`, "time_s,ear [Pa]\n" + rows.join("\n") + "\n");
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

test(
  "loudness steps run, give loudness_sone, n5_sone and sharpness_acum, and their section",
  async () => {
    const plan = {
      quiver_plan: 1,
      title: "cabin",
      recordings: { cabin: { file: "cabin.csv" } },
      analyses: [
        { id: "steady", command: "loudness", recording: "cabin", options: {} },
        {
          id: "varying",
          command: "loudness",
          recording: "cabin",
          options: { method: "time-varying" },
        },
      ],
      targets: [
        { id: "n", type: "max", value: 100, of: { analysis: "steady", quantity: "loudness_sone" } },
        { id: "n5", type: "max", value: 100, of: { analysis: "varying", quantity: "n5_sone" } },
        {
          id: "s",
          type: "max",
          value: 100,
          of: { analysis: "steady", quantity: "sharpness_acum" },
        },
      ],
      report: { title: "cabin" },
    };
    await writeFile(`${dir}/plan.json`, JSON.stringify(plan));
    const manifest = await runPlan(`${dir}/plan.json`, {
      outDir: `${dir}/out`,
      commands: await planCommandTable(),
      progress: { start() {}, end() {} },
      report: (outDir, manifest, plan) => writeReport(outDir, manifest, plan, ANALYSES),
    });
    expect(manifest.status).toBe("ok");
    expect(Object.keys(manifest.steps[0].outputs)).toEqual(["out", "specific-out"]);
    expect(Object.keys(manifest.steps[1].outputs)).toEqual(["out", "specific-out", "history-out"]);
    const targets = manifest.targets as readonly { id: string; value?: number }[];
    const value = (id: string) => targets.find((t) => t.id === id)?.value as number;
    // 1 kHz at 50 dB: 2 sone by the sone's definition (ISO 532-1 clause 3); 20 % allowed for the
    // filters' skirts and the tables from memory.
    expect(Math.abs(value("n") / 2 - 1)).toBeLessThan(0.2);
    // A steady tone: N5 equals the stationary loudness within 3 % (ISO 532-1, from memory).
    expect(Math.abs(value("n5") / value("n") - 1)).toBeLessThan(0.03);
    // DIN 45692: a 1 kHz sound is about 1 acum (its critical-band noise is 1 acum by definition).
    expect(Math.abs(value("s") - 1)).toBeLessThan(0.2);
    const html = await readFile(`${dir}/out/report.html`, "utf8");
    expect(html).toContain('<table class="loudness">');
    expect(html).toContain("specific loudness");
    expect(html).toContain("loudness against time");
    expect(html).toMatch(/not a certified sound level or loudness meter/);
  },
  180_000,
);
