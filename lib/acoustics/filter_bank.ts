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
import { type Biquad, CascadeFilter, normaliseCascade } from "./biquad.ts";
import { formatNumber } from "../format_number.ts";

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
      `band ${formatNumber(lowerHz)}–${
        formatNumber(upperHz)
      } Hz does not fit below the Nyquist frequency of ${formatNumber(rate / 2, 6)} Hz`,
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
 *
 * @example
 * ```ts
 * import { filterBankPowers } from "./filter_bank.ts";
 * import { band } from "./bands.ts";
 * // A 1 kHz tone of 1 rms in the 1 kHz one-third octave (IEC 61260-1 band 0).
 * const x = new Float64Array(48000).map((_, i) => Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / 48000));
 * const { power } = filterBankPowers(x, 48000, [band(0, 3)]);
 * if (Math.abs(power[0] - 1) > 0.01) throw new Error();
 * ```
 */
export function filterBankPowers(
  signal: Float64Array,
  rate: number,
  bands: readonly Band[],
): FilterBankPowers {
  const meter = new FilterBankMeter(rate, signal.length, bands);
  meter.push(signal.slice());
  return meter.finish();
}

/**
 * The filter bank fed in chunks: memory for one chunk per rate level,
 * whatever the record's length, and exactly the numbers of one pass over the
 * whole record (every filter keeps its state between chunks, and halving the
 * rate keeps the samples of even index of the whole record).
 *
 * @example
 * ```ts
 * import { FilterBankMeter } from "./filter_bank.ts";
 * import { band } from "./bands.ts";
 * // A 1 kHz tone of 1 rms fed in chunks: mean square 1 in the 1 kHz one-third octave.
 * const x = new Float64Array(48000).map((_, i) => Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / 48000));
 * const meter = new FilterBankMeter(48000, x.length, [band(0, 3)]);
 * for (let at = 0; at < x.length; at += 4096) meter.push(x.slice(at, at + 4096));
 * if (Math.abs(meter.finish().power[0] - 1) > 0.01) throw new Error();
 * ```
 */
export class FilterBankMeter {
  readonly #levels: {
    rate: number;
    length: number;
    index: number; // samples of this level seen so far
    lowPass?: CascadeFilter; // to the next level
    scratch: Float64Array; // a band's filtered copy of a chunk
    down: Float64Array; // the chunk handed to the next level
  }[] = [];
  readonly #bands: {
    level: number;
    filter: CascadeFilter;
    settle: number;
    sum: number;
  }[];

  /**
   * @throws {RangeError} when a band lies above 0.45 of the rate.
   */
  constructor(rate: number, length: number, bands: readonly Band[]) {
    const rates = [rate], lengths = [length];
    const levelOf = (b: Band) => {
      let d = 0;
      while (b.upperHz < 0.1 * (rates[d] / 2) && lengths[d] >= 64) {
        if (rates[d + 1] === undefined) {
          rates.push(rates[d] / 2);
          lengths.push(Math.ceil(lengths[d] / 2));
        }
        d++;
      }
      return d;
    };
    this.#bands = bands.map((b) => {
      if (b.upperHz >= 0.45 * rate) {
        throw new RangeError(
          `band ${formatNumber(b.nominalHz)} Hz reaches ${
            formatNumber(b.upperHz)
          } Hz, too close to the Nyquist frequency`,
        );
      }
      const level = levelOf(b);
      const settle = Math.min(
        lengths[level] - 1,
        Math.ceil((10 / (Math.PI * (b.upperHz - b.lowerHz))) * rates[level]),
      );
      return {
        level,
        filter: new CascadeFilter(butterworthBandPass(b.lowerHz, b.upperHz, rates[level])),
        settle,
        sum: 0,
      };
    });
    for (let d = 0; d < rates.length; d++) {
      this.#levels.push({
        rate: rates[d],
        length: lengths[d],
        index: 0,
        ...(d + 1 < rates.length
          ? { lowPass: new CascadeFilter(butterworthLowPass(0.2 * rates[d], rates[d])) }
          : {}),
        scratch: new Float64Array(0),
        down: new Float64Array(0),
      });
    }
  }

  /** Adds the next samples (changed in place: pass a copy to keep them). */
  push(chunk: Float64Array): void {
    this.#push(0, chunk);
  }

  #push(d: number, chunk: Float64Array): void {
    const level = this.#levels[d];
    const start = level.index;
    for (const band of this.#bands) {
      if (band.level !== d) continue;
      if (level.scratch.length < chunk.length) level.scratch = new Float64Array(chunk.length);
      const y = level.scratch.subarray(0, chunk.length);
      y.set(chunk);
      band.filter.process(y);
      let sum = band.sum;
      for (let n = Math.max(0, band.settle - start); n < y.length; n++) sum += y[n] * y[n];
      band.sum = sum;
    }
    level.index += chunk.length;
    if (level.lowPass === undefined || chunk.length === 0) return;
    // The next level: low-passed, then the samples of even index in this level's count.
    level.lowPass.process(chunk);
    const firstEven = start % 2 === 0 ? 0 : 1;
    const count = Math.ceil((chunk.length - firstEven) / 2);
    if (level.down.length < count) level.down = new Float64Array(count);
    const next = level.down.subarray(0, Math.max(0, count));
    for (let i = 0; i < next.length; i++) next[i] = chunk[firstEven + 2 * i];
    this.#push(d + 1, next);
  }

  /** The band powers, rates and short-record bands of everything pushed. */
  finish(): FilterBankPowers {
    const power = new Float64Array(this.#bands.length);
    const bandRate = new Float64Array(this.#bands.length);
    const shortRecord: number[] = [];
    this.#bands.forEach((band, i) => {
      const { length, rate } = this.#levels[band.level];
      if (band.settle > length / 2) shortRecord.push(i);
      power[i] = band.sum / (length - band.settle);
      bandRate[i] = rate;
    });
    return { power, bandRate, shortRecord };
  }
}
