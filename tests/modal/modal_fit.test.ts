import { describe, expect, test } from "vitest";
import { modalFit } from "../../lib/modal/modal_fit.ts";
import { macValue } from "../../lib/modal/mac.ts";
import { gaussianNoise } from "../helpers/random.ts";

// Analytic system of our own: 6 degrees of freedom, unit mass matrix, stiffness K = Φ·Ω²·Φᵀ and
// proportional damping C = Φ·diag(2ζω)·Φᵀ for a chosen orthonormal Φ, so its eigen-solution is
// known exactly (Ewins, Modal Testing, 2nd ed., 2.3: receptance of a proportionally damped
// system H_jk(ω) = Σ_r φ_jr·φ_kr / (ω_r² − ω² + 2jζ_r·ω_r·ω)). Not a chain: a chain's modes are
// spread apart, and the test needs two modes within 2 % of each other.
const MODES_HZ = [22, 37, 45, 45.8, 70, 95]; // 45 and 45.8: 1.8 % apart
const ZETA = [0.01, 0.02, 0.005, 0.008, 0.03, 0.015]; // 0.5 … 3 %

function orthonormalShapes(seed: number): Float64Array[] {
  const raw = Array.from({ length: 6 }, (_, i) => gaussianNoise(seed + i, 6));
  const out: Float64Array[] = [];
  for (const v of raw) {
    const u = Float64Array.from(v);
    for (const q of out) {
      let dot = 0;
      for (let k = 0; k < 6; k++) dot += u[k] * q[k];
      for (let k = 0; k < 6; k++) u[k] -= dot * q[k];
    }
    const n = Math.hypot(...u);
    out.push(u.map((x) => x / n));
  }
  return out; // out[r] is mode r's shape
}

describe("modal fit of several FRFs (LSCF poles, LSFD residues)", () => {
  test("6 DOF, two modes 1.8 % apart: frequencies within 0.2 %, damping within 10 %, MAC ≥ 0.99", () => {
    const phi = orthonormalShapes(31);
    const f = new Float64Array(801).map((_, i) => 12 + i * 0.125); // 12 … 112 Hz
    const noise = [gaussianNoise(71, 6 * 801), gaussianNoise(72, 6 * 801)];
    const reference = 0;
    const dofs = Array.from({ length: 6 }, (_, o) => {
      const re = new Float64Array(f.length), im = new Float64Array(f.length);
      f.forEach((hz, k) => {
        const w = 2 * Math.PI * hz;
        MODES_HZ.forEach((fr, r) => {
          const wr = 2 * Math.PI * fr, a = wr * wr - w * w, b = 2 * ZETA[r] * wr * w;
          const d = a * a + b * b, num = phi[r][o] * phi[r][reference];
          re[k] += (num * a) / d;
          im[k] -= (num * b) / d;
        });
        // 0.2 % complex noise relative to the FRF's magnitude at the line (our choice).
        const mag = Math.hypot(re[k], im[k]);
        re[k] += 0.002 * mag * noise[0][o * f.length + k];
        im[k] += 0.002 * mag * noise[1][o * f.length + k];
      });
      return {
        point: String(o + 1),
        direction: "z",
        frf: {
          name: `p${o + 1}`,
          unit: "m/N",
          re,
          im,
          magnitude: re.map((v, k) => Math.hypot(v, im[k])),
          form: "receptance" as const,
        },
      };
    });
    const result = modalFit(f, dofs, { maxOrder: 40 });
    expect(result.modes.map((m) => m.frequencyHz.toFixed(1))).toEqual(
      MODES_HZ.map((hz) => hz.toFixed(1)),
    );
    result.modes.forEach((m, r) => {
      expect(Math.abs(m.frequencyHz / MODES_HZ[r] - 1), `mode ${r + 1} frequency`).toBeLessThan(
        0.002,
      );
      expect(Math.abs(m.dampingRatio / ZETA[r] - 1), `mode ${r + 1} damping`).toBeLessThan(0.1);
      const fitted = {
        re: Float64Array.from(m.shape, (c) => c.re),
        im: Float64Array.from(m.shape, (c) => c.im),
      };
      const truth = { re: phi[r], im: new Float64Array(6) };
      expect(macValue(fitted, truth), `mode ${r + 1} MAC`).toBeGreaterThanOrEqual(0.99);
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
