import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { modalFit } from "../../lib/modal/modal_fit.ts";
import { runQuiver } from "../helpers/cli.ts";
import { type Mode, receptance } from "../helpers/modal.ts";
import { gaussianNoise } from "../helpers/random.ts";

// Our own structure; the receptance is closed-form (Ewins, Modal Testing, 2000, eq. 2.37).
const MODES: Mode[] = [
  { frequencyHz: 60, damping: 0.02, residue: 1 },
  { frequencyHz: 150, damping: 0.01, residue: 1 },
];
const f = new Float64Array(400).map((_, i) => 10 + i * 0.5); // 10 … 209.5 Hz

/** The receptance of `modes` plus seeded noise of `noise` m/N (re and im), as a typed FRF. */
function frf(noise: number, modes: readonly Mode[] = MODES) {
  const n = gaussianNoise(7, 2 * f.length);
  const re = new Float64Array(f.length), im = new Float64Array(f.length);
  f.forEach((hz, k) => {
    const h = receptance(modes, hz);
    re[k] = h.re + noise * n[k];
    im[k] = h.im + noise * n[f.length + k];
  });
  return {
    name: "tip",
    unit: "m/N",
    re,
    im,
    magnitude: re.map((v, k) => Math.hypot(v, im[k])),
    form: "receptance" as const,
  };
}

async function frfFile(noise: number, modes: readonly Mode[] = MODES): Promise<string> {
  const dir = await mkdtemp("/tmp/quiver-modal-refusal-");
  const h = frf(noise, modes);
  const rows = ["frequency_hz,tip_re,tip_im"];
  f.forEach((hz, k) => rows.push(`${hz},${h.re[k]},${h.im[k]}`));
  await writeFile(`${dir}/frf.csv`, rows.join("\n") + "\n");
  return `${dir}/frf.csv`;
}

describe("quiver modal: an order that cannot give a mode is refused at once", () => {
  // Orders 2, 4, … N: order 2 has no order before it, so at most N/2 − 1 stable poles;
  // the rule (pole_clusters.ts, ours) needs 5, so N = 12 is the smallest that can.
  test("--max-order 4, 6, 8 and 10: exit 2 naming 12; 12 finds the mode of one-mode data", async () => {
    const file = await frfFile(0, MODES.slice(0, 1));
    for (const n of [4, 6, 8, 10]) {
      const r = runQuiver(["modal", file, "--max-order", String(n)]);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toContain(
        `--max-order ${n} cannot give a mode: orders 2, 4, … ${n} hold at most ${
          n / 2 - 1
        } stable poles`,
      );
      expect(r.stderr).toContain("the smallest that can is --max-order 12");
    }
    const ok = runQuiver(["modal", file, "--max-order", "12"]);
    expect(ok.code, ok.stderr).toBe(0);
    // Stable at orders 4 … 12, exactly the 5 the rule needs: the bound is tight.
    expect(ok.stderr).toMatch(/modal: 1 mode\(s\)[^]*mode 1: 60\.000 Hz.*stable at 5 of 5 orders/);
    // Named modes need no stable cluster: a low order is allowed then.
    const named = runQuiver(["modal", file, "--max-order", "4", "--modes-hz", "60"]);
    expect(named.code, named.stderr).toBe(0);
  });

  test("the library refuses the same before fitting (RangeError)", () => {
    expect(() => modalFit(f, [{ point: "1", direction: "", frf: frf(0) }], { maxOrder: 10 }))
      .toThrow(/highest order 10 cannot give a mode.*at least 12/);
  });

  test("no stable cluster: the refusal names the clear peaks no mode explains", async () => {
    // Two modes, noise-free, at order 12: the 150 Hz pole first appears at order 4 and the
    // 60 Hz cluster falls short of 5 stable orders (seen), so no mode is chosen; both
    // peaks stand out of the sum of |H| and must be named, the most prominent first.
    const file = await frfFile(0);
    const r = runQuiver(["modal", file, "--max-order", "12"]);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stderr).toMatch(
      /no cluster of poles was stable .* up to 12; clear peaks of the FRFs no mode explains: 150\.00 Hz \([\d.]+ dB\), 60\.00 Hz \([\d.]+ dB\); raise --max-order/,
    );
    // With noise, many small peaks: the five most prominent are named, the two modes first.
    expect(() => modalFit(f, [{ point: "1", direction: "", frf: frf(1e-6) }], { maxOrder: 12 }))
      .toThrow(
        /clear peaks of the FRFs no mode explains \(the 5 most prominent of \d+\): 150\.00 Hz \([\d.]+ dB\), 60\.00 Hz/,
      );
  });
});

describe("quiver modal: a band that cannot hold a fit", () => {
  test("--min-hz 200 --max-hz 20 is refused as such, exit 2, naming both", async () => {
    const file = await frfFile(0);
    const r = runQuiver(["modal", file, "--min-hz", "200", "--max-hz", "20"]);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr).toContain("--min-hz 200 is not below --max-hz 20");
    expect(r.stderr).not.toContain("at most -2");
  });

  test("a 3-line band: too narrow for any fit, and how many lines a fit needs", async () => {
    const file = await frfFile(0);
    const r = runQuiver(["modal", file, "--min-hz", "50", "--max-hz", "51"]);
    expect(r.code, r.stderr).toBe(2);
    // LSCF of order n needs more than n + 1 lines (lscf.ts); the automatic rule needs order 12.
    expect(r.stderr).toContain(
      "the band 50.00–51.00 Hz holds 3 line(s): too narrow for any fit; the automatic choice of modes fits orders up to at least 12 and needs at least 14 lines",
    );
    const named = runQuiver([
      "modal",
      file,
      "--min-hz",
      "50",
      "--max-hz",
      "51",
      "--modes-hz",
      "50",
    ]);
    expect(named.code, named.stderr).toBe(2);
    expect(named.stderr).toContain("a fit of order 4 needs at least 6 lines");
  });
});
