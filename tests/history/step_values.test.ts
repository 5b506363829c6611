/**
 * The key values of a step come from its analysis's descriptor: here a
 * two-microphone `level` result, whose quantities (leq_db, lmax_db) need a
 * channel; each channel's Leq against the closed form.
 */
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, expect, test } from "vitest";
import { ANALYSES } from "../../lib/analyses.ts";
import { readResultFile } from "../../lib/io/result_file.ts";
import { stepValues } from "../../lib/history/step_values.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { sineLeqDb } from "./history_runs.ts";

let dir = "";
beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-step-values-");
});
afterAll(async () => {
  if (dir !== "") await rm(dir, { recursive: true, force: true });
});

test(
  "each channel's Leq and Lmax, none without a channel (the reader will not choose)",
  async () => {
    const rate = 8000;
    const rows = ["time_s,front [Pa],rear [Pa]"];
    for (let i = 0; i < 2 * rate; i++) {
      const s = Math.sin((2 * Math.PI * 250 * i) / rate) * Math.SQRT2;
      rows.push(`${i / rate},${s},${0.5 * s}`);
    }
    await writeFile(`${dir}/cabin.csv`, rows.join("\n") + "\n");
    const level = await ANALYSES.get("level")!.load();
    await level.run([`${dir}/cabin.csv`, "--weighting", "Z", "--out", `${dir}/level.json`]);
    const values = await stepValues(
      "cabin",
      "level",
      await readResultFile(`${dir}/level.json`),
      ANALYSES,
    );
    expect(values.map((v) => `${v.quantity}:${v.channel}:${v.mode}`)).toEqual([
      "leq_db:front:0",
      "leq_db:rear:0",
      "lmax_db:front:0",
      "lmax_db:rear:0",
    ]);
    // ISO 1683 (20 µPa): 1 Pa r.m.s. is 93.98 dB; 0.5 Pa is 6.02 dB less.
    assertClose(values[0].value, sineLeqDb(1), { absolute: 0.05, relative: 0 });
    assertClose(values[1].value, sineLeqDb(0.5), { absolute: 0.05, relative: 0 });
    expect(values.every((v) => v.stepId === "cabin" && v.command === "level")).toBe(true);
  },
  240_000,
);
