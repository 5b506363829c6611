/**
 * Microphone sensitivity from a recording of an acoustic calibrator. A
 * calibrator producing 94 dB re 20 µPa (1.0024 Pa rms) at 1 kHz is common
 * practice. The tone's rms is read from the flat-top power spectrum, so
 * noise and hum elsewhere in the spectrum do not count.
 *
 * Only the steady part of the tone counts. The record is cut into frames of
 * {@linkcode FRAME_S} s (at least 20 periods of the tone) and each frame's
 * level taken from its variance (a DC offset is not the tone); a frame more than {@linkcode STEADY_DB} dB from
 * the median frame level is not steady (a dropout, the calibrator put on or
 * taken off, a level switched). Those frames, and one frame either side of
 * each stretch of them (a change that fills only part of a frame moves its
 * level by less than the tolerance), are left out of the spectrum, and a
 * warning names each stretch with its times and level. When more than
 * {@linkcode MAX_UNSTEADY_SHARE} of the frames are not steady, the tone has
 * no one level (a level step halfway, an unsteady coupling) and the
 * calibration is refused. Tolerance and share are common practice: a
 * class 1 calibrator holds its level to about 0.1 dB (IEC 60942, from
 * memory), so 0.3 dB is well outside its own fluctuation.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { SpectralAccumulator } from "../dsp/spectral_core.ts";
import { asStream, type RecordingSource } from "../io/recording_stream.ts";
import { autoSpectrum } from "../dsp/spectrum_kinds.ts";

/** Frame length for judging the tone's steadiness, seconds (at least 20 periods of the tone). */
export const FRAME_S = 0.1;

/**
 * The calibrator levels quiver accepts, dB re 20 µPa: above 0 and at most
 * 200 (common practice: sound calibrators give 94 or 114 dB and
 * pistonphones about 124 dB; 200 dB, 2·10⁵ Pa, is far above any, and a
 * larger number is a slip, e.g. pascals or a lost decimal point).
 */
export const CALIBRATOR_LEVEL_DB = { above: 0, atMost: 200 } as const;

/** How far a frame's level may lie from the median frame level and still be steady, dB. */
export const STEADY_DB = 0.3;

/** The largest share of frames that may be left out before the calibration is refused. */
export const MAX_UNSTEADY_SHARE = 0.25;

