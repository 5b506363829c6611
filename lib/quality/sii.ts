/**
 * The speech intelligibility index of ANSI S3.5-1997, one-third octave band
 * procedure, from the noise's spectrum levels in the 18 bands of Table 3
 * (sii_tables.ts), for the standard speech spectrum of normal vocal effort
 * and a listener with hearing threshold levels of 0 dB HL:
 *
 * - self-speech masking V_i = E′_i − 24 dB, B_i = max(N′_i, V_i);
 * - spread of masking: slope C_i = −80 + 0.6·(B_i + 10·lg F_i − 6.353) dB per
 *   octave, Z_1 = B_1 and, for i ≥ 2,
 *   Z_i = 10·lg(10^(N′_i/10) + Σ_{k<i} 10^((B_k + 3.32·C_k·lg(0.89·F_i/F_k))/10));
 * - disturbance D_i = max(Z_i, X_i + T′_i), the internal noise X_i;
 * - level distortion L_i = 1 − (E′_i − U_i − 10)/160, at most 1;
 * - band audibility A_i = L_i·K_i, K_i = (E′_i − D_i + 15)/30 limited to 0…1;
 * - SII = Σ I_i·A_i.
 *
 * The formulas are written from memory of the standard's clauses 4 and 5.
 *
 * @module
 */
import { SII_BANDS } from "./sii_tables.ts";

/** Options of {@linkcode speechIntelligibilityIndex}. */
export interface SiiOptions {
  /**
   * Equivalent speech spectrum levels E′_i, dB re 20 µPa per Hz, one per
   * band. Default: the standard speech spectrum of normal vocal effort (U_i).
   */
  readonly speechDb?: Float64Array;
  /** Hearing threshold levels T′_i, dB HL, one per band. Default: 0 in every band. */
  readonly thresholdDb?: Float64Array;
}

/** The index and what each band gives to it. */
export interface SiiResult {
  /** The speech intelligibility index, 0 … 1. */
  readonly sii: number;
  /** Equivalent disturbance spectrum level D_i per band, dB re 20 µPa per Hz. */
  readonly disturbanceDb: Float64Array;
  /** Band audibility A_i per band, 0 … 1. */
  readonly audibility: Float64Array;
  /** I_i·A_i per band; they sum to the index. */
  readonly contribution: Float64Array;
}

const count = SII_BANDS.length;

function checkBands(x: Float64Array, what: string, minusInfinity: boolean): void {
  if (x.length !== count) {
    throw new RangeError(`${what}: ${count} band values needed, got ${x.length}`);
  }
  for (const v of x) {
    if (!(Number.isFinite(v) || (minusInfinity && v === -Infinity))) {
      throw new RangeError(`${what}: every band value must be a number, got ${v}`);
    }
  }
}

/**
 * The speech intelligibility index from the noise's equivalent spectrum
 * levels N′_i (dB re 20 µPa per Hz) in the 18 bands of Table 3, lowest
 * first. A band without noise may be −Infinity.
 *
 * @throws {RangeError} for arrays that do not hold 18 numbers.
 *
 * @example
 * ```ts
 * import { speechIntelligibilityIndex } from "./sii.ts";
 * // Noise 15 dB above the speech spectrum in every band masks it all (K_i = 0).
 * const speech = [32.41, 34.48, 34.75, 33.98, 34.59, 34.27, 32.06, 28.3, 25.01, 23, 20.15,
 *   17.32, 13.18, 11.55, 9.33, 5.31, 2.59, 1.13];
 * const r = speechIntelligibilityIndex(Float64Array.from(speech, (u) => u + 15));
 * if (r.sii !== 0) throw new Error();
 * ```
 */
export function speechIntelligibilityIndex(
  noiseDb: Float64Array,
  options: SiiOptions = {},
): SiiResult {
  checkBands(noiseDb, "noise spectrum levels", true);
  const speech = options.speechDb ?? Float64Array.from(SII_BANDS, (b) => b.speechDb);
  const threshold = options.thresholdDb ?? new Float64Array(count);
  checkBands(speech, "speech spectrum levels", false);
  checkBands(threshold, "hearing threshold levels", false);
  const f = SII_BANDS.map((b) => b.centerHz);
  const masking = new Float64Array(count), slope = new Float64Array(count);
  for (let i = 0; i < count; i++) {
    masking[i] = Math.max(noiseDb[i], speech[i] - 24);
    slope[i] = -80 + 0.6 * (masking[i] + 10 * Math.log10(f[i]) - 6.353);
  }
  const disturbanceDb = new Float64Array(count);
  const audibility = new Float64Array(count), contribution = new Float64Array(count);
  let sii = 0;
  for (let i = 0; i < count; i++) {
    let z = masking[0];
    if (i > 0) {
      let power = 10 ** (noiseDb[i] / 10);
      for (let k = 0; k < i; k++) {
        power += 10 ** ((masking[k] + 3.32 * slope[k] * Math.log10(0.89 * f[i] / f[k])) / 10);
      }
      z = 10 * Math.log10(power);
    }
    const d = Math.max(z, SII_BANDS[i].internalNoiseDb + threshold[i]);
    const level = Math.min(1, 1 - (speech[i] - SII_BANDS[i].speechDb - 10) / 160);
    const k = Math.min(1, Math.max(0, (speech[i] - d + 15) / 30));
    disturbanceDb[i] = d;
    audibility[i] = level * k;
    contribution[i] = SII_BANDS[i].importance * audibility[i];
    sii += contribution[i];
  }
  return { sii, disturbanceDb, audibility, contribution };
}

/**
 * A band level as a spectrum level: L − 10·lg(Δf), the band's width Δf in Hz
 * (ANSI S3.5-1997 works in spectrum levels, dB per Hz).
 *
 * @throws {RangeError} for a width that is not positive.
 *
 * @example
 * ```ts
 * import { spectrumLevel } from "./sii.ts";
 * if (Math.abs(spectrumLevel(60, 100) - 40) > 1e-12) throw new Error();
 * ```
 */
export function spectrumLevel(bandDb: number, widthHz: number): number {
  if (!(widthHz > 0)) throw new RangeError(`a band's width must be positive, got ${widthHz}`);
  return bandDb - 10 * Math.log10(widthHz);
}
