/**
 * The speech intelligibility index of ANSI S3.5-1997 (one-third octave band
 * procedure) against the standard's definitions: full masking gives 0, noise
 * far below gives what the internal noise alone leaves (1 with speech 10 dB
 * up), and a worked mid case from Table 3 typed in here.
 */
import { describe, expect, test } from "vitest";
import { spectrumLevel, speechIntelligibilityIndex } from "../../lib/quality/sii.ts";
import { assertClose } from "../helpers/assert_close.ts";

// from memory: ANSI S3.5-1997 Table 3, typed here independently of lib/quality/sii_tables.ts.
const F = [
  160,
  200,
  250,
  315,
  400,
  500,
  630,
  800,
  1000,
  1250,
  1600,
  2000,
  2500,
  3150,
  4000,
  5000,
  6300,
  8000,
];
const I = [
  0.0083,
  0.0095,
  0.0150,
  0.0289,
  0.0440,
  0.0578,
  0.0653,
  0.0711,
  0.0818,
  0.0844,
  0.0882,
  0.0898,
  0.0868,
  0.0844,
  0.0771,
  0.0527,
  0.0364,
  0.0185,
];
const X = [
  0.6,
  -1.7,
  -3.9,
  -6.1,
  -8.2,
  -9.7,
  -10.8,
  -11.9,
  -12.5,
  -13.5,
  -15.4,
  -17.7,
  -21.2,
  -24.2,
  -25.9,
  -23.6,
  -15.8,
  -7.1,
];
const U = [
  32.41,
  34.48,
  34.75,
  33.98,
  34.59,
  34.27,
  32.06,
  28.30,
  25.01,
  23.00,
  20.15,
  17.32,
  13.18,
  11.55,
  9.33,
  5.31,
  2.59,
  1.13,
];
const bands = (f: (i: number) => number) => Float64Array.from(F, (_, i) => f(i));

