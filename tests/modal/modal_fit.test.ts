import { describe, expect, test } from "vitest";
import { modalFit } from "../../lib/modal/modal_fit.ts";
import { macValue } from "../../lib/modal/mac.ts";
import { gaussianNoise } from "../helpers/random.ts";
import { EigenvalueDecomposition, Matrix } from "ml-matrix";

// Analytic system of our own: a 6-mass lumped chain, ground–m1–m2–m3–m4–m5–m6–ground, the
// middle springs softer and the right half lighter and stiffer, chosen so that two modes fall
// 1.3 % apart (168.6 and 170.8 Hz), the others at least 8 % apart, and every mode moves the
// reference mass (m5) by at least a fifth of its largest motion, so one reference sees them all.
// Rayleigh damping C = αM + βK, so ζ_r = α/(2ω_r) + β·ω_r/2 (0.8 … 1.6 % here). Receptance from
// the eigen-solution (Ewins, Modal Testing, 2nd ed., 2.3): H_jk(ω) = Σ_r φ_jr·φ_kr /
// (ω_r² − ω² + 2jζ_r·ω_r·ω), φ mass-normalised. The eigenvectors come from ml-matrix's symmetric
// eigen-solver on M^−½·K·M^−½, a general-purpose library, not from the fit under test.
const K0 = 4e5; // N/m
const SPRINGS = [K0, K0, 0.5 * K0, 0.3 * K0, 1.2 * K0, 1.2 * K0, 1.2 * K0];
const MASSES = [1, 1, 1, 0.7, 0.7, 0.7]; // kg
const ALPHA = 3, BETA = 2e-5;

function chainModes(): { hz: number; zeta: number; shape: Float64Array }[] {
  const K = Matrix.zeros(6, 6);
  SPRINGS.forEach((k, i) => {
    const a = i - 1, b = i; // spring i joins mass a (or the ground) and mass b (or the ground)
    if (a >= 0) K.set(a, a, K.get(a, a) + k);
    if (b < 6) K.set(b, b, K.get(b, b) + k);
    if (a >= 0 && b < 6) {
      K.set(a, b, K.get(a, b) - k);
      K.set(b, a, K.get(b, a) - k);
    }
  });
  const scaled = new Matrix(6, 6);
  for (let i = 0; i < 6; i++) {
    for (let j = 0; j < 6; j++) scaled.set(i, j, K.get(i, j) / Math.sqrt(MASSES[i] * MASSES[j]));
  }
  const e = new EigenvalueDecomposition(scaled, { assumeSymmetric: true });
  return e.realEigenvalues.map((lambda, r) => {
    const w = Math.sqrt(lambda);
    return {
      hz: w / (2 * Math.PI),
      zeta: ALPHA / (2 * w) + (BETA * w) / 2,
      // φ = M^−½·v: mass-normalised.
      shape: Float64Array.from(
        { length: 6 },
        (_, i) => e.eigenvectorMatrix.get(i, r) / Math.sqrt(MASSES[i]),
      ),
    };
  }).sort((a, b) => a.hz - b.hz);
}

