import { describe, expect, test } from "vitest";
import type { FrfData } from "../../lib/frf/frf_data.ts";
import type { Recording } from "../../lib/io/recording.ts";
import type { Table } from "../../lib/io/table.ts";
import { pathContributions } from "../../lib/paths/contributions.ts";
import { add, fir, firResponse, scale } from "../helpers/fir.ts";
import { gaussianNoise } from "../helpers/random.ts";

const RATE = 1024;
const N = 2 ** 19;
const DF = 2; // transfers on 2 Hz lines: a 512-sample block
const FREQUENCIES = new Float64Array(255).map((_, k) => (k + 1) * DF);

/** A transfer file's content: the FIR responses of the named channels, on the 2 Hz axis. */
function transfer(
  byName: Record<string, readonly number[]>,
  unitOf: (n: string) => string,
): FrfData {
  return {
    frequencies: FREQUENCIES,
    channels: Object.entries(byName).map(([name, taps]) => {
      const h = Array.from(FREQUENCIES, (f) => firResponse(taps, f, RATE));
      const re = new Float64Array(h.map((v) => v.re)), im = new Float64Array(h.map((v) => v.im));
      return {
        name,
        unit: unitOf(name),
        re,
        im,
        magnitude: re.map((v, k) => Math.hypot(v, im[k])),
      };
    }),
    metadata: { input: { name: "hammer", unit: "N" } },
  };
}

// Three mount forces from a common source plus one independent source each.
/** A direct-method set-up: the mount forces and the microphone, one transfer per mount. */
function directSetup(forces: Float64Array[], mic: Float64Array) {
  const recording: Recording = {
    rate: RATE,
    startTime: 0,
    channels: [
      ...forces.map((data, i) => ({ name: `mount_${i + 1}`, unit: "N", data })),
      { name: "cabin_mic", unit: "Pa", data: mic },
    ],
  };
  const transfers = TO_MIC.map((taps) => transfer({ cabin_mic: taps }, () => "Pa/N"));
  return { recording, transfers };
}

/**
 * An inverse-method set-up: indicator channels made from the forces through
 * `toIndicator[a][i]` (FIR taps, indicator a per force i) plus white noise,
 * the microphone beside them, and one transfer per force holding the
 * microphone's and every indicator's FIR.
 */
function indicatorSetup(options: {
  forces: Float64Array[];
  mic: Float64Array;
  toIndicator: readonly (readonly (readonly number[])[])[];
  prefix: string;
  noise?: { seed: number; level: number };
  filter?: (x: Float64Array, taps: readonly number[]) => Float64Array;
}): { recording: Recording; transfers: FrfData[]; names: string[] } {
  const { forces, mic, toIndicator, prefix, noise, filter = fir } = options;
  const names = toIndicator.map((_, a) => `${prefix}_${a + 1}`);
  const channels = toIndicator.map((paths, a) => {
    const through = paths.map((taps, i) => filter(forces[i], taps));
    if (noise !== undefined) through.push(scale(gaussianNoise(noise.seed + a, N), noise.level));
    return { name: names[a], unit: "m/s^2", data: add(...through) };
  });
  return {
    recording: {
      rate: RATE,
      startTime: 0,
      channels: [...channels, { name: "cabin_mic", unit: "Pa", data: mic }],
    },
    transfers: [0, 1, 2].map((i) =>
      transfer(
        Object.fromEntries([
          ["cabin_mic", TO_MIC[i]],
          ...toIndicator.map((paths, a) => [names[a], paths[i]]),
        ]),
        (n) => n === "cabin_mic" ? "Pa/N" : "(m/s^2)/N",
      )
    ),
    names,
  };
}

const MIX = [
  [0.8, 0.6, 0, 0],
  [0.5, 0, 0.7, 0],
  [-0.4, 0, 0, 0.9],
];
const TO_MIC = [[0.02, 0.01], [0.015, -0.012, 0.004], [-0.01, 0, 0.018]]; // Pa/N
const MIC_NOISE = 1e-4;

function forces(): Float64Array[] {
  const sources = [51, 52, 53, 54].map((seed) => gaussianNoise(seed, N));
  return MIX.map((row) => add(...row.map((a, m) => scale(sources[m], a))));
}

