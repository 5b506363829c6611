/**
 * The estimates and flags of each candidate peak of one FRF: half-power
 * bandwidth, an SDOF fit, the window correction, and the coherence judgement
 * (see damping_flags.ts for the flags).
 *
 * Peak policy (the same with and without a frequency range): every local
 * maximum of |H| with enough prominence is a candidate, picked and analysed
 * over the whole table; a range only chooses which candidates are reported.
 * Coherence judges a candidate, it never deletes one: each is listed with
 * its flags. A candidate whose coherence is low over its neighbourhood
 * (`noise`) gets no mode number and is never the mode a target is judged on;
 * a coherence dip confined to a lightly damped peak is the resolution bias of
 * coarse lines (`resolution_bias`), and the peak stays a mode.
 *
 * @module
 */
import { formatNumber } from "../format_number.ts";
import { formPower, type FrfForm } from "../frf/forms.ts";
import type { FrfChannel } from "./frf_input.ts";
import { halfPower, type HalfPowerEstimate } from "./half_power.ts";
import { findPeaks, judgeCoherence, type Peak } from "./peaks.ts";
import { fitSdof, type SdofFit } from "./sdof_fit.ts";
import {
  type DampingFlag,
  type DampingMethod,
  DISAGREEMENT,
  FEW_LINES,
  implausible,
  LEAST_DAMPING,
  LOW_COHERENCE,
  POOR_FIT,
  RESOLUTION_BIAS_LINES,
  USABLE_COHERENCE,
} from "./damping_flags.ts";

/** The estimates of one candidate peak. */
export interface ModeEstimate {
  /** FRF channel. */
  readonly channel: string;
  /**
   * 1-based mode number within the channel, by frequency, counting only the
   * candidates reported that are not flagged `noise`; null for those.
   */
  readonly mode: number | null;
  /** Primary natural frequency, Hz. */
  readonly frequencyHz: number;
  /** Primary damping ratio ζ (after any window correction); NaN when there is no plausible estimate. */
  readonly dampingRatio: number;
  /** Q = 1/(2ζ); NaN with ζ. */
  readonly qFactor: number;
  /** Which method gave the primary values. */
  readonly method: "half-power" | "sdof-fit";
  /** Quality flags. */
  readonly flags: readonly DampingFlag[];
  /** Why an estimate was dropped (`implausible_damping`), in words. */
  readonly notes: readonly string[];
  /** Half-power estimate (window-corrected), when made and plausible. */
  readonly halfPower?: { frequencyHz: number; dampingRatio: number; linesInBand: number };
  /** Fit estimate (window-corrected), when made and plausible. */
  readonly fit?: { frequencyHz: number; dampingRatio: number; relativeMisfit: number };
  /** Coherence at the peak line, when known. */
  readonly peakCoherence?: number;
  /** Mean coherence over the peak's own lines and the lines either side, when known. */
  readonly coherenceAround?: { own: number; below: number | null; above: number | null };
  /** Damping subtracted for the exponential window, 1/(τ·ωₙ). */
  readonly windowCorrection: number;
}

/** A candidate's estimates before it is numbered. */
export type Candidate = Omit<ModeEstimate, "mode">;

/**
 * The estimates and flags of each given peak of one FRF, analysed over the
 * whole table (a range only chooses later which are reported). `options` are
 * those of `modalDamping`: the method (default `"both"`) and the form assumed
 * when the channel does not say (default receptance, flagged `form_assumed`).
 *
 * @example
 * ```ts
 * import { analyseChannel } from "./damping_estimates.ts";
 * import { findPeaks } from "./peaks.ts";
 * const f = new Float64Array(800).map((_, k) => k * 0.25);
 * const w = (v: number) => 2 * Math.PI * v, wn = w(62.3), z = 0.02;
 * const h = Array.from(f, (v) => { const dr = wn * wn - w(v) ** 2, di = 2 * z * wn * w(v), d = dr * dr + di * di; return [dr / d, -di / d]; });
 * const re = new Float64Array(h.map((x) => x[0])), im = new Float64Array(h.map((x) => x[1]));
 * const channel = { name: "frf", unit: "m/N", re, im, magnitude: re.map((r, k) => Math.hypot(r, im[k])) };
 * const [c] = analyseChannel({ frequencies: f, channel, options: {}, tau: undefined, peaks: findPeaks(f, channel.magnitude) });
 * if (Math.abs(c.dampingRatio / z - 1) > 0.01 || !c.flags.includes("form_assumed")) throw new Error();
 * ```
 */
