/**
 * Sound and vibration levels: IEC 61672-1 weightings, IEC 61260-1 bands,
 * Fast/Slow levels, ISO 1683 references and microphone calibration. For
 * engineering comparison; quiver is not a certified instrument.
 *
 * @example
 * ```ts
 * import { levelReference, weightingDb } from "./mod.ts";
 * // IEC 61672-1:2013 Table 3: A-weighting at 100 Hz is −19.1 dB.
 * if (Math.abs(weightingDb("A", 1000 * 10 ** -1) + 19.1) > 0.05 || levelReference("Pa") !== 20e-6) throw new Error();
 * ```
 *
 * @module
 */
export { type Weighting, weightingDb, weightingFilter, WEIGHTINGS } from "./weighting.ts";
export { type Band, BAND_FRACTIONS, type BandFraction, bandsInRange } from "./bands.ts";
export {
  BAND_METHODS,
  type BandLevelOptions,
  type BandLevelResult,
  bandLevels,
} from "./band_analysis.ts";
export { levelHistory, type LevelOptions, type LevelResult } from "./level_analysis.ts";
export { levelDb, levelReference } from "./levels.ts";
export { TIME_WEIGHTINGS, type TimeWeighting } from "./time_weighting.ts";
export { calibrateMicrophone, type Calibration } from "./calibration.ts";