/** Analytic contribution cᵢ = Hᵢ·Σⱼ conj(Hⱼ)·Cᵢⱼ/√Gpp with C = (2/fs)·MIX·MIXᵀ (white sources). */
function analytic(f: number, included: readonly number[]) {
  const white = 2 / RATE;
  const h = TO_MIC.map((taps) => firResponse(taps, f, RATE));
  const c = MIX.map((ri) => MIX.map((rj) => white * ri.reduce((s, a, m) => s + a * rj[m], 0)));
  let gpp = white * MIC_NOISE ** 2;
  for (let m = 0; m < 4; m++) {
    let re = 0, im = 0;
    for (let i = 0; i < 3; i++) {
      re += h[i].re * MIX[i][m];
      im += h[i].im * MIX[i][m];
    }
    gpp += white * (re * re + im * im);
  }
  const contribution = included.map((i) => {
    let re = 0, im = 0; // Σⱼ conj(Hⱼ)·Cᵢⱼ
    for (let j = 0; j < 3; j++) {
      re += h[j].re * c[i][j];
      im -= h[j].im * c[i][j];
    }
    return {
      re: (h[i].re * re - h[i].im * im) / Math.sqrt(gpp),
      im: (h[i].re * im + h[i].im * re) / Math.sqrt(gpp),
    };
  });
  return { contribution, gpp };
}

const db = (a: number, b: number) => 20 * Math.log10(a / b);
const column = (table: Table, name: string) =>
  Float64Array.from(table.columns.find((c) => c.name === name)!.values);

describe("direct path contributions of a known 3-path system", async () => {
  const f = forces();
  const mic = add(...f.map((x, i) => fir(x, TO_MIC[i])), scale(gaussianNoise(55, N), MIC_NOISE));
  const { recording, transfers } = directSetup(f, mic);
  const result = await pathContributions(recording, {
    references: ["mount_1", "mount_2", "mount_3"],
    target: "cabin_mic",
    transfers,
    scaling: "density",
  });

  test("their complex sum equals the measured target within 0.5 dB (the model is complete)", () => {
    const err = column(result.table, "synthesis_error_db");
    for (let n = 2; n < 250; n++) {
      expect(Math.abs(err[n]), `${FREQUENCIES[n]} Hz`).toBeLessThan(0.5);
    }
    // And the measured target column is √Gpp of the analytic model (density scaling).
    const measured = column(result.table, "target_measured");
    for (const n of [10, 100, 200]) {
      expect(Math.abs(db(measured[n], Math.sqrt(analytic(FREQUENCIES[n], []).gpp)))).toBeLessThan(
        0.3,
      );
    }
  });

  test("with path 3 left out the synthesis error shows where path 3 matters, as the analysis predicts", async () => {
    const two = await pathContributions(recording, {
      references: ["mount_1", "mount_2"],
      target: "cabin_mic",
      transfers: transfers.slice(0, 2),
      scaling: "density",
    });
    const err = column(two.table, "synthesis_error_db");
    let large = 0;
    for (let n = 2; n < 250; n++) {
      const { contribution, gpp } = analytic(FREQUENCIES[n], [0, 1]);
      const sum = Math.hypot(
        contribution[0].re + contribution[1].re,
        contribution[0].im + contribution[1].im,
      );
      const expected = db(sum, Math.sqrt(gpp));
      expect(Math.abs(err[n] - expected), `${FREQUENCIES[n]} Hz`).toBeLessThan(0.5);
      if (expected < -1) large++;
    }
    expect(large).toBeGreaterThan(20); // the gap is real, not noise
  });

  test("the metadata ranks the paths by energy, the largest first, shares adding to 100 %", () => {
    const ranking = result.table.metadata.ranking as {
      band: string;
      paths: { name: string; level_db: number; share_percent: number }[];
    }[];
    expect(ranking[0].band).toBe("analysed range");
    const levels = ranking[0].paths.map((p) => p.level_db);
    expect(levels).toEqual([...levels].sort((a, b) => b - a));
    expect(ranking[0].paths.reduce((s, p) => s + p.share_percent, 0)).toBeCloseTo(100, 9);
    expect(ranking.length).toBeGreaterThan(3); // octave bands too
    expect(result.table.metadata.weighting).toBe("A");
  });
});

