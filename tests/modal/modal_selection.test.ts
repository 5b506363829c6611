import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import type { FrfChannel } from "../../lib/frf/frf_data.ts";
import { lscfPoles } from "../../lib/modal/lscf.ts";
import { type ModalDof, modalFit } from "../../lib/modal/modal_fit.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import { type Mode, receptance, simulateReceptance } from "../helpers/modal.ts";
import { gaussianNoise } from "../helpers/random.ts";

/** The analytic receptance of `modes` on `f` as a typed FRF (Ewins, Modal Testing, eq. 2.37). */
function analyticFrf(
  name: string,
  f: Float64Array,
  modes: readonly Mode[],
): FrfChannel & { re: Float64Array; im: Float64Array } {
  const re = new Float64Array(f.length), im = new Float64Array(f.length);
  f.forEach((hz, k) => {
    const h = receptance(modes, hz);
    re[k] = h.re;
    im[k] = h.im;
  });
  return {
    name,
    unit: "m/N",
    re,
    im,
    magnitude: re.map((v, k) => Math.hypot(v, im[k])),
    form: "receptance",
  };
}

describe("pole to natural frequency and damping (Ewins, Modal Testing, 2000, 2.2: λ = −ζω_n ± jω_n√(1 − ζ²))", () => {
  // Our own two-mode structure seen at two points: one mode heavily damped (5 %), where
  // ζ = −Re λ/|λ| and ω_n = |λ| differ from −Re λ/Im λ and the damped frequency Im λ by
  // 1/√(1 − ζ²) − 1 = 0.125 %; the tolerances below are a twentieth of that.
  const MODES_A: Mode[] = [
    { frequencyHz: 60, damping: 0.05, residue: 1 },
    { frequencyHz: 140, damping: 0.01, residue: -0.6 },
  ];
  const MODES_B: Mode[] = [
    { frequencyHz: 60, damping: 0.05, residue: 0.7 },
    { frequencyHz: 140, damping: 0.01, residue: 0.9 },
  ];
  const f = new Float64Array(961).map((_, i) => 10 + i * 0.25); // 10 … 250 Hz
  const tight = { relative: 6e-5, absolute: 0 };

  test("LSCF poles of a noise-free analytic FRF: f = |λ|/2π and ζ = −Re λ/|λ| within 0.006 %", () => {
    const poles = lscfPoles({ frequencies: f, responses: [analyticFrf("a", f, MODES_A)] }, 12);
    expect(poles).toHaveLength(2);
    assertClose(poles.map((p) => p.frequencyHz), [60, 140], tight, "natural frequency");
    assertClose(poles.map((p) => p.dampingRatio), [0.05, 0.01], tight, "damping ratio");
  });

  test("the modal fit reports the undamped natural frequency and −Re λ/|λ| of a 5 % mode", () => {
    const dofs: ModalDof[] = [
      { point: "1", direction: "", frf: analyticFrf("a", f, MODES_A) },
      { point: "2", direction: "", frf: analyticFrf("b", f, MODES_B) },
    ];
    const result = modalFit(f, dofs);
    expect(result.modes).toHaveLength(2);
    assertClose(result.modes.map((m) => m.frequencyHz), [60, 140], tight, "natural frequency");
    assertClose(result.modes.map((m) => m.dampingRatio), [0.05, 0.01], tight, "damping ratio");
    // Shapes: residue ratio of point 2 to point 1 (0.7 and −1.5), largest component 1.
    assertClose(result.modes[0].shape[1].re, 0.7, { relative: 1e-4, absolute: 0 }, "shape 1");
    assertClose(result.modes[1].shape[0].re, -1 / 1.5, { relative: 1e-4, absolute: 0 }, "shape 2");
    expect(result.warnings).toEqual([]);
  });
});

