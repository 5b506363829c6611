/**
 * Spectrogram frequency limits (--min-hz / --max-hz): the table holds only
 * the lines inside the range, the values of those lines are unchanged, and
 * the metadata records the range kept; on the command line and in a plan.
 */
import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { linesInRange, spectrogram } from "../../lib/dsp/spectrogram.ts";
import { spectrogramAgainstRpm } from "../../lib/orders/rpm_spectrogram.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { runQuiver } from "../helpers/cli.ts";
import { gaussianNoise } from "../helpers/random.ts";
import { assertClose } from "../helpers/assert_close.ts";

const RATE = 1024;

/** 4 s: a 100 Hz tone of 1 rms and a 300 Hz tone of 0.5 rms, plus a little noise. */
function tones() {
  const n = 4 * RATE;
  const noise = gaussianNoise(11, n);
  const data = new Float64Array(n).map((_, i) =>
    Math.SQRT2 * Math.sin(2 * Math.PI * 100 * i / RATE) +
    0.5 * Math.SQRT2 * Math.sin(2 * Math.PI * 300 * i / RATE) + 1e-3 * noise[i]
  );
  return { rate: RATE, startTime: 0, channels: [{ name: "mic", unit: "Pa", data }] };
}

const values = (t: { readonly columns: readonly { values: ArrayLike<number> }[] }, k: number) =>
  Array.from(t.columns[k].values as ArrayLike<number>);

