import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

// A cabin recording with one dead microphone (all zeros: level −∞, written as null in
// JSON) and one live one. A verdict on a value that is missing or not finite is a verdict
// on nothing: such a target must be `not_checked` with its reason (common practice: a
// measurement that did not happen is neither a pass nor a fail).
describe("targets on values that are missing or not finite", () => {
  let dir: string;
  let manifest: {
    targets: { id: string; status: string; reason?: string; pass?: boolean }[];
  };
  let html: string;
  let code: number;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-dead-target-");
    const rate = 8000;
    const rows = ["time_s,dead_mic [Pa],live_mic [Pa]"];
    for (let i = 0; i < 2 * rate; i++) {
      rows.push(
        `${(i / rate).toFixed(6)},0,${(0.2 * Math.sin(2 * Math.PI * 500 * i / rate)).toFixed(6)}`,
      );
    }
    await writeFile(`${dir}/cab.csv`, rows.join("\n") + "\n");
    const plan = {
      quiver_plan: 1,
      title: "dead channel",
      recordings: { cab: { file: "cab.csv" } },
      analyses: [
        { id: "lv", command: "level", recording: "cab", options: { weighting: "Z" } },
        { id: "bd", command: "bands", recording: "cab", options: { weighting: "Z", fraction: 3 } },
      ],
      targets: [
        // "at least −10 dB" would pass on −∞ read as 0 (the old behaviour).
        {
          id: "dead_lmax",
          type: "min",
          value: -10,
          unit: "dB",
          of: { analysis: "lv", quantity: "lmax_db", channel: "dead_mic" },
        },
        // "at most 60 dB" would pass with margin 60 on null read as 0.
        {
          id: "dead_leq",
          type: "max",
          value: 60,
          unit: "dB",
          of: { analysis: "lv", quantity: "leq_db", channel: "dead_mic" },
        },
        {
          id: "dead_overall",
          type: "max",
          value: 60,
          unit: "dB",
          of: { analysis: "bd", quantity: "overall_db", channel: "dead_mic" },
        },
        {
          id: "dead_curve",
          type: "limit_curve",
          limit: "max",
          unit: "dB",
          of: { analysis: "bd", channel: "dead_mic" },
          points: [[50, 60], [2000, 60]],
        },
        {
          id: "live_leq",
          type: "max",
          value: 90,
          unit: "dB",
          of: { analysis: "lv", quantity: "leq_db", channel: "live_mic" },
        },
      ],
    };
    await writeFile(`${dir}/plan.json`, JSON.stringify({ ...plan, report: {} }));
    const r = runQuiver(["run", `${dir}/plan.json`, "--out-dir", `${dir}/out`]);
    code = r.code;
    manifest = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
    html = await readFile(`${dir}/out/report.html`, "utf8");
  });

  test("are not_checked with a reason, never PASS or FAIL", () => {
    expect(code).toBe(0);
    const byId = Object.fromEntries(manifest.targets.map((t) => [t.id, t]));
    for (const id of ["dead_lmax", "dead_leq", "dead_overall", "dead_curve"]) {
      expect(byId[id].status, id).toBe("not_checked");
      expect(byId[id].pass, id).toBeUndefined();
      expect(byId[id].reason, id).toMatch(/missing|not finite/);
    }
    // The live channel still gets its verdict: 0.2 Pa peak → 0.1414 Pa rms → 76.99 dB re 20 µPa.
    expect(byId.live_leq.status).toBe("checked");
    expect(byId.live_leq.pass).toBe(true);
  });

  test("the report renders them", () => {
    expect(html).toMatch(/dead_lmax<\/td>.*not checked/);
    expect(html).toMatch(/dead_curve<\/td>.*not checked/);
  });
});