describe("two modes 0.6 % apart with different shapes", () => {
  test("are both reported: clusters within the frequency tolerance merge only when their shapes agree", () => {
    // Our own three-point structure, noise-free analytic FRFs (Ewins eq. 2.37); the modes are
    // closer than the 1 % frequency tolerance, so a rule that merged poles by frequency alone
    // (as the last-order rule did) would report one mode.
    const shapes = [[1, 0.9, 0.4], [1, -0.8, 0.3]];
    const truth = [{ hz: 100, zeta: 0.003 }, { hz: 100.6, zeta: 0.003 }];
    const f = new Float64Array(3601).map((_, i) => 20 + i * 0.05);
    const dofs = [0, 1, 2].map((o) => ({
      point: `p${o}`,
      direction: "",
      frf: analyticFrf(
        `p${o}`,
        f,
        truth.map((m, r) => ({
          frequencyHz: m.hz,
          damping: m.zeta,
          residue: shapes[r][0] * shapes[r][o],
        })),
      ),
    }));
    const result = modalFit(f, dofs);
    expect(result.modes).toHaveLength(2);
    const tolerance = { relative: 1e-5, absolute: 0 };
    assertClose(result.modes.map((m) => m.frequencyHz), [100, 100.6], tolerance, "frequency");
    assertClose(result.modes.map((m) => m.dampingRatio), [0.003, 0.003], tolerance, "damping");
  });
});

// A random-force shaker run of our own: seeded white force through a two-mode structure
// (modal superposition, Ewins eq. 2.37, simulated by impulse invariance, tests/helpers/modal.ts)
// seen at two points, a little output noise, H1 by quiver's frf (Hann, 4096-line blocks, 50 %
// overlap). Coherence at both peaks is above 0.9.
const RATE = 1024, BLOCK = 4096, LENGTH = 30 * BLOCK;
const SHAKER_MODES = [{ hz: 42.5, zeta: 0.02 }, { hz: 117.3, zeta: 0.015 }];
const SHAKER_SHAPES = [[1, 0.8], [1, -0.6]];

function shakerRecording() {
  const force = gaussianNoise(2024, LENGTH).map((v) => 50 * v);
  const noise = gaussianNoise(7, LENGTH);
  const outputs = [0, 1].map((p) =>
    simulateReceptance(
      SHAKER_MODES.map((m, r) => ({
        frequencyHz: m.hz,
        damping: m.zeta,
        residue: 1e4 * SHAKER_SHAPES[r][0] * SHAKER_SHAPES[r][p],
      })),
      force,
      RATE,
    ).map((v, i) => v + 1e-3 * noise[i])
  );
  return {
    rate: RATE,
    startTime: 0,
    channels: [
      { name: "force", unit: "N", data: force },
      { name: "p1", unit: "m", data: outputs[0] },
      { name: "p2", unit: "m", data: outputs[1] },
    ],
  };
}

// Tolerances (ours): H1 with a Hann window over 0.25 Hz lines biases damping up by a few
// per cent (leakage); the frequency is set by the peak's phase and is far tighter.
const SHAKER_TOLERANCE = { frequency: 0.003, damping: 0.1 };

