/**
 * Microphone sensitivity from a recording of an acoustic calibrator. A
 * calibrator producing 94 dB re 20 µPa (1.0024 Pa rms) at 1 kHz is common
 * practice. The tone's rms is read from the flat-top autopower spectrum, so
 * noise and hum elsewhere in the spectrum do not count.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { spectralEstimate } from "../dsp/spectral_core.ts";
import { autoSpectrum } from "../dsp/spectrum_kinds.ts";

/** The result of a calibration. */
export interface Calibration {
  /** Sensitivity, mV/Pa. */
  readonly sensitivityMvPerPa: number;
  /** The tone's rms in volts. */
  readonly toneRmsVolts: number;
  /** The calibrator's rms pressure, Pa. */
  readonly pressureRmsPa: number;
  /** Frequency of the line where the tone was read, Hz. */
  readonly toneHz: number;
}

/**
 * The sensitivity of the microphone that recorded `volts` (the calibrator
 * tone, in volts) at `rate`, for a calibrator of `levelDb` at `frequencyHz`.
 *
 * @throws {QuiverError} when no tone stands out near the frequency or the record is too short.
 *
 * @example
 * ```ts
 * import { calibrateMicrophone } from "./calibration.ts";
 * const p = 20e-6 * 10 ** (94 / 20), s = 0.05; // 50 mV/Pa
 * const v = new Float64Array(48000).map((_, i) => s * p * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / 48000));
 * const c = calibrateMicrophone(v, 48000, 94, 1000);
 * if (Math.abs(c.sensitivityMvPerPa / 50 - 1) > 1e-3) throw new Error();
 * ```
 */
export function calibrateMicrophone(
  volts: Float64Array,
  rate: number,
  levelDb: number,
  frequencyHz: number,
): Calibration {
  if (!(frequencyHz > 0 && frequencyHz < rate / 2)) {
    throw new RangeError(
      `the calibrator frequency must lie below ${rate / 2} Hz, got ${frequencyHz}`,
    );
  }
  const block = Math.min(2 ** Math.floor(Math.log2(volts.length)), 2 ** 16);
  if (block < 1024) {
    throw new QuiverError(
      `a calibration needs at least 1024 samples; the record has ${volts.length}`,
    );
  }
  const estimate = spectralEstimate([volts], { rate, block, window: "flattop" });
  const power = autoSpectrum(estimate, 0, "power");
  const f = estimate.frequencies;
  let best = -1;
  for (let k = 1; k < f.length; k++) {
    if (Math.abs(f[k] - frequencyHz) <= Math.max(0.03 * frequencyHz, 3 * estimate.df)) {
      if (best < 0 || power[k] > power[best]) best = k;
    }
  }
  let total = 0;
  for (let k = 1; k < power.length; k++) total += power[k];
  // The flat-top spreads a tone over about 4 lines: the tone must carry most of the power.
  if (best < 0 || power[best] < 0.2 * total) {
    throw new QuiverError(
      `no calibrator tone stands out near ${frequencyHz} Hz (is the calibrator on, at the right frequency?)`,
    );
  }
  const toneRmsVolts = Math.sqrt(power[best]);
  const pressureRmsPa = 20e-6 * 10 ** (levelDb / 20);
  return {
    sensitivityMvPerPa: (1000 * toneRmsVolts) / pressureRmsPa,
    toneRmsVolts,
    pressureRmsPa,
    toneHz: f[best],
  };
}
