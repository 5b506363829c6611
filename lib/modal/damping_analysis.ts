/**
 * Mode frequencies and damping from FRFs: the analysis behind the `damping`
 * command. For each prominent peak it gives a half-power estimate and an
 * SDOF-fit estimate, removes the damping an exponential window added, and
 * flags what the measurement cannot support.
 *
 * Flags (a mode is reported even when flagged):
 * - `few_lines`: fewer than 8 lines inside the half-power band; the
 *   resolution bias of the half-power estimate is then large (common practice).
 * - `no_half_power`: a −3 dB point is not reached before the next peak or the
 *   range's edge.
 * - `low_coherence`: coherence at the peak below 0.9.
 * - `close_modes`: another peak within two half-power bandwidths, too close
 *   to separate with single-mode methods.
 * - `disagree`: half-power and fit damping differ by more than 20 %.
 * - `poor_fit`: the fit's RMS misfit exceeds 10 % of the data.
 * - `no_fit`: the SDOF fit could not be made (too few lines around the peak,
 *   or it did not converge to a pole with positive frequency and damping).
 *   With no estimate at all the mode is still reported, at its peak line,
 *   with empty damping cells: one poor peak never fails the analysis.
 * - `magnitude_only`: no phase in the table; the fit used |H| alone.
 * - `form_assumed`: the FRF form is unknown and receptance was assumed.
 * - `window_dominates`: the exponential window's added damping is more than
 *   half the measured damping, so the corrected value is unreliable.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { Table } from "../io/table.ts";
import { formPower, type FrfForm } from "../frf/forms.ts";
import type { FrfChannel, FrfData } from "./frf_input.ts";
import { halfPower, type HalfPowerEstimate } from "./half_power.ts";
import { findPeaks, type Peak } from "./peaks.ts";
import { fitSdof, type SdofFit } from "./sdof_fit.ts";

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

/** Options of {@linkcode modalDamping}. */
export interface DampingOptions {
  /** FRF channels to analyse. Default: all. */
  channels?: readonly string[];
  /** Lowest frequency, Hz. Default: the first line. */
  minHz?: number;
  /** Highest frequency, Hz. Default: the last line. */
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

/** The estimates of one mode. */
export interface ModeEstimate {
  /** FRF channel. */
  readonly channel: string;
  /** 1-based mode number within the channel, by frequency. */
  readonly mode: number;
  /** Primary natural frequency, Hz. */
  readonly frequencyHz: number;
  /** Primary damping ratio ζ (after any window correction). */
  readonly dampingRatio: number;
  /** Q = 1/(2ζ). */
  readonly qFactor: number;
  /** Which method gave the primary values. */
  readonly method: "half-power" | "sdof-fit";
  /** Quality flags. */
  readonly flags: readonly string[];
  /** Half-power estimate (window-corrected), when made. */
  readonly halfPower?: { frequencyHz: number; dampingRatio: number; linesInBand: number };
  /** Fit estimate (window-corrected), when made. */
  readonly fit?: { frequencyHz: number; dampingRatio: number; relativeMisfit: number };
  /** Coherence at the peak line, when known. */
  readonly peakCoherence?: number;
  /** Damping subtracted for the exponential window, 1/(τ·ωₙ). */
  readonly windowCorrection: number;
}

/** The result of a first-mode frequency target check. */
export interface FrequencyTarget {
  /** Minimum frequency asked for, Hz. */
  readonly minimumHz: number;
  /** The lowest mode found, Hz, or null when none. */
  readonly firstModeHz: number | null;
  /** Its channel. */
  readonly channel: string | null;
  /** Whether the first mode meets the minimum. */
  readonly pass: boolean;
  /** First mode − minimum, Hz. */
  readonly marginHz: number | null;
  /** The margin as a percentage of the minimum. */
  readonly marginPercent: number | null;
}

/** Modes, their table and the warnings. */
export interface DampingResult {
  /** Every mode of every channel. */
  readonly modes: readonly ModeEstimate[];
  /** The mode table (text columns for optional values, see the command's help). */
  readonly table: Table<Float64Array | readonly string[]>;
  /** The target check, when a target was given. */
  readonly target?: FrequencyTarget;
  /** Warnings. */
  readonly warnings: readonly string[];
}

const FEW_LINES = 8;
const LOW_COHERENCE = 0.9;
const DISAGREEMENT = 0.2;
const POOR_FIT = 0.1;
const MANY_PEAKS = 20;
const USABLE_COHERENCE = 0.8;

/** Each FRF's own maximum within 2 lines of every peak of the summed |H|. */
function peaksOnSum(
  frequencies: Float64Array,
  channels: readonly FrfChannel[],
  options: DampingOptions,
) {
  const sum = new Float64Array(frequencies.length);
  for (const c of channels) for (let k = 0; k < sum.length; k++) sum[k] += c.magnitude[k];
  const summed = findPeaks(frequencies, sum, {
    prominenceDb: options.prominenceDb,
    minHz: options.minHz,
    maxHz: options.maxHz,
  });
  return (channel: FrfChannel): Peak[] =>
    summed.map((p) => {
      let best = p.index;
      for (let k = Math.max(1, p.index - 2); k <= Math.min(sum.length - 2, p.index + 2); k++) {
        if (channel.magnitude[k] > channel.magnitude[best]) best = k;
      }
      return { index: best, prominenceDb: p.prominenceDb };
    }).filter((p, i, all) => i === 0 || p.index !== all[i - 1].index);
}

function analyseChannel(
  { frequencies, channel, options, tau, peaks }: {
    frequencies: Float64Array;
    channel: FrfChannel;
    options: DampingOptions;
    tau: number | undefined;
    peaks: readonly Peak[];
  },
): ModeEstimate[] {
  const method = options.method ?? "both";
  const form = channel.form ?? options.form;
  const power = formPower(form ?? "receptance");
  const n = frequencies.length;
  // Half-power estimates first: the neighbours' bandwidths decide close_modes.
  const limits = peaks.map((p, i) => ({
    low: i === 0 ? 0 : Math.ceil((peaks[i - 1].index + p.index) / 2),
    high: i === peaks.length - 1 ? n - 1 : Math.floor((p.index + peaks[i + 1].index) / 2),
  }));
  // An estimate that came out non-finite or non-positive (a poor peak) counts as none.
  const usable = (e: HalfPowerEstimate | undefined) =>
    e !== undefined && e.frequencyHz > 0 && e.dampingRatio > 0 && Number.isFinite(e.dampingRatio)
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
  return peaks.map((peak: Peak, i): ModeEstimate => {
    const flags: string[] = [];
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
      const start = Math.max(hp?.dampingRatio ?? bandwidth / (2 * peakHz), 1e-5);
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
        // A fit that wandered to a non-physical pole is no estimate.
        if (candidate.frequencyHz > 0 && candidate.dampingRatio > 0) {
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
    const hpCorrected = hp === undefined || method === "sdof-fit" ? undefined : {
      frequencyHz: hp.frequencyHz,
      dampingRatio: hp.dampingRatio - windowCorrection,
      linesInBand: hp.linesInBand,
    };
    const fitCorrected = fit === undefined ? undefined : {
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
    const measured = (fit?.dampingRatio ?? hp?.dampingRatio) ?? NaN;
    if (windowCorrection > 0.5 * measured) flags.push("window_dominates");
    // No estimate: the mode is still reported, at its peak line, with empty damping cells.
    const damping = primary?.dampingRatio ?? NaN;
    return {
      channel: channel.name,
      mode: i + 1,
      frequencyHz: primary?.frequencyHz ?? peakHz,
      dampingRatio: damping,
      qFactor: 1 / (2 * damping),
      method: fitCorrected !== undefined ? "sdof-fit" : "half-power",
      flags,
      ...(hpCorrected !== undefined ? { halfPower: hpCorrected } : {}),
      ...(fitCorrected !== undefined ? { fit: fitCorrected } : {}),
      ...(peakCoherence !== undefined ? { peakCoherence } : {}),
      windowCorrection,
    };
  });
}

const text = (v: number | undefined) => (v === undefined || !Number.isFinite(v) ? "" : String(v));

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
        `no FRF named "${name}"; the table has ${names.join(", ")}`,
        {},
        "usage",
      );
    }
    return c;
  });
  const tau = options.expTau ?? data.expTau;
  const pick = options.peaks === "sum"
    ? peaksOnSum(data.frequencies, chosen, options)
    : (c: FrfChannel) =>
      findPeaks(data.frequencies, c.magnitude, {
        prominenceDb: options.prominenceDb,
        minHz: options.minHz,
        maxHz: options.maxHz,
      });
  const warnings: string[] = [];
  // Without a stated range, peaks are looked for only where the FRF is usable: the mean
  // coherence over the peak's line and two lines either side at least USABLE_COHERENCE
  // (common practice). Below it a peak is mostly noise; a hammer FRF's coherence falls
  // where the force spectrum has run out.
  const rangeGiven = options.minHz !== undefined || options.maxHz !== undefined;
  const usablePeaks = (c: FrfChannel): Peak[] => {
    const peaks = pick(c);
    const coherence = c.coherence;
    if (rangeGiven || coherence === undefined) return peaks;
    const near = (k: number) => {
      let sum = 0, count = 0;
      for (let j = Math.max(0, k - 2); j <= Math.min(coherence.length - 1, k + 2); j++) {
        sum += coherence[j];
        count++;
      }
      return sum / count;
    };
    const kept = peaks.filter((p) => near(p.index) >= USABLE_COHERENCE);
    if (kept.length < peaks.length) {
      warnings.push(
        `${
          peaks.length - kept.length
        } peak(s) of "${c.name}" where the coherence around them is below ${USABLE_COHERENCE} were left out as noise; give a range (min/max Hz) to look there`,
      );
    }
    return kept;
  };
  const modes = chosen.flatMap((c) =>
    analyseChannel({
      frequencies: data.frequencies,
      channel: c,
      options,
      tau,
      peaks: usablePeaks(c),
    })
  );
  for (const c of chosen) {
    const count = modes.filter((m) => m.channel === c.name).length;
    if (count === 0) warnings.push(`no peak found in "${c.name}" in the range`);
    if (count > MANY_PEAKS) {
      warnings.push(
        `${count} peaks in "${c.name}": most are probably noise; narrow the range (min/max Hz) or raise the prominence`,
      );
    }
  }
  if (modes.some((m) => m.flags.includes("few_lines"))) {
    warnings.push(
      `fewer than ${FEW_LINES} lines in the half-power band of some modes: the half-power damping has a large resolution bias; measure with a finer resolution`,
    );
  }
  let target: FrequencyTarget | undefined;
  if (options.targetHz !== undefined) {
    const first = modes.reduce<ModeEstimate | undefined>(
      (best, m) => (best === undefined || m.frequencyHz < best.frequencyHz ? m : best),
      undefined,
    );
    target = {
      minimumHz: options.targetHz,
      firstModeHz: first?.frequencyHz ?? null,
      channel: first?.channel ?? null,
      pass: first !== undefined && first.frequencyHz >= options.targetHz,
      marginHz: first === undefined ? null : first.frequencyHz - options.targetHz,
      marginPercent: first === undefined
        ? null
        : (100 * (first.frequencyHz - options.targetHz)) / options.targetHz,
    };
  }
  const column = (name: string, values: Float64Array | readonly string[]) => ({
    name,
    unit: "",
    values,
  });
  const table: Table<Float64Array | readonly string[]> = {
    columns: [
      column("channel", modes.map((m) => m.channel)),
      column("mode", new Float64Array(modes.map((m) => m.mode))),
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
      peaks_where_coherence_at_least: options.minHz !== undefined || options.maxHz !== undefined
        ? null
        : USABLE_COHERENCE,
      max_hz: options.maxHz ?? null,
      exponential_window_tau_s: tau ?? null,
      modes,
      ...(target !== undefined ? { target } : {}),
      warnings,
    },
  };
  return { modes, table, warnings, ...(target !== undefined ? { target } : {}) };
}
