import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { driftingHits } from "../helpers/hammer_recording.ts";
import { gaussianNoise } from "../helpers/random.ts";

describe("quiver hammer --exp-window: a time constant too short for the record", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-hammer-window-");
    // Ten hits 1 s apart at 4096 Hz: tests/helpers/hammer_recording.ts.
    const { recording } = driftingHits(4096);
    await writeFile(`${dir}/hits.csv`, recordingCsv(recording));
    // The same force with a response that is noise unrelated to it.
    const noise = gaussianNoise(4242, recording.channels[0].data.length);
    await writeFile(
      `${dir}/unrelated.csv`,
      recordingCsv({
        ...recording,
        channels: [recording.channels[0], { name: "tip", unit: "m/s^2", data: noise }],
      }),
    );
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  const run = (file: string, ...args: string[]) =>
    runQuiver([
      "hammer",
      `${dir}/${file}`,
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

  test("1e-9 s and 0.05 s are refused (exit 2) naming the smallest, which works", async () => {
    // Record: the largest power of two within 90 % of the 1 s hit spacing, 2048 samples =
    // 0.5 s; the floor 1e-4 at its end gives τ ≥ 0.5/ln(1e4) = 0.054286 s, printed rounded
    // up to 0.05429 s. A rule that took any positive τ would accept both.
    for (const tau of ["1e-9", "0.05"]) {
      const r = run("hits.csv", "--exp-window", tau);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toContain(
        `s is too short for the record of 0.5 s (2048 samples): it falls below 0.0001 at the record's end`,
      );
      expect(r.stderr).toMatch(/the smallest τ quiver takes is .* = 0\.05429 s$/m);
    }
    const ok = run("hits.csv", "--exp-window", "0.05429");
    expect(ok.code, ok.stderr).toBe(0);
    const meta = JSON.parse(await readFile(`${dir}/frf.json`, "utf8")).metadata;
    expect(meta.exponential_window_tau_s).toBe(0.05429);
    expect(ok.stderr).not.toContain("coherence");
  });

  test("coherence low over the band is warned of, though noise tops 0.5 at some lines", () => {
    // Ten averages of a response unrelated to the force: the expected coherence is about
    // 1/10 (bias of the estimate, Bendat & Piersol, Random Data, 4th ed., 9.2.3), far below 0.5;
    // P(γ² > 0.5) = 0.5^(n−1) = 0.2 % per line for n = 10 (same source), so among about a
    // thousand lines a few top 0.5: a rule on the largest coherence would stay silent (seen).
    const r = run("unrelated.csv");
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(
      /warning: the coherence of "tip" is below 0\.5 at \d+ of \d+ lines \(median 0\.\d+\): its FRF is not to be trusted/,
    );
  });
});