describe("inverse (matrix) method", () => {
  const f = forces();
  const mic = add(...f.map((x, i) => fir(x, TO_MIC[i])), scale(gaussianNoise(56, N), MIC_NOISE));
  // Six indicators, each a different FIR mix of the three forces.
  const TO_INDICATOR = Array.from(
    { length: 6 },
    (_, a) =>
      [0, 1, 2].map((i) => [1 + 0.3 * a - 0.2 * i, 0.5 * ((a + i) % 3) - 0.4, 0.1 * (a - i)]),
  );
  const { recording, transfers } = indicatorSetup({
    forces: f,
    mic,
    toIndicator: TO_INDICATOR,
    prefix: "ind",
    noise: { seed: 60, level: 1e-3 },
  });

  test("nearly collinear indicators: the plain inverse follows the noise, Tikhonov regularisation tames it", async () => {
    // Three indicators that see forces 1 and 2 almost alike (a 1 % difference), with noise.
    // (Rows not linear in a: three such rows would span only two dimensions.)
    const near = [0, 1, 2].map((a) => [[1, 0.2 * a], [1.01, 0.2 * a], [0.3, 0.5 - 0.1 * a * a]]);
    const { recording: rec, transfers: tf } = indicatorSetup({
      forces: f,
      mic,
      toIndicator: near,
      prefix: "near",
      noise: { seed: 70, level: 0.02 },
    });
    const run = (regularise?: { kind: "tikhonov"; lambda: number }) =>
      pathContributions(rec, {
        method: "inverse",
        references: ["mount_1", "mount_2", "mount_3"],
        indicators: ["near_1", "near_2", "near_3"],
        target: "cabin_mic",
        transfers: tf,
        ...(regularise !== undefined ? { regularise } : {}),
      });
    const plain = await run();
    const tamed = await run({ kind: "tikhonov", lambda: 0.05 });
    const rms = (t: typeof plain) => {
      const e = column(t.table, "synthesis_error_db").subarray(2, 250);
      return Math.sqrt(e.reduce((s, v) => s + v * v, 0) / e.length);
    };
    expect(plain.warnings.some((w) => w.includes("twice as many"))).toBe(true);
    expect(column(plain.table, "indicator_condition").reduce((a, b) => Math.max(a, b)))
      .toBeGreaterThan(100);
    // The error of the synthesis, not of the ranking: regularisation must lower it clearly.
    expect(rms(plain)).toBeGreaterThan(2 * rms(tamed));
    expect(tamed.table.metadata.regularisation).toMatch(/Tikhonov, λ = 0.05/);
  });

  test("fewer indicators than forces is refused", async () => {
    await expect(pathContributions(recording, {
      method: "inverse",
      references: ["mount_1", "mount_2", "mount_3"],
      indicators: ["ind_1", "ind_2"],
      target: "cabin_mic",
      transfers,
    })).rejects.toThrow(/at least as many indicators as paths/);
  });
});

