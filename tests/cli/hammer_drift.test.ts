import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { driftingHits } from "../helpers/hammer_recording.ts";

// Sources: the hits are half-sine pulses whose peaks and times are analytic
// (tests/helpers/hammer_recording.ts: P·sin(π(t − t0)/T) peaks at P, analytic; the half-sine
// as an impact pulse is common practice); a force baseline that drifts between hits is common practice to expect
// (charge amplifiers, temperature), and the counts below follow from the invented
// recording by construction (10 hits, 5 of them at 20 N below a 50 N trigger).
describe("quiver hammer on a drifting force channel", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-hammer-drift-");
    // Ten half-sine hits (5 of 200 N, 5 of 20 N) on a ±8 N drift: tests/helpers/hammer_recording.ts.
    await writeFile(`${dir}/drift.csv`, recordingCsv(driftingHits(4096).recording));
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  const run = (...args: string[]) =>
    runQuiver([
      "hammer",
      `${dir}/drift.csv`,
      "--rate",
      "4096",
      "--force",
      "hammer",
      "--outputs",
      "tip",
      "--out",
      `${dir}/frf.json`,
      ...args,
    ]);

  test("every hit is found and the trigger rule is printed with its block", () => {
    const r = run();
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/^10 hits: 10 accepted; usable bandwidth/m);
    // 0.05 s at 4096 Hz: round(204.8) = 205 samples per block (arithmetic; the block
    // length is quiver's DEFAULT_BASELINE_S, a running median baseline is common practice).
    expect(r.stderr).toMatch(
      /^trigger level derived: the larger of 5 % of the largest excursion \(\d+(\.\d+)?\) .*\(median of each 205-sample block/m,
    );
    const b = run("--baseline", "0.1");
    expect(b.code, b.stderr).toBe(0);
    expect(b.stderr).toMatch(/median of each 410-sample block/);
  });

  test("a given trigger above the light hits: five hits, five pulses below it, and a warning", () => {
    const r = run("--trigger", "50");
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/^5 hits: 5 accepted; 5 pulses below the trigger; usable/m);
    expect(r.stderr).toMatch(/warning: 5 pulse\(s\) on "hammer" rose above 5 noise sigma/);
    expect(r.stderr).toMatch(/^trigger level given: 50$/m);
  });
});
