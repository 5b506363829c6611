/**
 * `quiver diff` on runs of the same plan: a recording scaled by 2, a repeat
 * with the same statistics, an FRF path made louder. The expected changes
 * are analytic (20·lg 2 = 10·lg 4 = 6.0206 dB; 20·lg 1.5 = 3.5218 dB), the
 * expected rate of significant lines in a repeat is 1 − confidence by the
 * construction of the interval (Bendat & Piersol, Random Data, ch. 8–9).
 */
import { mkdtemp, readFile, rm } from "node:fs/promises";
import { afterAll, beforeAll, expect, test } from "vitest";
import { diffRuns, type RunDiff } from "../../lib/history/run_diff.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { diffRun } from "./diff_runs.ts";

let dir: string;
let base: string, scaled: string, repeat: string, louder: string;

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-diff-");
  base = await diffRun(dir, "base", { seed: 11 });
  scaled = await diffRun(dir, "scaled", { seed: 11, scale: 2 });
  repeat = await diffRun(dir, "repeat", { seed: 12 });
  louder = await diffRun(dir, "louder", { seed: 13, pathGain: 1.5 });
}, 300_000);
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

function column(diff: RunDiff, step: string, name: string): Float64Array | readonly string[] {
  const c = diff.tables.get(step)?.columns.find((c) => c.name === name);
  if (c === undefined) throw new Error(`no column ${name} in ${step}`);
  return c.values;
}

function numbers(diff: RunDiff, step: string, name: string): Float64Array {
  return column(diff, step, name) as Float64Array;
}

function share(values: Float64Array | readonly string[], from = 0): { yes: number; of: number } {
  let yes = 0, of = 0;
  for (let i = from; i < values.length; i++) {
    if (values[i] === "true") yes++;
    if (values[i] === "true" || values[i] === "false") of++;
  }
  return { yes, of };
}

test(
  "a recording scaled by 2 reads +6.02 dB, significant on every line, as a PSD and as an RMS spectrum",
  async () => {
    const diff = await diffRuns(base, scaled);
    for (const step of ["psd", "rms"]) {
      for (const ch of ["a", "b"]) {
        const d = numbers(diff, step, `${ch}_difference_db`);
        // Analytic: 10·lg(2²) for a power, 20·lg 2 for an amplitude. The CSV's 12 digits leave ~1e-11.
        assertClose(d.subarray(1), new Float64Array(d.length - 1).fill(20 * Math.log10(2)), {
          relative: 0,
          absolute: 1e-6,
        }, `${step} ${ch}`);
        // The interval of ~245 averages is ±0.8 dB wide: 6 dB is outside it on every line but DC
        // (the mean removed per segment leaves DC nearly empty).
        const s = share(column(diff, step, `${ch}_significant`), 1);
        expect(s.yes, `${step} ${ch}`).toBe(s.of);
        expect(s.of).toBe(512);
      }
    }
    expect(diff.summary.ranking.length).toBe(4);
  },
  120_000,
);

test("a run against itself changes nothing", async () => {
  const diff = await diffRuns(base, base);
  expect(diff.summary.ranking).toEqual([]);
  for (const s of diff.summary.spectral) {
    for (const ch of s.channels) expect(ch.significant).toBe(0);
  }
}, 120_000);

test("a repeat with the same statistics is significant on about 5 % of lines at 95 %", async () => {
  const diff = await diffRuns(base, repeat, { confidence: 0.95 });
  let yes = 0, of = 0;
  for (const ch of ["a", "b"]) {
    const s = share(column(diff, "psd", `${ch}_significant`), 1);
    yes += s.yes;
    of += s.of;
  }
  // Binomial: n = 1024 lines, p = 0.05: mean 51.2, standard deviation 7.0. Tolerance four
  // standard deviations (neighbouring lines of a Hann window are correlated, which widens the
  // spread a little): 23 … 79. Halving the degrees of freedom gives ~0.6 %, doubling them ~17 %.
  expect(of).toBe(1024);
  const mean = of * 0.05, sd = Math.sqrt(of * 0.05 * 0.95);
  expect(Math.abs(yes - mean), `${yes} of ${of} significant`).toBeLessThanOrEqual(4 * sd);
  // The same in the rms spectrum (the same estimate as amplitudes).
  const rms = share(column(diff, "rms", "a_significant"), 1);
  expect(Math.abs(rms.yes - 512 * 0.05)).toBeLessThanOrEqual(4 * Math.sqrt(512 * 0.05 * 0.95));
  // Nothing beyond chance (module note of run_diff.ts: three standard deviations).
  expect(diff.summary.ranking.filter((r) => r.step !== "path")).toEqual([]);
}, 120_000);

test(
  "an FRF made 1.5 times louder shows +3.52 dB against its coherence-based interval",
  async () => {
    const diff = await diffRuns(base, louder);
    const d = numbers(diff, "path", "y_difference_db");
    const lo = numbers(diff, "path", "y_lower_db"), hi = numbers(diff, "path", "y_upper_db");
    const truth = 20 * Math.log10(1.5); // analytic
    let covered = 0, significant = 0, sum = 0;
    for (let i = 1; i < d.length; i++) {
      sum += d[i];
      if (lo[i] <= truth && truth <= hi[i]) covered++;
      if (lo[i] > 0) significant++;
    }
    const n = d.length - 1;
    // The mean change over 512 lines: the estimates' random errors average out (~0.01 dB).
    assertClose(sum / n, truth, { relative: 0, absolute: 0.05 }, "mean change");
    // The interval is a 95 % interval: it holds the true change on about 95 % of lines
    // (binomial, n = 512: sd 4.9 lines; four sd allowed, the normal approximation of B&P 9.73).
    expect(Math.abs(covered - 0.95 * n), `${covered} of ${n} covered`).toBeLessThanOrEqual(
      4 * Math.sqrt(n * 0.05 * 0.95),
    );
    // Its half width from B&P eq. 9.73 by hand, at one line: ε = sqrt(1 − γ²)/(|γ| sqrt(2 n)).
    const baseFrf = JSON.parse(await readFile(`${base}/path.json`, "utf8"));
    const louderFrf = JSON.parse(await readFile(`${louder}/path.json`, "utf8"));
    const coh = (r: { columns: { name: string; values: number[] }[] }) =>
      r.columns.find((c) => c.name === "y_coherence")!.values[100];
    // Welch's equivalent for 50 % Hann (ρ = 1/6): ν = 2K/(1 + 2(1 − 1/K)/36), n = ν/2.
    const nOf = (k: number) => k / (1 + (2 * (1 - 1 / k)) / 36);
    const eps = (g: number, k: number) => Math.sqrt(1 - g) / (Math.sqrt(g) * Math.sqrt(2 * nOf(k)));
    const half = 1.959964 * (20 / Math.LN10) *
      Math.hypot(
        eps(coh(baseFrf), baseFrf.metadata.averages),
        eps(coh(louderFrf), louderFrf.metadata.averages),
      );
    assertClose(hi[100] - d[100], half, { relative: 1e-6, absolute: 0 }, "half width");
    expect(significant).toBe(n); // 3.5 dB against ±0.3 dB
  },
  120_000,
);