export function analyseChannel(
  { frequencies, channel, options, tau, peaks }: {
    frequencies: Float64Array;
    channel: FrfChannel;
    options: { readonly method?: DampingMethod; readonly form?: FrfForm };
    tau: number | undefined;
    peaks: readonly Peak[];
  },
): Candidate[] {
  const method = options.method ?? "both";
  const form = channel.form ?? options.form;
  const power = formPower(form ?? "receptance");
  const n = frequencies.length;
  // Half-power estimates first: the neighbours' bandwidths decide close_modes.
  const limits = peaks.map((p, i) => ({
    low: i === 0 ? 0 : Math.ceil((peaks[i - 1].index + p.index) / 2),
    high: i === peaks.length - 1 ? n - 1 : Math.floor((p.index + peaks[i + 1].index) / 2),
  }));
  // Half-power points that are not finite or not in order (f₁ < f₂), or a peak frequency
  // not above 0, are no estimate at all (no_half_power); a band that gives an implausible
  // damping is judged below, with a note.
  const usable = (e: HalfPowerEstimate | undefined) =>
    e !== undefined && e.frequencyHz > 0 && Number.isFinite(e.lowerHz) &&
      Number.isFinite(e.upperHz) && e.upperHz > e.lowerHz
      ? e
      : undefined;
  const halfPowers: (HalfPowerEstimate | undefined)[] = peaks.map((p, i) =>
    usable(
      halfPower(frequencies, channel.magnitude, p.index, {
        lowLimit: limits[i].low,
        highLimit: limits[i].high,
        power,
      }),
    )
  );
  return peaks.map((peak: Peak, i): Candidate => {
    const flags: DampingFlag[] = [];
    const notes: string[] = [];
    const hp = halfPowers[i];
    const df =
      (frequencies[Math.min(peak.index + 1, n - 1)] - frequencies[Math.max(peak.index - 1, 0)]) / 2;
    if (hp === undefined) flags.push("no_half_power");
    else if (hp.linesInBand < FEW_LINES) flags.push("few_lines");
    const bandwidth = hp !== undefined ? hp.upperHz - hp.lowerHz : 4 * df;
    const peakHz = hp?.frequencyHz ?? frequencies[peak.index];
    for (const j of [i - 1, i + 1]) {
      if (j < 0 || j >= peaks.length) continue;
      const other = halfPowers[j];
      const otherBandwidth = other !== undefined ? other.upperHz - other.lowerHz : 4 * df;
      const otherHz = other?.frequencyHz ?? frequencies[peaks[j].index];
      if (Math.abs(otherHz - peakHz) < 2 * Math.max(bandwidth, otherBandwidth)) {
        if (!flags.includes("close_modes")) flags.push("close_modes");
      }
    }
    if (channel.form === undefined && options.form === undefined) flags.push("form_assumed");
    const peakCoherence = channel.coherence?.[peak.index];
    if (peakCoherence !== undefined && peakCoherence < LOW_COHERENCE) flags.push("low_coherence");
    let coherenceAround: ModeEstimate["coherenceAround"];
    if (channel.coherence !== undefined && peakCoherence !== undefined) {
      // The peak's own lines: its half-power band (lines at or inside f1…f2), at least the
      // window's main lobe either side (judgeCoherence's default).
      let bandLow = peak.index, bandHigh = peak.index;
      if (hp !== undefined) {
        while (bandLow > 0 && frequencies[bandLow - 1] >= hp.lowerHz) bandLow--;
        while (bandHigh < n - 1 && frequencies[bandHigh + 1] <= hp.upperHz) bandHigh++;
      }
      const judged = judgeCoherence(channel.coherence, peak.index, {
        bandLow,
        bandHigh,
        gate: USABLE_COHERENCE,
      });
      coherenceAround = { own: judged.own, below: judged.below, above: judged.above };
      const sidesGood = judged.below !== null && judged.above !== null &&
        judged.below >= USABLE_COHERENCE && judged.above >= USABLE_COHERENCE;
      const dips = peakCoherence < LOW_COHERENCE || judged.own < USABLE_COHERENCE;
      // Lines in the half-power band: the interpolated band's, or without one, the lines
      // within 3 dB of the peak line (a band narrower than a line has no interpolated points).
      let narrowLow = peak.index, narrowHigh = peak.index;
      const half = channel.magnitude[peak.index] / Math.SQRT2;
      while (narrowLow > limits[i].low && channel.magnitude[narrowLow - 1] >= half) narrowLow--;
      while (narrowHigh < limits[i].high && channel.magnitude[narrowHigh + 1] >= half) {
        narrowHigh++;
      }
      const linesInBand = hp?.linesInBand ?? narrowHigh - narrowLow + 1;
      if (judged.verdict === "noise") flags.push("noise");
      else if (sidesGood && dips && linesInBand < RESOLUTION_BIAS_LINES) {
        flags.push("resolution_bias");
      }
    }

    let fit: SdofFit | undefined;
    if (method !== "half-power") {
      // Fit band: 1.5 half-power bandwidths either side, at least 3 lines, not past the neighbours.
      let lo = peak.index;
      while (
        lo > limits[i].low && (frequencies[lo] > peakHz - 1.5 * bandwidth || peak.index - lo < 3)
      ) lo--;
      let hi = peak.index;
      while (
        hi < limits[i].high && (frequencies[hi] < peakHz + 1.5 * bandwidth || hi - peak.index < 3)
      ) hi++;
      const start = Math.min(Math.max(hp?.dampingRatio ?? bandwidth / (2 * peakHz), 1e-5), 0.5);
      if (hi - lo + 1 >= 4 && peakHz > 0 && Number.isFinite(start)) {
        const slice = (a: Float64Array | undefined) => a?.slice(lo, hi + 1);
        const candidate = fitSdof(
          {
            frequencies: frequencies.slice(lo, hi + 1),
            re: slice(channel.re),
            im: slice(channel.im),
            magnitude: channel.magnitude.slice(lo, hi + 1),
            power,
          },
          peakHz,
          start,
        );
        // A fit that wandered to a pole of no positive frequency is no estimate.
        if (candidate.frequencyHz > 0 && Number.isFinite(candidate.frequencyHz)) {
          fit = candidate;
          if (!fit.complex) flags.push("magnitude_only");
          if (fit.relativeMisfit > POOR_FIT) flags.push("poor_fit");
        } else {
          flags.push("no_fit");
        }
      } else {
        flags.push("no_fit");
      }
    }
    const primaryHz = fit?.frequencyHz ?? peakHz;
    const windowCorrection = tau === undefined ? 0 : 1 / (tau * 2 * Math.PI * primaryHz);
    // An estimate of ζ no damped resonance has (above 1, not finite, not above 0 once the
    // window's share is removed) is dropped and said so: never written as a number.
    const judge = (what: string, zeta: number): boolean => {
      const corrected = zeta - windowCorrection;
      if (!implausible(zeta) && !implausible(corrected)) return true;
      if (!flags.includes("implausible_damping")) flags.push("implausible_damping");
      notes.push(
        `${what} gave ζ = ${formatNumber(zeta, 3)}${
          windowCorrection > 0 ? ` (${formatNumber(corrected, 3)} after the window correction)` : ""
        }: not between ${LEAST_DAMPING.toExponential()} and 1, dropped`,
      );
      return false;
    };
    const hpCorrected = hp === undefined || method === "sdof-fit" ||
        !judge("half-power", hp.dampingRatio)
      ? undefined
      : {
        frequencyHz: hp.frequencyHz,
        dampingRatio: hp.dampingRatio - windowCorrection,
        linesInBand: hp.linesInBand,
      };
    const fitCorrected = fit === undefined || !judge("sdof-fit", fit.dampingRatio) ? undefined : {
      frequencyHz: fit.frequencyHz,
      dampingRatio: fit.dampingRatio - windowCorrection,
      relativeMisfit: fit.relativeMisfit,
    };
    if (hpCorrected !== undefined && fitCorrected !== undefined) {
      if (Math.abs(hpCorrected.dampingRatio / fitCorrected.dampingRatio - 1) > DISAGREEMENT) {
        flags.push("disagree");
      }
    }
    const primary = fitCorrected ?? hpCorrected;
    const measured = primary === undefined
      ? NaN
      : primary === fitCorrected
      ? fit!.dampingRatio
      : hp!.dampingRatio;
    if (windowCorrection > 0.5 * measured) flags.push("window_dominates");
    // No estimate: the candidate is still reported, at its peak line, with empty damping cells.
    const damping = primary?.dampingRatio ?? NaN;
    return {
      channel: channel.name,
      frequencyHz: primary?.frequencyHz ?? peakHz,
      dampingRatio: damping,
      qFactor: 1 / (2 * damping),
      method: fitCorrected !== undefined ? "sdof-fit" : "half-power",
      flags,
      notes,
      ...(hpCorrected !== undefined ? { halfPower: hpCorrected } : {}),
      ...(fitCorrected !== undefined ? { fit: fitCorrected } : {}),
      ...(peakCoherence !== undefined ? { peakCoherence } : {}),
      ...(coherenceAround !== undefined ? { coherenceAround } : {}),
      windowCorrection,
    };
  });
}