describe("modal fit of several FRFs (LSCF poles, LSFD residues)", () => {
  test("6-mass chain, two modes 1.3 % apart: frequencies within 0.2 %, damping within 10 %, MAC ≥ 0.99", () => {
    const modes = chainModes();
    expect(modes[4].hz / modes[3].hz - 1).toBeLessThan(0.02); // the close pair the test is about
    const f = new Float64Array(1201).map((_, i) => 20 + i * 0.25); // 20 … 320 Hz
    const noise = [gaussianNoise(71, 6 * f.length), gaussianNoise(72, 6 * f.length)];
    const reference = 4; // force at mass 5
    const dofs = Array.from({ length: 6 }, (_, o) => {
      const re = new Float64Array(f.length), im = new Float64Array(f.length);
      f.forEach((hz, k) => {
        const w = 2 * Math.PI * hz;
        for (const m of modes) {
          const wr = 2 * Math.PI * m.hz, a = wr * wr - w * w, b = 2 * m.zeta * wr * w;
          const d = a * a + b * b, num = m.shape[o] * m.shape[reference];
          re[k] += (num * a) / d;
          im[k] -= (num * b) / d;
        }
        // 0.2 % complex noise relative to the FRF's magnitude at the line (our choice).
        const mag = Math.hypot(re[k], im[k]);
        re[k] += 0.002 * mag * noise[0][o * f.length + k];
        im[k] += 0.002 * mag * noise[1][o * f.length + k];
      });
      return {
        point: String(o + 1),
        direction: "x",
        frf: {
          name: `m${o + 1}`,
          unit: "m/N",
          re,
          im,
          magnitude: re.map((v, k) => Math.hypot(v, im[k])),
          form: "receptance" as const,
        },
      };
    });
    const result = modalFit(f, dofs, { maxOrder: 40 });
    expect(result.modes).toHaveLength(6);
    result.modes.forEach((m, r) => {
      const truth = modes[r];
      expect(Math.abs(m.frequencyHz / truth.hz - 1), `mode ${r + 1} frequency`).toBeLessThan(0.002);
      expect(Math.abs(m.dampingRatio / truth.zeta - 1), `mode ${r + 1} damping`).toBeLessThan(0.1);
      const fitted = {
        re: Float64Array.from(m.shape, (c) => c.re),
        im: Float64Array.from(m.shape, (c) => c.im),
      };
      expect(macValue(fitted, { re: truth.shape, im: new Float64Array(6) }), `mode ${r + 1} MAC`)
        .toBeGreaterThanOrEqual(0.99);
      expect(m.mpc, `mode ${r + 1} MPC (real normal modes)`).toBeGreaterThan(0.95);
    });
    // The stability analysis ran over the orders and marked poles stable.
    expect(result.stability.some((p) => p.stableFrequency && p.stableDamping && p.stableShape))
      .toBe(true);
    for (const e of result.relativeError) expect(e).toBeLessThan(0.02);
  });
});

describe("an exponential window on impact records", () => {
  test("moves every pole by −1/τ; the fit moves it back and says so", () => {
    // h(t)·exp(−t/τ) has the poles λ − 1/τ (Laplace shift theorem): synthesise the windowed
    // FRF of one mode (50 Hz, ζ 1 %) with the shifted pole, then fit it knowing τ.
    const tau = 0.5, zeta = 0.01, wn = 2 * Math.PI * 50;
    const lambda = { re: -zeta * wn - 1 / tau, im: wn * Math.sqrt(1 - zeta * zeta) };
    const f = new Float64Array(600).map((_, i) => 20 + i * 0.1);
    const re = new Float64Array(600), im = new Float64Array(600);
    f.forEach((hz, k) => {
      // H = R/(jω − λ) + R*/(jω − λ*), R = −j/(2ω_d): a unit-mass mode.
      const w = 2 * Math.PI * hz;
      for (const sign of [1, -1]) {
        const dr = -lambda.re, di = w - sign * lambda.im, d = dr * dr + di * di;
        const rr = 0, ri = (-sign) / (2 * lambda.im);
        // (rr + j·ri)·(dr − j·di)/d
        re[k] += (rr * dr + ri * di) / d;
        im[k] += (ri * dr - rr * di) / d;
      }
    });
    const frf = {
      name: "tip",
      unit: "m/N",
      re,
      im,
      magnitude: re.map((v, k) => Math.hypot(v, im[k])),
      form: "receptance" as const,
    };
    const [mode] = modalFit(f, [{ point: "1", direction: "z", frf, expTau: tau }], { maxOrder: 20 })
      .modes;
    expect(Math.abs(mode.dampingRatio / zeta - 1)).toBeLessThan(0.01);
    expect(Math.abs(mode.frequencyHz / 50 - 1)).toBeLessThan(1e-4);
    expect(mode.flags).toContain("window_corrected");
    // Without τ the fit reports the windowed pole's damping, −Re λ/|λ| = (ζω_n + 1/τ)/|λ| ≈ 1.64 %.
    const [raw] = modalFit(f, [{ point: "1", direction: "z", frf }], { maxOrder: 20 }).modes;
    const windowed = -lambda.re / Math.hypot(lambda.re, lambda.im);
    expect(Math.abs(raw.dampingRatio / windowed - 1)).toBeLessThan(0.01);
    expect(raw.flags).not.toContain("window_corrected");
  });
});
