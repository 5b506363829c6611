/**
 * A modal test to modes and shapes: every FRF of one reference fitted with
 * one set of poles (LSCF, lscf.ts) over increasing model orders, the poles
 * that stay stable chosen by a stated rule, then residues and shapes by
 * least squares (LSFD) with upper and lower residuals.
 *
 * The steps have their own modules: the band and the orders it supports
 * (modal_band.ts), stability of each pole against the order before
 * (stability_chart.ts), the modes chosen from clusters of stable poles over
 * the whole chart (pole_clusters.ts), the clear peaks no mode explains
 * (unexplained_peaks.ts), and the result as tables (modal_tables.ts).
 *
 * Shapes are the residues of each degree of freedom, normalised so that
 * the component of largest magnitude is real and 1 (scaling to unit modal
 * mass would need the driving point, which a single reference may lack).
 *
 * FRFs enter as receptance: mobility is divided by jω, accelerance by (jω)².
 *
 * An exponential window exp(−t/τ) on impact records moves every pole by
 * −1/τ in its real part; when the FRFs say they were windowed (all with one
 * τ), the modes' frequency and damping are those of λ + 1/τ, and the
 * correction is stated in the flags (`window_corrected`).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { FrfChannel } from "../frf/frf_data.ts";
import { type Complex, fitResidues, type FrfSet, modalPhaseCollinearity } from "./lscf.ts";
import { formatFixed } from "../format_number.ts";
import {
  asReceptance,
  largestModelOrder,
  modalBand,
  smallestAutomaticOrder,
} from "./modal_band.ts";
import { chooseModes, type Cluster, clusterStablePoles, clusterStats } from "./pole_clusters.ts";
import { SELECTION_RULE } from "./selection_rule.ts";
import {
  shapeOf,
  stabilityChart,
  type StabilityPole,
  type StabilityTolerances,
} from "./stability_chart.ts";
import { findUnexplainedPeaks, type UnexplainedPeak } from "./unexplained_peaks.ts";

/** One degree of freedom of the fit: an FRF and the point it measures. */
export interface ModalDof {
  /** Point name. */
  readonly point: string;
  /** Direction, e.g. `+z`; "" when not given. */
  readonly direction: string;
  /** The FRF. */
  readonly frf: FrfChannel;
  /** The exponential window's time constant on its records, s, when one was applied. */
  readonly expTau?: number;
}

/** Options of {@linkcode modalFit}. */
export interface ModalFitOptions {
  /** Lowest frequency of the band, Hz. Default: the first line above 0 Hz. */
  minHz?: number;
  /** Highest frequency of the band, Hz. Default: the last line. */
  maxHz?: number;
  /** Highest model order (even, at most {@linkcode largestModelOrder} of the band). Default 32. */
  maxOrder?: number;
  /** Relative frequency change for a stable pole. Default 0.01. */
  frequencyTolerance?: number;
  /** Relative damping change for a stable pole. Default 0.05. */
  dampingTolerance?: number;
  /** Smallest MAC with the previous order's shape for a stable pole. Default 0.98. */
  macTolerance?: number;
  /** Fewest orders at which a mode's cluster must hold a stable pole. Default 5. */
  stableOrders?: number;
  /** Instead of the automatic rule: the modes nearest these frequencies, Hz. Default: none. */
  modesHz?: readonly number[];
}

/** A fitted mode. */
export interface FittedMode {
  /** 1-based, by frequency. */
  readonly mode: number;
  /** Natural frequency, Hz. */
  readonly frequencyHz: number;
  /** Damping ratio. */
  readonly dampingRatio: number;
  /** Modal phase collinearity of the shape. */
  readonly mpc: number;
  /** The shape, one value per degree of freedom, largest component 1. */
  readonly shape: readonly Complex[];
  /**
   * Quality flags: `low_mpc` (MPC < 0.9), `form_assumed`, `window_corrected`,
   * `named` (taken for `modesHz`, not by the stability rule), `unstable`
   * (named, but its pole was stable at no order).
   */
  readonly flags: readonly string[];
  /** Orders at which the mode's cluster held a stable pole. */
  readonly stableOrders: number;
  /** Orders fitted from the cluster's first stable pole to the highest order. */
  readonly ordersSpanned: number;
  /** (largest − smallest)/median of the cluster's frequencies, %; NaN without a cluster. */
  readonly frequencySpreadPercent: number;
  /** (largest − smallest)/median of the cluster's damping ratios, %; NaN without a cluster. */
  readonly dampingSpreadPercent: number;
}

