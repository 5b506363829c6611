/**
 * Mode frequencies and damping from FRFs: the analysis behind the `damping`
 * command. For each prominent peak it gives a half-power estimate and an
 * SDOF-fit estimate, removes the damping an exponential window added, and
 * flags what the measurement cannot support.
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
 * Flags (a candidate is reported even when flagged):
 * - `noise`: the mean coherence over the peak's own lines (its half-power
 *   band, at least 2 lines either side) and over 3 lines on at least one side
 *   beyond them is below 0.8 (common practice): nothing around the peak
 *   supports it. Listed, not numbered, never used for a target.
 * - `resolution_bias`: the coherence dips at the peak (below 0.9 at the peak
 *   line, or below 0.8 over its own lines) while 3 lines on each side reach
 *   0.8, and the half-power band holds fewer than 3 lines: the dip is the
 *   leakage (resolution) bias of a lightly damped peak (Harris' Shock and
 *   Vibration Handbook, ch. 21), not noise. Refine the resolution (a longer
 *   block) to measure this mode.
 * - `few_lines`: fewer than 8 lines inside the half-power band; the
 *   resolution bias of the half-power estimate is then large (common practice).
 * - `no_half_power`: a −3 dB point is not reached before the next peak or the
 *   table's edge.
 * - `low_coherence`: coherence at the peak line below 0.9.
 * - `close_modes`: another peak within two half-power bandwidths, too close
 *   to separate with single-mode methods.
 * - `disagree`: half-power and fit damping differ by more than 20 %.
 * - `poor_fit`: the fit's RMS misfit exceeds 10 % of the data.
 * - `no_fit`: the SDOF fit could not be made (too few lines around the peak,
 *   or it did not converge to a pole with positive frequency and damping).
 *   With no estimate at all the mode is still reported, at its peak line,
 *   with empty damping cells: one poor peak never fails the analysis.
 * - `implausible_damping`: an estimate of ζ above 1, not finite, or below
 *   1e-6 (a fit collapsed onto an undamped pole), before or after the window
 *   correction: no damped resonance has it. That estimate is dropped (its
 *   cells left empty), and the candidate's `notes` say which and why.
 * - `magnitude_only`: no phase in the table; the fit used |H| alone.
 * - `form_assumed`: the FRF form is unknown and receptance was assumed.
 * - `window_dominates`: the exponential window's added damping is more than
 *   half the measured damping, so the corrected value is unreliable.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import type { Table } from "../io/table.ts";
import type { DampingMetadata } from "./damping_metadata.ts";
import { formPower, type FrfForm } from "../frf/forms.ts";
import type { FrfChannel, FrfData } from "./frf_input.ts";
import { halfPower, type HalfPowerEstimate } from "./half_power.ts";
import { findPeaks, judgeCoherence, type Peak } from "./peaks.ts";
import { fitSdof, type SdofFit } from "./sdof_fit.ts";
import { didYouMean } from "../nearest_name.ts";

/**
 * Which estimates to make.
 *
 * @example
 * ```ts
 * import { DAMPING_METHODS } from "./damping_analysis.ts";
 * if (!DAMPING_METHODS.includes("both")) throw new Error();
 * ```
 */
export const DAMPING_METHODS = ["half-power", "sdof-fit", "both"] as const;

/** One of {@linkcode DAMPING_METHODS}. */
export type DampingMethod = typeof DAMPING_METHODS[number];

/**
 * Every flag a candidate can carry (their meanings are in this module's
 * header and README's `quiver damping` section).
 *
 * @example
 * ```ts
 * import { DAMPING_FLAGS } from "./damping_analysis.ts";
 * if (!DAMPING_FLAGS.includes("noise") || !DAMPING_FLAGS.includes("resolution_bias")) throw new Error();
 * ```
 */