describe("a two-mode random-force shaker run through frf and modal", () => {
  test("both modes are found at the default orders, though mode 1's pole doubles at order 32", async () => {
    const { frf } = await frequencyResponse(shakerRecording(), {
      input: "force",
      outputs: ["p1", "p2"],
      block: BLOCK,
    });
    const f = frf.frequencies;
    const spacing = f[1] - f[0];
    for (const m of SHAKER_MODES) {
      for (const c of frf.channels) {
        expect(c.coherence![Math.round(m.hz / spacing)], `coherence at ${m.hz} Hz`)
          .toBeGreaterThan(0.9);
      }
    }
    const dofs = frf.channels.map((c, i) => ({ point: `p${i + 1}`, direction: "", frf: c }));
    const result = modalFit(f, dofs, { minHz: 20, maxHz: 200 });
    // The case that used to drop the mode: at the highest order two poles lie within 1 % of
    // mode 1, and the one that belongs to it is not stable against the order before, so a
    // rule that keeps only the last order's stable poles loses the strongest mode.
    const near = result.stability.filter((p) =>
      p.order === 32 && Math.abs(p.frequencyHz / 42.5 - 1) < 0.01
    );
    expect(near.length).toBeGreaterThanOrEqual(2);
    expect(near.some((p) => p.stableFrequency && p.stableDamping && p.stableShape)).toBe(false);
    expect(result.modes).toHaveLength(2);
    result.modes.forEach((m, r) => {
      assertClose(m.frequencyHz, SHAKER_MODES[r].hz, {
        relative: SHAKER_TOLERANCE.frequency,
        absolute: 0,
      }, `mode ${r + 1} frequency`);
      assertClose(m.dampingRatio, SHAKER_MODES[r].zeta, {
        relative: SHAKER_TOLERANCE.damping,
        absolute: 0,
      }, `mode ${r + 1} damping`);
      // What the output says it chose: the cluster's counts and spread.
      expect(m.stableOrders).toBeGreaterThanOrEqual(5);
      expect(m.stableOrders).toBeGreaterThan(m.ordersSpanned / 2);
      expect(m.frequencySpreadPercent).toBeLessThan(1);
    });
    // The stated rule, read back from the chart: each mode's frequency and damping are the
    // medians over the poles the chart marks as its own, its spread (largest − smallest)/median.
    const median = (v: number[]) => {
      const s = [...v].sort((a, b) => a - b), m = s.length >> 1;
      return s.length % 2 === 1 ? s[m] : (s[m - 1] + s[m]) / 2;
    };
    result.modes.forEach((m) => {
      const own = result.stability.filter((p) => p.mode === m.mode);
      expect(own.length).toBe(m.stableOrders);
      const hz = own.map((p) => p.frequencyHz), zeta = own.map((p) => p.dampingRatio);
      const exact = { relative: 1e-12, absolute: 0 };
      assertClose(m.frequencyHz, median(hz), exact, `mode ${m.mode} median frequency`);
      assertClose(m.dampingRatio, median(zeta), exact, `mode ${m.mode} median damping`);
      const range = (v: number[]) =>
        v.reduce((a, x) => Math.max(a, x), -Infinity) -
        v.reduce((a, x) => Math.min(a, x), Infinity);
      assertClose(m.frequencySpreadPercent, 100 * range(hz) / median(hz), exact, "spread");
    });
    expect(result.warnings).toEqual([]);
  });

  test("end to end: quiver frf, then quiver modal --min-hz 20 --max-hz 200", async () => {
    const dir = await mkdtemp("/tmp/quiver-shaker-");
    await writeFile(`${dir}/run.csv`, recordingCsv(shakerRecording()));
    const frf = runQuiver([
      "frf",
      `${dir}/run.csv`,
      "--input",
      "force",
      "--outputs",
      "p1,p2",
      "--rate",
      String(RATE),
      "--block",
      String(BLOCK),
      "--out",
      `${dir}/frf.csv`,
    ]);
    expect(frf.code, frf.stderr).toBe(0);
    const modal = runQuiver([
      "modal",
      `${dir}/frf.csv`,
      "--min-hz",
      "20",
      "--max-hz",
      "200",
      "--out",
      `${dir}/modes.csv`,
      "--stability-out",
      `${dir}/stability.csv`,
    ]);
    expect(modal.code, modal.stderr).toBe(0);
    const lines = (await readFile(`${dir}/modes.csv`, "utf8")).trim().split("\n");
    expect(lines[0]).toBe(
      "mode,frequency_hz [Hz],damping_ratio,mpc,flags,stable_orders,orders_spanned,frequency_spread [%],damping_spread [%]",
    );
    const modes = lines.slice(1).map((l) => l.split(",").map(Number));
    expect(modes).toHaveLength(2);
    modes.forEach(([, hz, zeta], r) => {
      expect(Math.abs(hz / SHAKER_MODES[r].hz - 1)).toBeLessThan(SHAKER_TOLERANCE.frequency);
      expect(Math.abs(zeta / SHAKER_MODES[r].zeta - 1)).toBeLessThan(SHAKER_TOLERANCE.damping);
    });
    expect(modal.stderr).toMatch(/mode 1: 42\.\d+ Hz.*stable at \d+ of \d+ orders \(spread/);
    const stability = (await readFile(`${dir}/stability.csv`, "utf8")).split("\n")[0];
    expect(stability).toBe(
      "order,frequency_hz [Hz],damping_ratio,stable_frequency,stable_damping,stable_shape,mode",
    );
  });
});

describe("a clear peak no mode explains", () => {
  // Three modes of our own at one point; at --max-order 16 the third mode's poles settle only
  // from order 10 (stable at 4 orders, fewer than 5), so it is not selected, but its peak is
  // clear in the FRF (20 dB prominence).
  const MODES: Mode[] = [
    { frequencyHz: 42.5, damping: 0.02, residue: 4 },
    { frequencyHz: 117.3, damping: 0.015, residue: -2.5 },
    { frequencyHz: 171, damping: 0.01, residue: 3 },
  ];
  const f = new Float64Array(721).map((_, i) => 20 + i * 0.25); // 20 … 200 Hz

  function fit(coherenceAtThird: number, thirdResidue = 3) {
    const frf = analyticFrf("tip", f, [MODES[0], MODES[1], { ...MODES[2], residue: thirdResidue }]);
    // Coherence 0.99 everywhere but within 3 Hz of the third mode.
    const coherence = f.map((hz) => Math.abs(hz - 171) < 3 ? coherenceAtThird : 0.99);
    return modalFit(f, [{ point: "tip", direction: "", frf: { ...frf, coherence } }], {
      maxOrder: 16,
    });
  }

  test("is named in a warning when coherence there is good", () => {
    const result = fit(0.95);
    // The naive outcome this guards against: the mode is simply missing from the list.
    expect(result.modes.map((m) => Math.round(m.frequencyHz))).not.toContain(171);
    expect(result.unexplainedPeaks?.map((p) => p.frequencyHz)).toEqual([171]);
    expect(result.modes).toHaveLength(2);
    expect(result.warnings.join("\n")).toMatch(
      /clear peak of the FRFs at 171\.00 Hz .*coherence 0\.95\) has no mode: poles near it were stable at 4 of 4 orders/,
    );
  });

  test("is not warned of where the coherence is poor (the peak may be noise)", () => {
    const result = fit(0.5);
    expect(result.unexplainedPeaks).toEqual([]);
    expect(result.warnings).toEqual([]);
  });

  test("is not warned of below 1 % of the highest peak (the floor of a clear peak)", () => {
    // Residue 0.3: the third peak is 0.93 % of the first, |H| ∝ A/(2ζω²) at resonance
    // (Ewins eq. 2.37): (0.3/(0.02·171²))/(4/(0.04·42.5²)) = 0.0093. At residue 3 it is 9 %.
    const result = fit(0.95, 0.3);
    expect(result.modes).toHaveLength(2);
    expect(result.unexplainedPeaks).toEqual([]);
  });

  test("with --modes-hz the mode is reported, flagged named, and the warning goes", () => {
    const frf = analyticFrf("tip", f, MODES);
    const result = modalFit(f, [{ point: "tip", direction: "", frf }], {
      maxOrder: 16,
      modesHz: [42.5, 117.3, 171],
    });
    expect(result.modes).toHaveLength(3);
    assertClose(result.modes[2].frequencyHz, 171, { relative: 1e-3, absolute: 0 }, "third");
    expect(result.modes[2].flags).toContain("named");
    expect(result.warnings).toEqual([]);
  });
});

