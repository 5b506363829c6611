/**
 * The signal core: windows, the one spectral core (auto and cross spectra,
 * averaging, scaling) and averaged spectra of recordings.
 *
 * @example
 * ```ts
 * import { autoSpectrum, spectralEstimate } from "./mod.ts";
 * const x = new Float64Array(1024).map((_, i) => Math.SQRT2 * Math.sin(2 * Math.PI * 32 * i / 1024));
 * const e = spectralEstimate([x], { rate: 1024, block: 1024, window: "hann" });
 * if (Math.abs(autoSpectrum(e, 0, "rms")[32] - 1) > 1e-9) throw new Error();
 * ```
 *
 * @module
 */
export {
  AVERAGING_MODES,
  type AveragingMode,
  type CrossSpectrum,
  scaleFactor,
  SpectralAccumulator,
  type SpectralEstimate,
  spectralEstimate,
  type SpectralOptions,
} from "./spectral_core.ts";
export {
  spectralEstimateOf,
  type SpectralSink,
  spectralSink,
  type SpectralSinkOptions,
} from "./spectral_pipeline.ts";
export { autoSpectrum, SPECTRUM_KINDS, type SpectrumKind, spectrumUnit } from "./spectrum_kinds.ts";
export { averagedSpectrum, type AveragedSpectrumOptions } from "./averaged_spectrum.ts";
export { spectrogram, type SpectrogramOptions } from "./spectrogram.ts";
export { WINDOW_NAMES, windowGains, type WindowName, windowSamples } from "./windows.ts";
export { DETREND_MODES, type DetrendMode } from "./detrend.ts";
