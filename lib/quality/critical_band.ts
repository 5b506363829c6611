/**
 * Critical bands for tonal prominence (ECMA-418-1): the bandwidth around a
 * tone, the bands next to it, and the power of a density spectrum over a
 * band of any edges.
 *
 * @module
 */

/**
 * The critical bandwidth around `f` Hz: 25 + 75·(1 + 1.4·(f/1000)²)^0.69 Hz
 * (ECMA-418-1, after Zwicker and Terhardt 1980).
 *
 * @throws {RangeError} for a frequency that is not finite and positive.
 *
 * @example
 * ```ts
 * import { criticalBandwidth } from "./critical_band.ts";
 * // At 1 kHz: 25 + 75·2.4^0.69 ≈ 162.2 Hz.
 * if (Math.abs(criticalBandwidth(1000) - 162.2) > 0.1) throw new Error();
 * ```
 */
export function criticalBandwidth(f: number): number {
  if (!(f > 0) || !Number.isFinite(f)) {
    throw new RangeError(`a critical band needs a positive frequency, got ${f}`);
  }
  return 25 + 75 * (1 + 1.4 * (f / 1000) ** 2) ** 0.69;
}

/** A band's edges, Hz. */
export interface Band {
  /** Lower edge, Hz. */
  readonly low: number;
  /** Upper edge, Hz. */
  readonly high: number;
}

/**
 * The critical band centred on `f`: f ± half the critical bandwidth.
 *
 * @example
 * ```ts
 * import { criticalBand, criticalBandwidth } from "./critical_band.ts";
 * const b = criticalBand(2000);
 * if (Math.abs(b.high - b.low - criticalBandwidth(2000)) > 1e-9) throw new Error();
 * ```
 */
export function criticalBand(f: number): Band {
  const half = criticalBandwidth(f) / 2;
  return { low: f - half, high: f + half };
}

/**
 * The centre c of the critical band whose edge lies at `edge`: c + Δf_c(c)/2
 * = edge for `side` "below" (a band ending there), c − Δf_c(c)/2 = edge for
 * "above". Bisection; c ± Δf_c(c)/2 rises with c, so the root is unique.
 */
function centreWithEdge(edge: number, side: "below" | "above"): number {
  const edgeOf = (c: number) =>
    side === "below" ? c + criticalBandwidth(c) / 2 : c - criticalBandwidth(c) / 2;
  let lo = 1e-6, hi = edge + 1e5;
  for (let i = 0; i < 200 && hi - lo > 1e-9 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (edgeOf(mid) < edge) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * The critical band just above `edge` (its lower edge there) and the one
 * just below (its upper edge there), each as wide as the critical bandwidth
 * at its own centre (ECMA-418-1's adjacent bands, from memory). The band
 * below is undefined when its lower edge would fall under 0 Hz.
 *
 * @example
 * ```ts
 * import { bandAbove, bandBelow, criticalBandwidth } from "./critical_band.ts";
 * const up = bandAbove(1100);
 * const c = (up.low + up.high) / 2;
 * if (Math.abs(up.low - 1100) > 1e-6 || Math.abs(up.high - up.low - criticalBandwidth(c)) > 1e-6) throw new Error();
 * const down = bandBelow(900)!;
 * if (Math.abs(down.high - 900) > 1e-6) throw new Error();
 * ```
 */
export function bandAbove(edge: number): Band {
  const c = centreWithEdge(edge, "above");
  return { low: edge, high: c + criticalBandwidth(c) / 2 };
}

/** The critical band just below `edge` (see {@linkcode bandAbove}). */
export function bandBelow(edge: number): Band | undefined {
  const c = centreWithEdge(edge, "below");
  const low = c - criticalBandwidth(c) / 2;
  return low > 0 ? { low, high: edge } : undefined;
}

/**
 * The power of a one-sided density spectrum (lines k·df) over a band,
 * unit²: each line stands for [(k − ½)·df, (k + ½)·df] and counts with the
 * part of it inside the band, so a flat density G gives G·(high − low)
 * exactly. `skip` marks lines left out (other tones); their share of the
 * band is returned as `skipped` Hz.
 *
 * @throws {RangeError} when the band is empty or reaches past the last line.
 *
 * @example
 * ```ts
 * import { bandPower } from "./critical_band.ts";
 * const g = new Float64Array(101).fill(2); // 2 unit²/Hz, lines 1 Hz apart
 * if (Math.abs(bandPower(g, 1, { low: 10.25, high: 40 }).power - 59.5) > 1e-12) throw new Error();
 * ```
 */
export function bandPower(
  density: Float64Array,
  df: number,
  band: Band,
  skip?: (line: number) => boolean,
): { power: number; skipped: number } {
  const { low, high } = band;
  if (!(high > low) || low < 0) throw new RangeError(`the band ${low}–${high} Hz is empty`);
  if (high > (density.length - 0.5) * df + 1e-9 * df) {
    throw new RangeError(`the band ${low}–${high} Hz reaches past the spectrum's last line`);
  }
  const first = Math.max(0, Math.round(low / df));
  const last = Math.min(density.length - 1, Math.round(high / df));
  let power = 0, skipped = 0;
  for (let k = first; k <= last; k++) {
    const share = Math.min(high, (k + 0.5) * df) - Math.max(low, (k - 0.5) * df);
    if (share <= 0) continue;
    if (skip?.(k)) skipped += share;
    else power += density[k] * share;
  }
  return { power, skipped };
}