/**
 * Peaks picked once on the sum of |H| over the FRFs (prominence threshold in
 * dB, default 6): for each FRF, its own maximum within 2 lines of every
 * summed peak.
 *
 * @example
 * ```ts
 * import { peaksOnSum } from "./damping_estimates.ts";
 * const f = new Float64Array(100).map((_, k) => k);
 * const bump = (at: number) => new Float64Array(100).map((_, k) => 1 + 10 / (1 + (k - at) ** 2));
 * const a = { name: "a", unit: "", magnitude: bump(40) }, b = { name: "b", unit: "", magnitude: bump(41) };
 * const pick = peaksOnSum(f, [a, b], {});
 * if (pick(a)[0].index !== 40 || pick(b)[0].index !== 41) throw new Error();
 * ```
 */
export function peaksOnSum(
  frequencies: Float64Array,
  channels: readonly FrfChannel[],
  options: { readonly prominenceDb?: number },
): (channel: FrfChannel) => Peak[] {
  const sum = new Float64Array(frequencies.length);
  for (const c of channels) for (let k = 0; k < sum.length; k++) sum[k] += c.magnitude[k];
  const summed = findPeaks(frequencies, sum, { prominenceDb: options.prominenceDb });
  return (channel: FrfChannel): Peak[] =>
    summed.map((p) => {
      let best = p.index;
      for (let k = Math.max(1, p.index - 2); k <= Math.min(sum.length - 2, p.index + 2); k++) {
        if (channel.magnitude[k] > channel.magnitude[best]) best = k;
      }
      return { index: best, prominenceDb: p.prominenceDb };
    }).filter((p, i, all) => i === 0 || p.index !== all[i - 1].index);
}
