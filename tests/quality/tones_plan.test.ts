/**
 * tones as plan steps: its one line in the table of analyses gives the plan
 * runner the command, the spectrum side output, the target quantity tnr_db
 * (a tone named by of.frequency_hz, an order by of.order) and the report
 * section (tones against the criterion line, TNR of orders against speed).
 */
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { existsSync } from "node:fs";
import { afterAll, beforeAll, expect, test } from "vitest";
import { runPlan } from "../../lib/plan/runner.ts";
import { planCommandTable } from "../../cli/plan_commands.ts";
import { writeReport } from "../../lib/report/html_report.ts";
import { ANALYSES } from "../../lib/analyses.ts";
import { gaussianNoise } from "../helpers/random.ts";
import { linearProfile } from "../helpers/run_up.ts";
import { assertClose } from "../helpers/assert_close.ts";

// ECMA-418-1, from memory: Δf_c = 25 + 75·(1 + 1.4·(f/1000)²)^0.69 Hz.
const bandwidth = (f: number) => 25 + 75 * (1 + 1.4 * (f / 1000) ** 2) ** 0.69;

let dir: string;
const RATE = 8192, SECONDS = 30, SIGMA = 0.01;
const profile = linearProfile(1200, 2400, SECONDS);

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-tones-plan-");
  const noise = gaussianNoise(51, RATE * SECONDS);
  const rows = Array.from({ length: RATE * SECONDS }, (_, i) => {
    const t = i / RATE, theta = profile.angle(t);
    // A steady 2 kHz tone of 0.02 Pa, and order 12 of 0.03 Pa, over white noise of 0.01 Pa.
    const p = SIGMA * noise[i] + 0.02 * Math.SQRT2 * Math.sin(2 * Math.PI * 2000 * t) +
      0.03 * Math.SQRT2 * Math.sin(2 * Math.PI * 12 * theta);
    return `${t.toFixed(7)},${profile.rpm(t).toFixed(6)},${p.toFixed(9)}`;
  });
  await writeFile(`${dir}/run.csv`, "time_s,n [rpm],mic [Pa]\n" + rows.join("\n") + "\n");
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

test("tones steps against time and rpm, tnr_db targets of a tone and an order, report", async () => {
  const plan = {
    quiver_plan: 1,
    title: "whine",
    recordings: { run: { file: "run.csv" } },
    analyses: [
      { id: "steady", command: "tones", recording: "run", options: { channels: ["mic"] } },
      {
        id: "along",
        command: "tones",
        recording: "run",
        options: { against: "rpm", "rpm-channel": "n", orders: [12], "rpm-step": 100 },
      },
    ],
    targets: [
      {
        id: "tone",
        type: "max",
        value: 40,
        of: { analysis: "steady", quantity: "tnr_db", frequency_hz: 2001 },
      },
      {
        id: "order",
        type: "max",
        value: 10,
        of: { analysis: "along", quantity: "tnr_db", order: 12 },
      },
      {
        id: "wrong",
        type: "max",
        value: 10,
        of: { analysis: "along", quantity: "tnr_db", frequency_hz: 300 },
      },
    ],
    report: { title: "whine" },
  };
  await writeFile(`${dir}/plan.json`, JSON.stringify(plan));
  const manifest = await runPlan(`${dir}/plan.json`, {
    outDir: `${dir}/out`,
    commands: await planCommandTable(),
    progress: { start() {}, end() {} },
    report: (outDir, manifest, plan) => writeReport(outDir, manifest, plan, ANALYSES),
  });
  expect(manifest.status).toBe("ok");
  expect(Object.keys(manifest.steps[0].outputs)).toEqual(["out", "spectrum-out"]);
  expect(Object.keys(manifest.steps[1].outputs)).toEqual(["out"]);
  type Outcome = {
    id: string;
    value: number;
    pass: boolean;
    status: string;
    description: string;
    reason: string;
  };
  const targets = Object.fromEntries(
    (manifest.targets as readonly Outcome[]).map((t) => [t.id, t]),
  );
  // White noise of variance σ² has the density 2σ²/fs (Bendat & Piersol, eq. 5.180). The steady
  // tone's TNR over 30 s: 10·lg(0.02² / (n0·Δf_c(2 kHz))); the sweeping order at 12·rpm/60 lies
  // far outside its critical band except where it passes 2 kHz (at 10 000 rpm: never).
  const n0 = 2 * SIGMA * SIGMA / RATE;
  const tone = targets.tone;
  assertClose(tone.value, 10 * Math.log10(0.02 ** 2 / (n0 * bandwidth(2000))), {
    relative: 0,
    absolute: 0.5,
  }, "tone TNR");
  expect(tone.pass).toBe(true);
  // The order's highest TNR over the steps: at the top step the band is widest, so the TNR is
  // least there; the highest is near the lowest step (240 Hz), within a step's scatter (±1.5 dB).
  const order = targets.order;
  const lowest = 10 * Math.log10(0.03 ** 2 / (n0 * bandwidth(12 * 1200 / 60)));
  expect(order.value).toBeGreaterThan(lowest - 1.5);
  expect(order.value).toBeLessThan(lowest + 3);
  expect(order.pass).toBe(false);
  expect(order.description).toMatch(/order 12 at \d+ rpm/);
  expect(targets.wrong.status).toBe("not_checked");
  expect(targets.wrong.reason).toMatch(/of\.order, not of\.frequency_hz/);

  const html = await readFile(`${dir}/out/report.html`, "utf8");
  expect(html).toMatch(/<table class="tones">/);
  expect(html).toMatch(/not a certified instrument/);
  for (const f of ["steady_tnr", "steady_spectrum", "along_tnr_0"]) {
    expect(existsSync(`${dir}/out/figures/${f}.svg`), f).toBe(true);
  }
  const line = await readFile(`${dir}/out/figures/steady_tnr.svg`, "utf8");
  expect(line).toMatch(/criterion \(ECMA-418-1\)/);
});