// Periodic data: each source a multisine of period one block, filtered circularly, read with a
// rectangular window. Every segment then has the same line spectrum, so the estimate has no
// random error and the contributions have a closed form: cᵢ = Hᵢ·Fᵢ·conj(P)/|P| at each line,
// with Fᵢ = Σₘ MIXᵢₘ·Sₘ and P = Σᵢ Hᵢ·Fᵢ (the model complete). This checks the formula, its
// conjugations and phase reference to rounding, within the 0.3 dB and more.
describe("contributions of periodic forces against their closed form", () => {
  const B = RATE / DF;
  const lines = B / 2;
  // Source m, line k: amplitude 1, phase φₘₖ from a seeded generator.
  const phases = [81, 82, 83, 84].map((seed) => gaussianNoise(seed, lines).map((g) => 3 * g));
  const multisine = (m: number) => {
    const x = new Float64Array(16 * B);
    for (let n = 0; n < x.length; n++) {
      let v = 0;
      for (let k = 1; k < lines; k++) v += Math.cos((2 * Math.PI * k * n) / B + phases[m][k]);
      x[n] = v;
    }
    return x;
  };
  const circular = (x: Float64Array, taps: readonly number[]) =>
    x.map((_, n) => taps.reduce((sum, b, k) => sum + b * x[(n - k + x.length) % x.length], 0));
  const sources = [0, 1, 2, 3].map(multisine);
  const f = MIX.map((row) => add(...row.map((a, m) => scale(sources[m], a))));
  const mic = add(...f.map((x, i) => circular(x, TO_MIC[i])));
  // Line spectra: Sₘ(k) ∝ e^{jφₘₖ} (the common factor B/2 cancels in every ratio below).
  const spectrumOf = (i: number, k: number) => {
    let re = 0, im = 0;
    for (let m = 0; m < 4; m++) {
      re += MIX[i][m] * Math.cos(phases[m][k]);
      im += MIX[i][m] * Math.sin(phases[m][k]);
    }
    return { re, im };
  };
  const closedForm = (n: number, included: readonly number[]) => {
    const k = n + 1, freq = FREQUENCIES[n];
    const through = [0, 1, 2].map((i) => {
      const h = firResponse(TO_MIC[i], freq, RATE), x = spectrumOf(i, k);
      return { re: h.re * x.re - h.im * x.im, im: h.re * x.im + h.im * x.re };
    });
    const p = through.reduce((s, t) => ({ re: s.re + t.re, im: s.im + t.im }), { re: 0, im: 0 });
    const pAngle = Math.atan2(p.im, p.re), pMag = Math.hypot(p.re, p.im);
    const part = included.map((i) => ({
      ratioDb: db(Math.hypot(through[i].re, through[i].im), pMag),
      phaseDeg: ((Math.atan2(through[i].im, through[i].re) - pAngle) * 180) / Math.PI,
    }));
    const kept = included.reduce(
      (s, i) => ({ re: s.re + through[i].re, im: s.im + through[i].im }),
      { re: 0, im: 0 },
    );
    return { part, sumDb: db(Math.hypot(kept.re, kept.im), pMag) };
  };
  const wrap = (deg: number) => ((deg % 360) + 540) % 360 - 180;
  const { recording, transfers } = directSetup(f, mic);
  const periodic = { window: "rectangular", detrend: "none", overlap: 0 } as const;

  test("direct: each contribution's level and phase against the target, and their sum, as the closed form says", async () => {
    const { table } = await pathContributions(recording, {
      references: ["mount_1", "mount_2", "mount_3"],
      target: "cabin_mic",
      transfers,
      ...periodic,
    });
    const measured = column(table, "target_measured");
    const err = column(table, "synthesis_error_db");
    for (let n = 0; n < lines - 1; n++) {
      const want = closedForm(n, [0, 1, 2]);
      for (let i = 0; i < 3; i++) {
        const got = db(column(table, `mount_${i + 1}_contribution`)[n], measured[n]);
        expect(Math.abs(got - want.part[i].ratioDb), `path ${i + 1}, line ${n}`).toBeLessThan(0.3);
        const phase = column(table, `mount_${i + 1}_phase_deg`)[n];
        expect(Math.abs(wrap(phase - want.part[i].phaseDeg)), `phase ${i + 1}, line ${n}`)
          .toBeLessThan(2);
      }
      expect(Math.abs(err[n]), `sum at line ${n}`).toBeLessThan(0.5);
    }
  });

  test("a path left out: the synthesis error is the closed form's |H1F1 + H2F2|/|P|", async () => {
    const { table } = await pathContributions(recording, {
      references: ["mount_1", "mount_2"],
      target: "cabin_mic",
      transfers: transfers.slice(0, 2),
      ...periodic,
    });
    const err = column(table, "synthesis_error_db");
    let large = 0;
    for (let n = 0; n < lines - 1; n++) {
      const want = closedForm(n, [0, 1]).sumDb;
      expect(Math.abs(err[n] - want), `line ${n}`).toBeLessThan(0.5);
      if (Math.abs(want) > 1) large++;
    }
    expect(large).toBeGreaterThan(20);
  });

  test("inverse: forces from six indicators give the same contributions as the direct method", async () => {
    const TO_INDICATOR = Array.from(
      { length: 6 },
      (_, a) =>
        [0, 1, 2].map((
          i,
        ) => [1 + 0.3 * a - 0.2 * i, 0.5 * ((a + i) % 3) - 0.4, 0.1 * (a - i) ** 2]),
    );
    const { recording: rec, transfers: tf, names } = indicatorSetup({
      forces: f,
      mic,
      toIndicator: TO_INDICATOR,
      prefix: "ind",
      filter: circular,
    });
    const result = await pathContributions(rec, {
      method: "inverse",
      references: ["mount_1", "mount_2", "mount_3"],
      indicators: names,
      target: "cabin_mic",
      transfers: tf,
      ...periodic,
    });
    const measured = column(result.table, "target_measured");
    for (let n = 0; n < lines - 1; n++) {
      const want = closedForm(n, [0, 1, 2]);
      for (let i = 0; i < 3; i++) {
        const got = db(column(result.table, `mount_${i + 1}_contribution`)[n], measured[n]);
        expect(Math.abs(got - want.part[i].ratioDb), `path ${i + 1}, line ${n}`).toBeLessThan(0.3);
      }
    }
    expect(result.table.metadata.regularisation).toBe("none (plain pseudo-inverse)");
    expect(result.warnings.some((w) => w.includes("twice as many"))).toBe(false);
  });
});