describe("ANSI S3.5-1997 speech intelligibility index", () => {
  test("noise 15 dB or more above the speech in every band masks it: SII = 0", () => {
    // ANSI S3.5-1997 4.5 (from memory): K_i = (E′_i − D_i + 15)/30 is 0 once D_i ≥ E′_i + 15.
    for (const over of [15, 20, 60]) {
      const r = speechIntelligibilityIndex(bands((i) => U[i] + over));
      expect(r.sii).toBe(0);
      expect(Array.from(r.audibility).every((a) => a === 0)).toBe(true);
    }
  });

  test("noise far below: only the internal noise limits, at 8 kHz; 1 with speech 10 dB up", () => {
    // Without noise D_i is the self-speech masking spread (by hand: more than 15 dB below the
    // speech in every band) or the internal noise X_i. Only at 8 kHz is E′ − X = 8.23 dB < 15,
    // so K = (1.13 + 7.1 + 15)/30 there and 1 elsewhere (ANSI S3.5-1997 4.5, Table 3).
    const quiet = speechIntelligibilityIndex(bands(() => -100));
    const k8000 = (1.13 + 7.1 + 15) / 30;
    assertClose(quiet.sii, 1 - 0.0185 * (1 - k8000), { relative: 0, absolute: 1e-12 }, "SII");
    assertClose(quiet.audibility[17], k8000, { relative: 0, absolute: 1e-12 }, "A at 8 kHz");
    // The lowest band has no spread from below: D_1 = B_1 = E′_1 − 24 = 8.41 dB, the
    // self-speech masking (ANSI S3.5-1997 4.3.2, from memory), above X_1 = 0.6 dB.
    assertClose(quiet.disturbanceDb[0], 32.41 - 24, { relative: 0, absolute: 1e-12 }, "D_1");
    // Speech 10 dB above normal: E′ − X ≥ 15 in every band, and the level distortion factor
    // L = 1 − (E′ − U − 10)/160 is still 1 (ANSI S3.5-1997 4.6): every band fully audible.
    const raised = speechIntelligibilityIndex(bands(() => -Infinity), {
      speechDb: bands((i) => U[i] + 10),
    });
    assertClose(raised.sii, 1, { relative: 0, absolute: 1e-12 }, "SII, speech +10 dB");
  });

  test("a hearing loss of 40 dB HL raises the internal noise: X′ = X + T′", () => {
    // ANSI S3.5-1997 4.4 (from memory): D = max(Z, X + T′). At 1 kHz X + T′ = 27.5 dB lies far
    // above the self-masking spread, so K = (25.01 − 27.5 + 15)/30.
    const r = speechIntelligibilityIndex(bands(() => -Infinity), { thresholdDb: bands(() => 40) });
    assertClose(r.audibility[8], (25.01 - 27.5 + 15) / 30, { relative: 0, absolute: 1e-12 }, "A");
  });

  test("level distortion: speech 50 dB above normal loses (50 − 10)/160 in every band", () => {
    // ANSI S3.5-1997 4.6 (from memory): L_i = 1 − (E′_i − U_i − 10)/160.
    const r = speechIntelligibilityIndex(bands(() => -Infinity), {
      speechDb: bands((i) => U[i] + 50),
    });
    assertClose(r.sii, 1 - 40 / 160, { relative: 0, absolute: 1e-12 }, "SII");
  });

  test("worked mid case: speech-shaped noise at the speech's own spectrum level", () => {
    // The worksheet of ANSI S3.5-1997 clauses 4.3–4.7 (from memory) on Table 3, by hand:
    // B = max(N′, E′ − 24); C = −80 + 0.6(B + 10 lg F − 6.353);
    // Z_1 = B_1, Z_i = 10 lg(10^(N′_i/10) + Σ_k<i 10^((B_k + 3.32 C_k lg(0.89 F_i/F_k))/10));
    // D = max(Z, X); K = (E′ − D + 15)/30 in 0…1; SII = Σ I·K (L = 1 at normal effort).
    const noise = U;
    const B = noise.map((n, i) => Math.max(n, U[i] - 24));
    const C = B.map((b, i) => -80 + 0.6 * (b + 10 * Math.log10(F[i]) - 6.353));
    let expected = 0;
    const K: number[] = [];
    for (let i = 0; i < 18; i++) {
      let sum = 10 ** (noise[i] / 10);
      for (let k = 0; k < i; k++) {
        sum += 10 ** ((B[k] + 3.32 * C[k] * Math.log10((0.89 * F[i]) / F[k])) / 10);
      }
      const z = i === 0 ? B[0] : 10 * Math.log10(sum);
      K.push(Math.min(1, Math.max(0, (U[i] - Math.max(z, X[i]) + 15) / 30)));
      expected += I[i] * K[i];
    }
    // Two bands worked with pencil: band 1, Z = B = 32.41, K = 15/30. Band 2: C_1 = −51.141
    // dB/octave, the 160 Hz band's spread reaches 200 Hz at 32.41 − 51.141·3.32·lg(1.1125)
    // = 24.548 dB; Z_2 = 10 lg(10^3.448 + 10^2.4548) = 34.900; K_2 = (34.48 − 34.900 + 15)/30.
    expect(K[0]).toBe(0.5);
    assertClose(K[1], (34.48 - 34.9 + 15) / 30, { relative: 0, absolute: 1e-4 }, "K_2 by hand");
    const r = speechIntelligibilityIndex(Float64Array.from(noise));
    assertClose(r.audibility, K, { relative: 0, absolute: 1e-12 }, "A_i");
    assertClose(r.sii, expected, { relative: 0, absolute: 1e-12 }, "SII");
    // About half the speech heard, as 0 dB signal-to-noise in every band should give.
    expect(r.sii).toBeGreaterThan(0.4);
    expect(r.sii).toBeLessThan(0.5);
    let sum = 0;
    for (const c of r.contribution) sum += c;
    assertClose(sum, r.sii, { relative: 1e-12, absolute: 0 }, "Σ contributions");
  });

  test("a band level becomes a spectrum level by the band's width", () => {
    // Spectrum level = band level − 10 lg(Δf) (definition, dB per Hz).
    assertClose(spectrumLevel(50, 231.6), 50 - 10 * Math.log10(231.6), {
      relative: 0,
      absolute: 1e-12,
    });
    expect(() => spectrumLevel(50, 0)).toThrow(RangeError);
  });

  test("impossible inputs are refused", () => {
    expect(() => speechIntelligibilityIndex(new Float64Array(17))).toThrow(/18 band values/);
    expect(() => speechIntelligibilityIndex(bands(() => NaN))).toThrow(/must be a number/);
  });
});
