/**
 * Microphone sensitivity from a recording of an acoustic calibrator. A
 * calibrator producing 94 dB re 20 µPa (1.0024 Pa rms) at 1 kHz is common
 * practice. The tone's rms is read from the flat-top autopower spectrum, so
 * noise and hum elsewhere in the spectrum do not count.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { SpectralAccumulator } from "../dsp/spectral_core.ts";
import { asStream, type RecordingSource } from "../io/recording_stream.ts";
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

/** What a calibration needs to know besides the tone. */
export interface CalibrationOptions {
  /** Calibrator level, dB re 20 µPa. Default 94. */
  levelDb?: number;
  /** Calibrator frequency, Hz. Default 1000. */
  frequencyHz?: number;
  /** Volts per unit of the channel as read (1 for V). Default 1. */
  voltsPerUnit?: number;
}

/**
 * The sensitivity of the microphone on channel `channel` of `source` (the
 * calibrator tone, in volts times `voltsPerUnit`), read in chunks through
 * the flat-top window: memory for one chunk and one block.
 *
 * @throws {QuiverError} when no tone stands out near the frequency or the record is too short.
 *
 * @example
 * ```ts
 * import { calibrateMicrophone } from "./calibration.ts";
 * const p = 20e-6 * 10 ** (94 / 20), s = 0.05; // 50 mV/Pa
 * const data = new Float64Array(48000).map((_, i) => s * p * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / 48000));
 * const rec = { rate: 48000, startTime: 0, channels: [{ name: "mic", unit: "V", data }] };
 * const c = await calibrateMicrophone(rec, 0);
 * if (Math.abs(c.sensitivityMvPerPa / 50 - 1) > 1e-3) throw new Error();
 * ```
 */
export async function calibrateMicrophone(
  source: RecordingSource,
  channel: number,
  options: CalibrationOptions = {},
): Promise<Calibration> {
  const stream = asStream(source);
  const rate = stream.rate;
  const levelDb = options.levelDb ?? 94;
  const frequencyHz = options.frequencyHz ?? 1000;
  const scale = options.voltsPerUnit ?? 1;
  if (!(frequencyHz > 0 && frequencyHz < rate / 2)) {
    throw new RangeError(
      `the calibrator frequency must lie below ${rate / 2} Hz, got ${frequencyHz}`,
    );
  }
  const block = Math.min(2 ** Math.floor(Math.log2(stream.length)), 2 ** 16);
  if (block < 1024) {
    throw new QuiverError(
      `a calibration needs at least 1024 samples; the record has ${stream.length}`,
    );
  }
  const accumulator = new SpectralAccumulator(1, { rate, block, window: "flattop" });
  await stream.read([channel], ([chunk]) => {
    if (scale !== 1) { for (let i = 0; i < chunk.length; i++) chunk[i] *= scale; }
    accumulator.push([chunk]);
  });
  const estimate = accumulator.finish();
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