describe("quiver modal --max-order", () => {
  test("an order the band cannot hold is refused at once, exit 2, naming the largest", async () => {
    const dir = await mkdtemp("/tmp/quiver-maxorder-");
    const f = new Float64Array(200).map((_, i) => 10 + i * 0.5);
    const frf = analyticFrf("tip", f, [{ frequencyHz: 50, damping: 0.02, residue: 1 }]);
    const rows = ["frequency_hz,tip_re,tip_im"];
    f.forEach((hz, k) => rows.push(`${hz},${frf.re[k]},${frf.im[k]}`));
    await writeFile(`${dir}/frf.csv`, rows.join("\n") + "\n");
    const r = runQuiver(["modal", `${dir}/frf.csv`, "--max-order", "1000"]);
    expect(r.code, r.stderr).toBe(2);
    // 200 lines hold order 198 at most; quiver's own cap is 128.
    expect(r.stderr).toMatch(/--max-order 1000 is more than .* 200 lines: at most 128/);
    const narrow = runQuiver([
      "modal",
      `${dir}/frf.csv`,
      "--max-order",
      "64",
      "--max-hz",
      "40",
    ]);
    expect(narrow.code, narrow.stderr).toBe(2);
    // 10 … 40 Hz is 61 lines: order 58 at most (LSCF of order n needs more than n + 1 lines).
    expect(narrow.stderr).toMatch(/--max-order 64 .* 61 lines: at most 58/);
    const odd = runQuiver(["modal", `${dir}/frf.csv`, "--max-order", "7"]);
    expect(odd.code).toBe(2);
    expect(odd.stderr).toMatch(/--max-order 7: .* even/);
  });
});