export const DAMPING_FLAGS = [
  "noise",
  "resolution_bias",
  "low_coherence",
  "few_lines",
  "no_half_power",
  "close_modes",
  "disagree",
  "poor_fit",
  "no_fit",
  "implausible_damping",
  "magnitude_only",
  "form_assumed",
  "window_dominates",
] as const;

/** One of {@linkcode DAMPING_FLAGS}. */
export type DampingFlag = typeof DAMPING_FLAGS[number];

/** Options of {@linkcode modalDamping}. */
export interface DampingOptions {
  /** FRF channels to analyse. Default: all. */
  channels?: readonly string[];
  /** Lowest frequency of the candidates reported, Hz. Default: the first line. */
  minHz?: number;
  /** Highest frequency of the candidates reported, Hz. Default: the last line. */
  maxHz?: number;
  /** Estimates to make; with `both` the fit is the primary value. Default `"both"`. */
  method?: DampingMethod;
  /** Peak prominence threshold, dB. Default 6. */
  prominenceDb?: number;
  /**
   * Where peaks are picked: on each FRF's own |H| (`each`), or once on the sum
   * of |H| over the chosen FRFs (`sum`), each FRF then taking its own maximum
   * within 2 lines of every summed peak. Default `"each"`.
   */
  peaks?: "each" | "sum";
  /** Exponential window time constant, s; overrides the table's metadata. Default: from metadata. */
  expTau?: number;
  /** FRF form when the table does not say. Default: receptance, flagged `form_assumed`. */
  form?: FrfForm;
  /** Minimum first-mode frequency target, Hz. Default: none. */
  targetHz?: number;
}

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

/** A candidate a first-mode target passed over. */
export interface SkippedCandidate {
  /** Its channel. */
  readonly channel: string;
  /** Its frequency, Hz. */
  readonly frequencyHz: number;
  /** Its flags. */
  readonly flags: readonly string[];
}

/** The result of a first-mode frequency target check. */
export interface FrequencyTarget {
  /** Minimum frequency asked for, Hz. */
  readonly minimumHz: number;
  /** The lowest mode found, Hz, or null when none. */
  readonly firstModeHz: number | null;
  /** Its channel. */
  readonly channel: string | null;
  /** Its mode number in that channel. */
  readonly mode: number | null;
  /** Candidates below it that are not modes (flagged `noise`), passed over. */
  readonly skipped: readonly SkippedCandidate[];
  /** Whether the first mode meets the minimum. */
  readonly pass: boolean;
  /** First mode − minimum, Hz. */
  readonly marginHz: number | null;
  /** The margin as a percentage of the minimum. */
  readonly marginPercent: number | null;
  /** Which mode was judged and what was passed over, in words. */
  readonly basis: string;
}

/** Modes, their table and the warnings. */
export interface DampingResult {
  /** Every candidate of every channel (those flagged `noise` with mode null). */
  readonly modes: readonly ModeEstimate[];
  /** The mode table (text columns for optional values, see the command's help). */
  readonly table: Table<DampingMetadata, Float64Array | readonly string[]>;
  /** The target check, when a target was given. */
  readonly target?: FrequencyTarget;
  /** Warnings. */
  readonly warnings: readonly string[];
}

const FEW_LINES = 8;
/** Below this many lines in the half-power band a confined coherence dip is resolution bias. */
const RESOLUTION_BIAS_LINES = 3;
const LOW_COHERENCE = 0.9;
const DISAGREEMENT = 0.2;
const POOR_FIT = 0.1;
const MANY_PEAKS = 20;
/** Coherence below which the lines around a peak do not support it (common practice). */
const USABLE_COHERENCE = 0.8;