/** Modes, shapes, the stability analysis and the fit's quality. */
export interface ModalFitResult {
  readonly modes: readonly FittedMode[];
  readonly dofs: readonly { point: string; direction: string }[];
  readonly stability: readonly StabilityPole[];
  /** The band's frequencies, Hz. */
  readonly frequencies: Float64Array;
  /** Measured (as receptance) and synthesised FRFs per degree of freedom. */
  readonly measured: readonly { re: Float64Array; im: Float64Array }[];
  readonly synthesis: readonly { re: Float64Array; im: Float64Array }[];
  /** ‖H − Ĥ‖/‖H‖ per degree of freedom. */
  readonly relativeError: Float64Array;
  /** Clear peaks of the sum of FRFs that no mode explains (each also a warning). */
  readonly unexplainedPeaks?: readonly UnexplainedPeak[];
  readonly warnings: readonly string[];
  /** The unit of the first FRF as given, e.g. `(m/s^2)/N`. */
  readonly unit?: string;
}

/**
 * Fits the modes of a set of FRFs of one reference.
 *
 * @throws {QuiverError} for FRFs without phase or a band without a stable
 * pole; RangeError for bad options (an order above what the band supports
 * is refused before any fitting).
 *
 * @example
 * ```ts
 * import { modalFit } from "./modal_fit.ts";
 * // Two points of one mode at 50 Hz (ζ 2 %), shape (1, −0.5), as receptance.
 * const f = new Float64Array(500).map((_, i) => 20 + i * 0.12);
 * const frf = (scale: number) => {
 *   const re = new Float64Array(500), im = new Float64Array(500), w0 = 2 * Math.PI * 50;
 *   f.forEach((hz, i) => { const w = 2 * Math.PI * hz, a = w0 * w0 - w * w, b = 0.04 * w0 * w, d = a * a + b * b; re[i] = scale * a / d; im[i] = -scale * b / d; });
 *   return { name: "p", unit: "m/N", re, im, magnitude: re.map((r, i) => Math.hypot(r, im[i])), form: "receptance" as const };
 * };
 * const r = modalFit(f, [{ point: "1", direction: "z", frf: frf(1) }, { point: "2", direction: "z", frf: frf(-0.5) }]);
 * const [m] = r.modes;
 * if (Math.abs(m.frequencyHz - 50) > 0.01 || Math.abs(m.shape[1].re + 0.5) > 1e-3) throw new Error();
 * if (m.stableOrders < 5 || m.frequencySpreadPercent > 0.01) throw new Error();
 * ```
 */
