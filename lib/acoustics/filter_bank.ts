/**
 * Band powers from a time-domain filter bank: one Butterworth band-pass per
 * band (order 3, i.e. a 6-pole band-pass in three sections, common practice
 * for class 1 fractional-octave filters, from memory), designed by the
 * bilinear transform with the edges pre-warped so that each band's −3 dB
 * points fall exactly on its IEC 61260-1 edges.
 *
 * Low bands are filtered at a lower rate: the signal is halved in rate as
 * often as a band's upper edge stays below 0.1 of the current rate, each time
 * through an 8th-order Butterworth low-pass at 0.2 of the rate before it (it
 * passes every band kept at the lower rate and removes, by at least 48 dB,
 * what would alias into them). A band's power is the mean square of its
 * filter's output after the first 10 time constants of the band (10/(π·B)
 * seconds for bandwidth B), which are left out as the filter's settling.
 *
 * @module
 */
import type { Band } from "./bands.ts";
import { type Biquad, filterCascade, normaliseCascade } from "./biquad.ts";

interface Complex {
  re: number;
  im: number;
}

const div = (a: Complex, b: Complex): Complex => {
  const d = b.re * b.re + b.im * b.im;
  return { re: (a.re * b.re + a.im * b.im) / d, im: (a.im * b.re - a.re * b.im) / d };
};
const csqrt = (a: Complex): Complex => {
  const r = Math.hypot(a.re, a.im);
  const re = Math.sqrt((r + a.re) / 2);
  const im = Math.sign(a.im || 1) * Math.sqrt(Math.max(0, (r - a.re) / 2));
  return { re, im };
};
/** Bilinear map of an s-plane point, s in units of 2·fs. */
const bilinear = (s: Complex): Complex =>
  div({ re: 1 + s.re, im: s.im }, { re: 1 - s.re, im: -s.im });

/** Analogue Butterworth poles of the normalised low-pass of `order`. */
function butterworthPoles(order: number): Complex[] {
  return Array.from({ length: order }, (_, k) => {
    const theta = (Math.PI * (2 * k + order + 1)) / (2 * order);
    return { re: Math.cos(theta), im: Math.sin(theta) };
  });
}

function sectionFromPole(pole: Complex, zeros: [number, number]): Biquad {
  return {
    b0: 1,
    b1: -(zeros[0] + zeros[1]),
    b2: zeros[0] * zeros[1],
    a1: -2 * pole.re,
    a2: pole.re * pole.re + pole.im * pole.im,
  };
}

/**
 * A Butterworth band-pass of `order` (2·order poles) with its −3 dB points at
 * `lowerHz` and `upperHz`, unit gain at their geometric mean.
 *
 * @throws {RangeError} when the band does not fit below the Nyquist frequency.
 *
 * @example
 * ```ts
 * import { cascadeResponse } from "./biquad.ts";
 * import { butterworthBandPass } from "./filter_bank.ts";
 * const bp = butterworthBandPass(891.25, 1122.02, 48000);
 * const h = cascadeResponse(bp, 891.25, 48000);
 * if (Math.abs(20 * Math.log10(Math.hypot(h.re, h.im)) + 3.0103) > 0.001) throw new Error();
 * ```
 */
export function butterworthBandPass(
  lowerHz: number,
  upperHz: number,
  rate: number,
  order = 3,
): Biquad[] {
  if (!(lowerHz > 0 && upperHz > lowerHz && upperHz < rate / 2)) {
    throw new RangeError(
      `band ${lowerHz}–${upperHz} Hz does not fit below the Nyquist frequency of ${rate / 2} Hz`,
    );
  }
  // Pre-warped edges, in units of 2·fs so that the bilinear map is z = (1 + s)/(1 − s).
  const w1 = Math.tan((Math.PI * lowerHz) / rate);
  const w2 = Math.tan((Math.PI * upperHz) / rate);
  const bandwidth = w2 - w1;
  const centre2 = w1 * w2;
  const sections: Biquad[] = [];
  for (const p of butterworthPoles(order)) {
    // Low-pass to band-pass: s² − p·B·s + ω₀² = 0 for each prototype pole p.
    const pb = { re: p.re * bandwidth, im: p.im * bandwidth };
    const root = csqrt({ re: pb.re * pb.re - pb.im * pb.im - 4 * centre2, im: 2 * pb.re * pb.im });
    for (
      const s of [{ re: (pb.re + root.re) / 2, im: (pb.im + root.im) / 2 }, {
        re: (pb.re - root.re) / 2,
        im: (pb.im - root.im) / 2,
      }]
    ) {
      if (s.im > 0) sections.push(sectionFromPole(bilinear(s), [1, -1]));
    }
  }
  return normaliseCascade(sections, Math.sqrt(lowerHz * upperHz), rate, 1);
}