/**
 * What a target may be judged on, and the one rule for a first mode: the
 * lowest candidate (of `channel`, when given) that is a mode, i.e. not
 * flagged `noise` and numbered; with the candidates below it that were
 * passed over. Damping's own target and a plan's targets both use it.
 *
 * @example
 * ```ts
 * import { firstMode } from "./damping_analysis.ts";
 * const modes = [
 *   { channel: "a", mode: null, frequencyHz: 0.9, flags: ["noise", "low_coherence"] },
 *   { channel: "a", mode: 1, frequencyHz: 35.2, flags: [] },
 * ];
 * const { used, skipped } = firstMode(modes);
 * if (used?.frequencyHz !== 35.2 || skipped.length !== 1) throw new Error();
 * ```
 */
export function firstMode<
  M extends {
    readonly channel: string;
    readonly mode: number | null;
    readonly frequencyHz: number | null;
    readonly flags: readonly string[];
  },
>(modes: readonly M[], channel?: string): { used: M | undefined; skipped: M[] } {
  const mine = modes.filter((m) => channel === undefined || m.channel === channel)
    // A candidate whose frequency is missing sorts last.
    .sort((a, b) => (a.frequencyHz ?? Infinity) - (b.frequencyHz ?? Infinity));
  const used = mine.find(isMode);
  const skipped = mine.filter((m) =>
    !isMode(m) && (used === undefined || (m.frequencyHz ?? Infinity) < (used.frequencyHz ?? 0))
  );
  return { used, skipped };
}

/**
 * Whether a candidate is a mode a target may be judged on: numbered and not
 * flagged `noise`.
 *
 * @example
 * ```ts
 * import { isMode } from "./damping_analysis.ts";
 * if (isMode({ mode: null, flags: ["noise"] }) || !isMode({ mode: 2, flags: ["resolution_bias"] })) throw new Error();
 * ```
 */
export function isMode(m: { readonly mode: number | null; readonly flags: readonly string[] }) {
  return m.mode !== null && !m.flags.includes("noise");
}

/**
 * The candidates passed over, in words: "skipped 3 candidates below it flagged
 * noise (a 0.9, 2.8, 4 Hz)", or "" for none.
 *
 * @example
 * ```ts
 * import { describeSkipped } from "./damping_analysis.ts";
 * const text = describeSkipped([{ channel: "a", frequencyHz: 0.9, flags: ["noise"] }]);
 * if (!text.includes("0.9 Hz") || !text.includes("noise")) throw new Error();
 * ```
 */
export function describeSkipped(
  skipped: readonly {
    readonly channel: string;
    readonly frequencyHz: number | null;
    readonly flags: readonly string[];
  }[],
): string {
  if (skipped.length === 0) return "";
  const list = skipped.map((m) =>
    `${m.channel} ${m.frequencyHz === null ? "?" : formatNumber(m.frequencyHz, 4)} Hz`
  ).join(", ");
  return `skipped ${skipped.length} candidate(s) below it flagged noise ` +
    `(coherence below ${USABLE_COHERENCE} around them): ${list}`;
}