/** A stretch of the record left out of a calibration. */
export interface ExcludedStretch {
  /** Start and end, seconds (the record's time). */
  readonly startS: number;
  readonly endS: number;
  /** Its level (variance) against the median frame level, dB (−Infinity: silence). */
  readonly levelDb: number;
}

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
  /** Seconds of steady tone the sensitivity comes from. */
  readonly steadySeconds: number;
  /** The stretches that were not steady (margins not included). */
  readonly excluded: readonly ExcludedStretch[];
  /** Warnings, one naming every excluded stretch (empty when the whole tone was steady). */
  readonly warnings: readonly string[];
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
 * the flat-top window over its steady part (see the module): two passes,
 * memory for one chunk, one block and one level per frame.
 *
 * @throws {QuiverError} when no tone stands out near the frequency, the
 * record or its steady part is too short, or the tone is not steady.
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
  if (!(levelDb > CALIBRATOR_LEVEL_DB.above && levelDb <= CALIBRATOR_LEVEL_DB.atMost)) {
    throw new RangeError(
      `the calibrator level must lie above ${CALIBRATOR_LEVEL_DB.above} dB and at most ${CALIBRATOR_LEVEL_DB.atMost} dB re 20 µPa, got ${levelDb}`,
    );
  }
  if (!(frequencyHz > 0 && frequencyHz < rate / 2)) {
    throw new RangeError(
      `the calibrator frequency must lie below ${rate / 2} Hz, got ${frequencyHz}`,
    );
  }
  // Pass 1: the mean square of each frame (the last takes the samples beyond the last whole
  // frame, so that no short frame is judged on a fraction of a period).
  const n = stream.length;
  const frame = Math.max(1, Math.round(rate * Math.max(FRAME_S, 20 / frequencyHz)));
  const frames = Math.max(1, Math.floor(n / frame));
  const frameLength = (k: number) => (k < frames - 1 ? frame : n - (frames - 1) * frame);
  const frameOf = (i: number) => Math.min(frames - 1, Math.floor(i / frame));
  const sums = new Float64Array(frames);
  const meanSquares = new Float64Array(frames);
  let at = 0;
  await stream.read([channel], ([chunk]) => {
    for (let i = 0; i < chunk.length; i++, at++) {
      const v = chunk[i] * scale;
      const k = frameOf(at);
      sums[k] += v;
      meanSquares[k] += v * v;
    }
  });
  // Each frame's variance: a DC offset, or a slow drift of it, is not the tone.
  for (let k = 0; k < frames; k++) {
    const mean = sums[k] / frameLength(k);
    meanSquares[k] = Math.max(0, meanSquares[k] / frameLength(k) - mean * mean);
  }
  const levels = meanSquares.map((v) => 10 * Math.log10(v));
  const sorted = levels.slice().sort();
  const median = frames % 2 === 1
    ? sorted[frames >> 1]
    : (sorted[(frames >> 1) - 1] + sorted[frames >> 1]) / 2;
  if (!Number.isFinite(median)) {
    throw new QuiverError(
      `no calibrator tone stands out near ${frequencyHz} Hz (the channel is silent)`,
    );
  }
  const steady = Array.from(levels, (l) => Math.abs(l - median) <= STEADY_DB);
  // Used: steady, and so are both neighbours.
  const used = steady.map((ok, k) => ok && steady[k - 1] !== false && steady[k + 1] !== false);
  const excluded: ExcludedStretch[] = [];
  for (let k = 0; k < frames;) {
    if (steady[k]) {
      k++;
      continue;
    }
    let end = k, sum = 0, count = 0;
    for (; end < frames && !steady[end]; end++) {
      sum += meanSquares[end] * frameLength(end);
      count += frameLength(end);
    }
    excluded.push({
      startS: stream.startTime + (k * frame) / rate,
      endS: stream.startTime + (end === frames ? n : end * frame) / rate,
      levelDb: 10 * Math.log10(sum / count) - median,
    });
    k = end;
  }
  const unsteady = steady.filter((ok) => !ok).length;
  const describe = (e: ExcludedStretch) =>
    `${formatNumber(e.startS)}–${formatNumber(e.endS)} s (${
      Number.isFinite(e.levelDb)
        ? `${e.levelDb > 0 ? "+" : ""}${formatNumber(e.levelDb, 3)} dB`
        : "silent"
    })`;
  if (unsteady > MAX_UNSTEADY_SHARE * frames) {
    const signed = (db: number) =>
      Number.isFinite(db) ? `${db > 0 ? "+" : ""}${formatNumber(db, 3)}` : "-inf";
    throw new QuiverError(
      `the calibrator tone is not steady: ${
        formatNumber(100 * unsteady / frames, 2)
      } % of its ${FRAME_S} s frames lie more than ${STEADY_DB} dB from their median level (at most ${
        100 * MAX_UNSTEADY_SHARE
      } % may); frame levels span ${signed(sorted[0] - median)} to ${
        signed(sorted[frames - 1] - median)
      } dB about the median${
        excluded.length <= 6 ? ` (unsteady: ${excluded.map(describe).join(", ")})` : ""
      }; record the calibrator again, or give --start/--end around one steady stretch`,
    );
  }
  // The longest stretch of used frames sets the block.
  let longest = 0;
  for (let k = 0, run = 0; k < frames; k++) {
    run = used[k] ? run + frameLength(k) : 0;
    longest = Math.max(longest, run);
  }
  const block = Math.min(2 ** Math.floor(Math.log2(Math.max(1, longest))), 2 ** 16);
  if (block < 1024) {
    throw new QuiverError(
      excluded.length === 0
        ? `a calibration needs at least 1024 samples; the record has ${n}`
        : `a calibration needs at least 1024 samples of steady tone; the longest steady stretch has ${longest}`,
    );
  }
  // Pass 2: half-overlapping blocks that lie wholly inside used frames.
  const accumulator = new SpectralAccumulator(1, { rate, block, window: "flattop" });
  const hop = block / 2;
  const buffer = new Float64Array(block);
  let fill = 0;
  at = 0;
  await stream.read([channel], ([chunk]) => {
    for (let i = 0; i < chunk.length; i++, at++) {
      if (!used[frameOf(at)]) {
        fill = 0;
        continue;
      }
      buffer[fill++] = chunk[i] * scale;
      if (fill === block) {
        accumulator.pushSegment([buffer]);
        buffer.copyWithin(0, hop);
        fill = block - hop;
      }
    }
  });
  let steadySamples = 0;
  used.forEach((ok, k) => {
    if (ok) steadySamples += frameLength(k);
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
  const steadySeconds = steadySamples / rate;
  const warnings = excluded.length === 0 ? [] : [
    `the calibrator tone was not steady (more than ${STEADY_DB} dB from its median level in ${FRAME_S} s frames) over ${
      excluded.map(describe).join(", ")
    }: left out with one frame either side; the sensitivity comes from the remaining ${
      formatNumber(steadySeconds, 3)
    } s`,
  ];
  return {
    sensitivityMvPerPa: (1000 * toneRmsVolts) / pressureRmsPa,
    toneRmsVolts,
    pressureRmsPa,
    toneHz: f[best],
    steadySeconds,
    excluded,
    warnings,
  };
}