describe("spectrogram frequency limits", () => {
  test("the lines kept: both ends included, line k at k·rate/block", () => {
    // Lines 4 Hz apart (1024 / 256): 50 … 150 Hz keeps 52, 56, …, 148 Hz.
    const r = linesInRange(1024, 256, 50, 150);
    expect(r.first).toBe(13);
    expect(r.count).toBe(25);
    // A limit on a line keeps it (the 100 Hz line of 1 Hz spacing).
    expect(linesInRange(1024, 1024, 100, 100.5)).toEqual({ first: 100, count: 1 });
    expect(() => linesInRange(1024, 256, 50, 600)).toThrow(RangeError); // above 512 Hz
    expect(() => linesInRange(1024, 256, 150, 50)).toThrow(RangeError);
    expect(() => linesInRange(1024, 256, 101, 103)).toThrow(/no line/);
  });

  test("against time: only lines inside the range, values as without the range", async () => {
    const options = { block: 256, overlap: 0, kind: "rms" as const };
    const whole = await spectrogram(tones(), options);
    const limited = await spectrogram(tones(), { ...options, minHz: 60, maxHz: 250 });
    const f = values(limited, 1);
    expect(Math.min(...f)).toBeGreaterThanOrEqual(60);
    expect(Math.max(...f)).toBeLessThanOrEqual(250);
    // Lines 4 Hz apart: 60 … 248 Hz, 48 lines per frame, 16 frames.
    expect(f.length).toBe(16 * 48);
    expect(limited.metadata.min_hz).toBe(60);
    expect(limited.metadata.max_hz).toBe(248);
    expect(limited.metadata.lines).toBe(48);
    // The 100 Hz tone of 1 rms: the rms at its line (bin-centred, Hann) is 1 (analytic).
    const v = values(limited, 2);
    const at100 = v.filter((_, i) => f[i] === 100);
    assertClose(Float64Array.from(at100), new Float64Array(16).fill(1), {
      relative: 1e-3,
      absolute: 0,
    });
    // The 300 Hz tone is outside the range and gone.
    expect(f.includes(300)).toBe(false);
    // Each kept cell is the cell of the unlimited map at the same time and frequency.
    const wf = values(whole, 1), wt = values(whole, 0), wv = values(whole, 2);
    const t = values(limited, 0);
    const at = new Map(wf.map((x, i) => [`${wt[i]}/${x}`, wv[i]]));
    v.forEach((x, i) => expect(x).toBe(at.get(`${t[i]}/${f[i]}`)));
  });

  test("against rpm: the same limits", async () => {
    // rpm rising 600 → 3000 in 10 s, order 2 of 1 rms (an analytic run-up of our own).
    const rate = 2048, n = 10 * rate;
    const rpm = new Float64Array(n), x = new Float64Array(n);
    let angle = 0;
    for (let i = 0; i < n; i++) {
      rpm[i] = 600 + 240 * i / rate;
      x[i] = Math.SQRT2 * Math.sin(2 * Math.PI * 2 * angle);
      angle += rpm[i] / 60 / rate;
    }
    const t = await spectrogramAgainstRpm({
      rate,
      startTime: 0,
      channels: [{ name: "n", unit: "rpm", data: rpm }, { name: "x", unit: "V", data: x }],
    }, {
      rpmChannel: "n",
      channels: ["x"],
      rpmStep: 600,
      block: 1024,
      kind: "rms",
      minHz: 20,
      maxHz: 120,
    });
    const f = values(t, 1);
    expect(Math.min(...f)).toBe(20);
    expect(Math.max(...f)).toBe(120);
    expect(t.metadata.lines).toBe(51); // 20, 22, …, 120 Hz
    // At 1800 rpm order 2 sits at 60 Hz: the largest line of that step is there.
    const r = values(t, 0), v = values(t, 2);
    let best = -1;
    for (let i = 0; i < r.length; i++) if (r[i] === 1800 && (best < 0 || v[i] > v[best])) best = i;
    expect(f[best]).toBe(60);
  });

  test("on the command line and in a plan", async () => {
    const dir = await mkdtemp("/tmp/quiver-spectrogram-limits-");
    await writeFile(`${dir}/tones.csv`, recordingCsv(tones()));
    const r = runQuiver([
      "spectrogram",
      `${dir}/tones.csv`,
      "--rate",
      "1024",
      "--block",
      "256",
      "--min-hz",
      "60",
      "--max-hz",
      "250",
      "--out",
      `${dir}/cli.json`,
    ]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain("60–248 Hz (48 lines)");
    const cli = JSON.parse(await readFile(`${dir}/cli.json`, "utf8"));
    const f = cli.columns[1].values as number[];
    expect(f.every((x) => x >= 60 && x <= 250)).toBe(true);
    expect(new Set(f).size).toBe(48);
    expect(cli.metadata.min_hz).toBe(60);
    expect(cli.metadata.max_hz).toBe(248);
    // Above half the rate: refused as a usage error, nothing written.
    const high = runQuiver([
      "spectrogram",
      `${dir}/tones.csv`,
      "--rate",
      "1024",
      "--max-hz",
      "600",
      "--out",
      `${dir}/high.json`,
    ]);
    expect(high.code).toBe(2);
    expect(high.stderr).toContain("half the rate");
    const reversed = runQuiver([
      "spectrogram",
      `${dir}/tones.csv`,
      "--rate",
      "1024",
      "--min-hz",
      "300",
      "--max-hz",
      "200",
    ]);
    expect(reversed.code).toBe(2);
    expect(reversed.stderr).toContain("--max-hz must be above --min-hz");
    // The same options in a plan.
    await writeFile(
      `${dir}/plan.json`,
      JSON.stringify({
        quiver_plan: 1,
        title: "limits",
        recordings: { t: { file: "tones.csv", rate: 1024 } },
        analyses: [{
          id: "map",
          command: "spectrogram",
          recording: "t",
          options: { block: 256, "min-hz": 60, "max-hz": 250 },
        }],
      }),
    );
    const run = runQuiver(["run", `${dir}/plan.json`, "--out-dir", `${dir}/out`]);
    expect(run.code, run.stderr).toBe(0);
    const planned = JSON.parse(await readFile(`${dir}/out/map.json`, "utf8"));
    const pf = planned.columns[1].values as number[];
    expect(pf.every((x) => x >= 60 && x <= 250)).toBe(true);
    expect(planned.metadata.min_hz).toBe(60);
    expect(planned.metadata.max_hz).toBe(248);
  }, 400_000);
});