/**
 * A Butterworth low-pass of even `order` with its −3 dB point at `cutoffHz`,
 * unit gain at 0 Hz.
 *
 * @example
 * ```ts
 * import { cascadeResponse } from "./biquad.ts";
 * import { butterworthLowPass } from "./filter_bank.ts";
 * const h = cascadeResponse(butterworthLowPass(1000, 8000, 8), 1000, 8000);
 * if (Math.abs(Math.hypot(h.re, h.im) - Math.SQRT1_2) > 1e-9) throw new Error();
 * ```
 */
export function butterworthLowPass(cutoffHz: number, rate: number, order = 8): Biquad[] {
  if (order % 2 !== 0) throw new RangeError("the low-pass order must be even");
  const wc = Math.tan((Math.PI * cutoffHz) / rate);
  const sections = butterworthPoles(order)
    .filter((p) => p.im > 0)
    .map((p) => sectionFromPole(bilinear({ re: p.re * wc, im: p.im * wc }), [-1, -1]));
  return normaliseCascade(sections, 0, rate, 1);
}

/** Band powers and the filter-bank details. */
export interface FilterBankPowers {
  /** Mean square per band. */
  readonly power: Float64Array;
  /** Rate at which each band was filtered, Hz. */
  readonly bandRate: Float64Array;
  /** Bands whose settling time left less than half the record. */
  readonly shortRecord: readonly number[];
}

/**
 * Mean square of `signal` in each band, through the filter bank.
 *
 * @throws {RangeError} when a band lies above 0.45 of the rate.
 */
export function filterBankPowers(
  signal: Float64Array,
  rate: number,
  bands: readonly Band[],
): FilterBankPowers {
  const levels: Float64Array[] = [signal];
  const rates = [rate];
  const levelOf = (b: Band) => {
    let d = 0;
    while (b.upperHz < 0.1 * (rates[d] / 2) && levels[d].length >= 64) {
      if (levels[d + 1] === undefined) {
        const smooth = filterCascade(levels[d], butterworthLowPass(0.2 * rates[d], rates[d]));
        levels.push(smooth.filter((_, i) => i % 2 === 0));
        rates.push(rates[d] / 2);
      }
      d++;
    }
    return d;
  };
  const power = new Float64Array(bands.length);
  const bandRate = new Float64Array(bands.length);
  const shortRecord: number[] = [];
  bands.forEach((b, i) => {
    if (b.upperHz >= 0.45 * rate) {
      throw new RangeError(
        `band ${b.nominalHz} Hz reaches ${b.upperHz} Hz, too close to the Nyquist frequency`,
      );
    }
    const d = levelOf(b);
    const x = levels[d];
    const y = filterCascade(x, butterworthBandPass(b.lowerHz, b.upperHz, rates[d]));
    const settle = Math.min(
      x.length - 1,
      Math.ceil((10 / (Math.PI * (b.upperHz - b.lowerHz))) * rates[d]),
    );
    if (settle > x.length / 2) shortRecord.push(i);
    let sum = 0;
    for (let n = settle; n < y.length; n++) sum += y[n] * y[n];
    power[i] = sum / (y.length - settle);
    bandRate[i] = rates[d];
  });
  return { power, bandRate, shortRecord };
}