/** Each FRF's own maximum within 2 lines of every peak of the summed |H|. */
function peaksOnSum(
  frequencies: Float64Array,
  channels: readonly FrfChannel[],
  options: DampingOptions,
) {
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

/**
 * Below this a damping estimate is a fit that collapsed onto an undamped pole, not a
 * measurement: no structure of vehicle NVH is damped this lightly (common practice), and
 * the Q it implies (above 500 000) is not measurable with a finite record.
 */
const LEAST_DAMPING = 1e-6;

/** A damping estimate no damped resonance can have: above 1, not finite, or below 1e-6. */
const implausible = (zeta: number) => !(zeta >= LEAST_DAMPING && zeta <= 1);

type Candidate = Omit<ModeEstimate, "mode">;

function analyseChannel(
  { frequencies, channel, options, tau, peaks }: {
    frequencies: Float64Array;
    channel: FrfChannel;
    options: DampingOptions;
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

const text = (v: number | null | undefined) =>
  v === undefined || v === null || !Number.isFinite(v) ? "" : String(v);

/**
 * Finds the modes of every chosen FRF and estimates their damping.
 *
 * @throws {QuiverError} for an unknown channel; RangeError for bad options.
 *
 * @example
 * ```ts
 * import { modalDamping } from "./damping_analysis.ts";
 * const f = new Float64Array(800).map((_, k) => k * 0.25);
 * const w = (v: number) => 2 * Math.PI * v, wn = w(62.3), z = 0.02;
 * const h = Array.from(f, (v) => { const dr = wn * wn - w(v) ** 2, di = 2 * z * wn * w(v), d = dr * dr + di * di; return [dr / d, -di / d]; });
 * const re = new Float64Array(h.map((x) => x[0])), im = new Float64Array(h.map((x) => x[1]));
 * const { modes } = modalDamping({ frequencies: f, channels: [{ name: "frf", unit: "m/N", form: "receptance",
 *   re, im, magnitude: re.map((r, k) => Math.hypot(r, im[k])) }] });
 * if (modes.length !== 1 || Math.abs(modes[0].dampingRatio / z - 1) > 0.01) throw new Error();
 * ```
 */
export function modalDamping(data: FrfData, options: DampingOptions = {}): DampingResult {
  if (
    options.minHz !== undefined && options.maxHz !== undefined && options.minHz >= options.maxHz
  ) {
    throw new RangeError(`the range ${options.minHz}–${options.maxHz} Hz is empty`);
  }
  const names = data.channels.map((c) => c.name);
  const chosen = options.channels === undefined ? data.channels : options.channels.map((name) => {
    const c = data.channels.find((ch) => ch.name === name);
    if (c === undefined) {
      throw new QuiverError(
        `no FRF named "${name}"${didYouMean(name, names)}; the table has ${names.join(", ")}`,
        {},
        "usage",
      );
    }
    return c;
  });
  const tau = options.expTau ?? data.expTau;
  // Candidates are picked and analysed over the whole table, so that a candidate's
  // estimates and flags do not depend on the range; the range only chooses which are
  // reported.
  const pick = options.peaks === "sum"
    ? peaksOnSum(data.frequencies, chosen, options)
    : (c: FrfChannel) =>
      findPeaks(data.frequencies, c.magnitude, { prominenceDb: options.prominenceDb });
  const minHz = options.minHz ?? -Infinity;
  const maxHz = options.maxHz ?? Infinity;
  const warnings: string[] = [];
  const modes: ModeEstimate[] = [];
  for (const c of chosen) {
    const peaks = pick(c);
    const analysed = analyseChannel({
      frequencies: data.frequencies,
      channel: c,
      options,
      tau,
      peaks,
    }).filter((_, i) => {
      const f = data.frequencies[peaks[i].index];
      return f >= minHz && f <= maxHz;
    });
    let number = 0;
    const numbered = analysed.map((m): ModeEstimate => ({
      ...m,
      mode: m.flags.includes("noise") ? null : ++number,
    }));
    modes.push(...numbered);
    const noise = numbered.filter((m) => m.mode === null);
    if (numbered.length === 0) warnings.push(`no peak found in "${c.name}" in the range`);
    if (noise.length > 0) {
      warnings.push(
        `${noise.length} candidate peak(s) of "${c.name}" flagged noise (coherence below ${USABLE_COHERENCE} around them): listed without a mode number, never used for a target`,
      );
    }
    if (number > MANY_PEAKS) {
      warnings.push(
        `${number} modes in "${c.name}": many are probably noise; narrow the range (min/max Hz) or raise the prominence`,
      );
    }
  }
  if (modes.some((m) => m.flags.includes("few_lines"))) {
    warnings.push(
      `fewer than ${FEW_LINES} lines in the half-power band of some modes: the half-power damping has a large resolution bias; measure with a finer resolution`,
    );
  }
  const biased = modes.filter((m) => m.flags.includes("resolution_bias"));
  if (biased.length > 0) {
    warnings.push(
      `the coherence dips at ${biased.length} lightly damped peak(s) with fewer than ${RESOLUTION_BIAS_LINES} lines in the half-power band (${
        biased.map((m) => `${m.channel} ${formatNumber(m.frequencyHz, 4)} Hz`).join(", ")
      }): resolution bias, not noise; they are kept as modes; refine the resolution (a longer block) to measure them`,
    );
  }
  const implausibles = modes.filter((m) => m.flags.includes("implausible_damping"));
  if (implausibles.length > 0) {
    warnings.push(
      `${implausibles.length} damping estimate(s) outside ${LEAST_DAMPING.toExponential()} ≤ ζ ≤ 1 dropped (flag implausible_damping; see the notes)`,
    );
  }
  let target: FrequencyTarget | undefined;
  if (options.targetHz !== undefined) {
    const { used, skipped } = firstMode(modes);
    const limit = options.targetHz;
    const skippedText = describeSkipped(skipped);
    target = {
      minimumHz: limit,
      firstModeHz: used?.frequencyHz ?? null,
      channel: used?.channel ?? null,
      mode: used?.mode ?? null,
      skipped: skipped.map((m) => ({
        channel: m.channel,
        frequencyHz: m.frequencyHz,
        flags: m.flags,
      })),
      pass: used !== undefined && used.frequencyHz >= limit,
      marginHz: used === undefined ? null : used.frequencyHz - limit,
      marginPercent: used === undefined ? null : (100 * (used.frequencyHz - limit)) / limit,
      basis: (used === undefined
        ? "no mode found"
        : `mode ${used.mode} of ${used.channel} at ${formatNumber(used.frequencyHz, 5)} Hz`) +
        (skippedText === "" ? "" : `; ${skippedText}`),
    };
  }
  const column = (name: string, values: Float64Array | readonly string[]) => ({
    name,
    unit: "",
    values,
  });
  const table: Table<DampingMetadata, Float64Array | readonly string[]> = {
    columns: [
      column("channel", modes.map((m) => m.channel)),
      column("mode", modes.map((m) => text(m.mode))),
      column("frequency_hz", new Float64Array(modes.map((m) => m.frequencyHz))),
      column("damping_ratio", modes.map((m) => text(m.dampingRatio))),
      column("q_factor", modes.map((m) => text(m.qFactor))),
      column("method", modes.map((m) => m.method)),
      column("flags", modes.map((m) => m.flags.join(";"))),
      column("half_power_frequency_hz", modes.map((m) => text(m.halfPower?.frequencyHz))),
      column("half_power_damping_ratio", modes.map((m) => text(m.halfPower?.dampingRatio))),
      column("lines_in_half_power_band", modes.map((m) => text(m.halfPower?.linesInBand))),
      column("fit_frequency_hz", modes.map((m) => text(m.fit?.frequencyHz))),
      column("fit_damping_ratio", modes.map((m) => text(m.fit?.dampingRatio))),
      column("peak_coherence", modes.map((m) => text(m.peakCoherence))),
      column("window_correction", new Float64Array(modes.map((m) => m.windowCorrection))),
    ],
    metadata: {
      analysis: "damping",
      method: options.method ?? "both",
      prominence_db: options.prominenceDb ?? 6,
      peaks_from: options.peaks ?? "each",
      min_hz: options.minHz ?? null,
      max_hz: options.maxHz ?? null,
      peak_policy: {
        candidates: "prominent peaks over the whole table; the range chooses which are reported",
        noise_below_coherence: USABLE_COHERENCE,
        own_lines: "the half-power band, at least 2 lines either side of the peak",
        side_lines: 3,
        resolution_bias_below_lines: RESOLUTION_BIAS_LINES,
        targets_use: "numbered modes only (never a candidate flagged noise)",
      },
      exponential_window_tau_s: tau ?? null,
      modes,
      ...(target !== undefined ? { target } : {}),
      warnings,
    },
  };
  return { modes, table, warnings, ...(target !== undefined ? { target } : {}) };
}
