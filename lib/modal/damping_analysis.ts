/**
 * Mode frequencies and damping from FRFs: the analysis behind the `damping`
 * command. For each prominent peak it gives a half-power estimate and an
 * SDOF-fit estimate, removes the damping an exponential window added, and
 * flags what the measurement cannot support (damping_estimates.ts for the
 * peak policy, damping_flags.ts for the flags, first_mode.ts for targets).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import type { Table } from "../io/table.ts";
import type { DampingMetadata } from "./damping_metadata.ts";
import type { FrfForm } from "../frf/forms.ts";
import type { FrfChannel, FrfData } from "./frf_input.ts";
import { findPeaks } from "./peaks.ts";
import { didYouMean } from "../nearest_name.ts";
import {
  type DampingMethod,
  FEW_LINES,
  LEAST_DAMPING,
  RESOLUTION_BIAS_LINES,
  USABLE_COHERENCE,
} from "./damping_flags.ts";
import { analyseChannel, type ModeEstimate, peaksOnSum } from "./damping_estimates.ts";
import { type FrequencyTarget, frequencyTarget } from "./first_mode.ts";

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

const MANY_PEAKS = 20;

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
  const target = options.targetHz === undefined
    ? undefined
    : frequencyTarget(modes, options.targetHz);
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