export function modalFit(
  frequencies: Float64Array,
  dofs: readonly ModalDof[],
  options: ModalFitOptions = {},
): ModalFitResult {
  if (dofs.length === 0) throw new RangeError("a modal fit needs at least one FRF");
  const maxOrder = options.maxOrder ?? 32;
  if (!Number.isInteger(maxOrder) || maxOrder < 4 || maxOrder % 2 !== 0) {
    throw new RangeError(
      `the highest order must be an even integer of at least 4, got ${maxOrder}`,
    );
  }
  const tolF = options.frequencyTolerance ?? 0.01;
  const tolZ = options.dampingTolerance ?? 0.05;
  const tolMac = options.macTolerance ?? 0.98;
  const stableOrders = options.stableOrders ?? 5;
  const { from, to } = modalBand(frequencies, options);
  // Refuse at once, not after fitting every lower order.
  const largest = largestModelOrder(to - from);
  const automatic = smallestAutomaticOrder(stableOrders);
  if (options.modesHz === undefined && maxOrder < automatic) {
    throw new RangeError(
      `the highest order ${maxOrder} cannot give a mode: orders 2, 4, … ${maxOrder} hold at most ${
        Math.max(0, maxOrder / 2 - 1)
      } stable poles (order 2 has none before it) and a mode needs ${stableOrders}; at least ${automatic}`,
    );
  }
  if (maxOrder > largest) {
    throw new RangeError(
      `the highest order ${maxOrder} is more than the band of ${
        to - from
      } lines supports: at most ${largest}`,
    );
  }
  const band = frequencies.subarray(from, to);
  const converted = dofs.map((d) => asReceptance(d.frf, frequencies, from, to));
  const set: FrfSet = { frequencies: band, responses: converted };
  const warnings: string[] = [];
  const taus = [...new Set(dofs.map((d) => d.expTau))];
  if (taus.length > 1) {
    throw new QuiverError(
      "the FRFs were windowed with different exponential time constants; fit them apart or window them alike",
    );
  }
  const tau = taus[0];
  if (converted.some((c) => c.assumed)) {
    warnings.push("an FRF does not state its form: read as receptance (flagged form_assumed)");
  }
  const tolerances: StabilityTolerances = { frequency: tolF, damping: tolZ, mac: tolMac };
  const { stability, orders } = stabilityChart(set, maxOrder, tolerances);
  const clusters = clusterStablePoles(orders, tolerances);
  const stats = (c: Cluster) => clusterStats(c, maxOrder);
  const chosen = chooseModes({
    orders,
    clusters,
    maxOrder,
    stableOrders,
    tolerances,
    modesHz: options.modesHz,
  });
  if (chosen.length === 0) {
    // Name the clear peaks the fit left without a mode, as the success path does.
    // The most prominent first, at most five, so that noise peaks do not bury the clear ones.
    const peaks = findUnexplainedPeaks(frequencies, from, to, dofs, []).sort((a, b) =>
      b.prominenceDb - a.prominenceDb
    );
    const shown = peaks.slice(0, 5);
    const named = peaks.length === 0
      ? `the FRFs show no clear peak (${SELECTION_RULE.peakProminenceDb} dB prominence) either`
      : `clear peaks of the FRFs no mode explains${
        peaks.length > shown.length
          ? ` (the ${shown.length} most prominent of ${peaks.length})`
          : ""
      }: ${
        shown.map((p) =>
          `${formatFixed(p.frequencyHz, 2)} Hz (${formatFixed(p.prominenceDb, 1)} dB)`
        ).join(", ")
      }`;
    throw new QuiverError(
      `no cluster of poles was stable at ${stableOrders} or more orders and at most of the orders up to ${maxOrder}; ${named}; raise --max-order, narrow the band, or name the modes with --modes-hz`,
    );
  }
  chosen.sort((a, b) => a.pole.frequencyHz - b.pole.frequencyHz);
  const fit = fitResidues(set, chosen.map((c) => c.pole));
  const modes: FittedMode[] = chosen.map(({ pole, cluster, named }, r) => {
    const raw = shapeOf(fit.residues, r);
    let k = 0;
    raw.forEach((c, i) => {
      if (Math.hypot(c.re, c.im) > Math.hypot(raw[k].re, raw[k].im)) k = i;
    });
    // Divide by the largest component: it becomes real and 1.
    const p = raw[k], n = p.re * p.re + p.im * p.im;
    const shape = raw.map((c) => ({
      re: (c.re * p.re + c.im * p.im) / n,
      im: (c.im * p.re - c.re * p.im) / n,
    }));
    const mpc = modalPhaseCollinearity(shape);
    const flags = [
      ...(mpc < 0.9 ? ["low_mpc"] : []),
      ...(converted.some((c) => c.assumed) ? ["form_assumed"] : []),
      ...(tau !== undefined ? ["window_corrected"] : []),
      ...(named ? ["named"] : []),
      ...(named && cluster === undefined ? ["unstable"] : []),
    ];
    // Undo the exponential window's shift of the pole: λ_true = λ + 1/τ.
    const re = pole.lambda.re + (tau !== undefined ? 1 / tau : 0);
    const wn = Math.hypot(re, pole.lambda.im);
    if (cluster !== undefined) cluster.members.forEach((m) => (m.mode = r + 1));
    const s = cluster !== undefined ? stats(cluster) : undefined;
    return {
      mode: r + 1,
      frequencyHz: wn / (2 * Math.PI),
      dampingRatio: -re / wn,
      mpc,
      shape,
      flags,
      stableOrders: s?.stableOrders ?? 0,
      ordersSpanned: s?.ordersSpanned ?? 0,
      frequencySpreadPercent: s?.frequencySpreadPercent ?? NaN,
      dampingSpreadPercent: s?.dampingSpreadPercent ?? NaN,
    };
  });
  // A clear peak that no mode explains is named, never dropped in silence.
  const unexplainedPeaks = findUnexplainedPeaks(frequencies, from, to, dofs, modes);
  for (const peak of unexplainedPeaks) {
    const near = clusters.filter((c) =>
      Math.abs(c.frequencyHz / peak.frequencyHz - 1) <= SELECTION_RULE.peakReach
    ).sort((a, b) =>
      b.members.length - a.members.length
    )[0];
    warnings.push(
      `a clear peak of the FRFs at ${formatFixed(peak.frequencyHz, 2)} Hz (${
        formatFixed(peak.prominenceDb, 1)
      } dB prominence${
        peak.coherence !== undefined ? `, coherence ${formatFixed(peak.coherence, 2)}` : ""
      }) has no mode: ${
        near === undefined
          ? "no pole near it was stable"
          : `poles near it were stable at ${near.members.length} of ${
            stats(near).ordersSpanned
          } orders`
      }; name it with --modes-hz or change --max-order`,
    );
  }
  return {
    modes,
    dofs: dofs.map(({ point, direction }) => ({ point, direction })),
    stability: stability.map(({ entry, flags }) => ({
      order: entry.order,
      frequencyHz: entry.pole.frequencyHz,
      dampingRatio: entry.pole.dampingRatio,
      stableFrequency: flags[0],
      stableDamping: flags[1],
      stableShape: flags[2],
      mode: entry.mode,
    })),
    frequencies: band,
    measured: converted.map(({ re, im }) => ({ re, im })),
    synthesis: fit.synthesis,
    relativeError: fit.relativeError,
    unexplainedPeaks,
    warnings,
    unit: dofs[0].frf.unit,
  };
}
