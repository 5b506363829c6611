import { describe, expect, test } from "vitest";
import { type Biquad, CascadeFilter } from "../../lib/acoustics/biquad.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { gaussianNoise, uniformGenerator } from "../helpers/random.ts";

/**
 * The reference: each section's difference equation written out directly
 * (direct form I), y[n] = b0·x[n] + b1·x[n−1] + b2·x[n−2] − a1·y[n−1] − a2·y[n−2],
 * applied section after section from rest — the definition of
 * H(z) = Π (b0 + b1·z⁻¹ + b2·z⁻²)/(1 + a1·z⁻¹ + a2·z⁻²) (Oppenheim & Schafer,
 * Discrete-Time Signal Processing, ch. 6). A different structure from the
 * library's transposed form, so the two agree to rounding only.
 */
function directForm(x: Float64Array, sections: readonly Biquad[]): Float64Array {
  let signal = x;
  for (const { b0, b1, b2, a1, a2 } of sections) {
    const y = new Float64Array(signal.length);
    for (let n = 0; n < signal.length; n++) {
      const x1 = n >= 1 ? signal[n - 1] : 0, x2 = n >= 2 ? signal[n - 2] : 0;
      const y1 = n >= 1 ? y[n - 1] : 0, y2 = n >= 2 ? y[n - 2] : 0;
      y[n] = b0 * signal[n] + b1 * x1 + b2 * x2 - a1 * y1 - a2 * y2;
    }
    signal = y;
  }
  return signal;
}

/** Stable sections, each different: poles of radius 0.3–0.9 at random angles, zeros anywhere near the circle. */
function randomSections(count: number, seed: number): Biquad[] {
  const u = uniformGenerator(seed);
  return Array.from({ length: count }, () => {
    const r = 0.3 + 0.6 * u(), theta = Math.PI * u();
    const zr = 1.2 * u(), phi = Math.PI * u(), gain = 0.5 + u();
    return {
      b0: gain,
      b1: -2 * gain * zr * Math.cos(phi),
      b2: gain * zr * zr,
      a1: -2 * r * Math.cos(theta),
      a2: r * r,
    };
  });
}

describe("CascadeFilter equals the sections' difference equations", () => {
  // 1 to 9 sections: every way the filter groups sections into passes (fours,
  // a pair, a single one) and state at every offset.
  for (let count = 1; count <= 9; count++) {
    test(`${count} section(s), fed in uneven chunks`, () => {
      const sections = randomSections(count, 100 + count);
      const x = gaussianNoise(200 + count, 2000);
      const expected = directForm(x, sections);
      const filter = new CascadeFilter(sections);
      const y = new Float64Array(x.length);
      // Chunks of 1 to 97 samples: the state must carry over between calls.
      for (let start = 0, n = 1; start < x.length; start += n, n = (n * 5) % 97 + 1) {
        const chunk = x.slice(start, start + n);
        const out = filter.process(chunk);
        expect(out).toBe(chunk); // in place
        y.set(out, start);
      }
      let scale = 0;
      for (const v of expected) scale = Math.max(scale, Math.abs(v));
      // Two structures of the same H(z): rounding only, 1e-10 of the peak.
      assertClose(y, expected, { relative: 0, absolute: 1e-10 * scale }, `${count} sections`);
    });
  }

  test("a single section's impulse response is the analytic one", () => {
    // H(z) = 1/(1 − 2r·cosθ·z⁻¹ + r²·z⁻²) has h[n] = rⁿ·sin((n+1)θ)/sinθ
    // (Oppenheim & Schafer, ch. 3, partial fractions of a complex-conjugate pole pair).
    const r = 0.9, theta = 0.7;
    const section = { b0: 1, b1: 0, b2: 0, a1: -2 * r * Math.cos(theta), a2: r * r };
    const impulse = new Float64Array(64);
    impulse[0] = 1;
    const h = new CascadeFilter([section]).process(impulse);
    const expected = Float64Array.from(
      { length: 64 },
      (_, n) => r ** n * Math.sin((n + 1) * theta) / Math.sin(theta),
    );
    assertClose(h, expected, { relative: 0, absolute: 1e-12 }, "impulse response");
  });
});
