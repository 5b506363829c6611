/**
 * A modal test to modes and shapes: every FRF of one reference fitted with
 * one set of poles (LSCF, lscf.ts) over increasing model orders, the poles
 * that stay stable chosen by a stated rule, then residues and shapes by
 * least squares (LSFD) with upper and lower residuals.
 *
 * Stability (the usual stabilisation-diagram criteria, common practice;
 * tolerances are options): a pole of order n is compared with the nearest
 * pole (in frequency) of order n − 2 and is stable when its frequency
 * changed by ≤ 1 %, its damping by ≤ 5 % and its shape's MAC is ≥ 0.98.
 *
 * Selection from the whole chart, not from the last order alone (rule ours):
 * stable poles are clustered across the orders (frequency within 1 % of the
 * cluster's median, shape MAC ≥ 0.98 with its latest member, one pole per
 * order, the closest first); a cluster is a mode when it holds a stable pole
 * at 5 or more orders and at more than half of the orders from its first
 * stable pole to the highest order. The mode's frequency and damping are the
 * medians over the cluster, reported with their spread and counts. Given
 * `modesHz`, the cluster nearest each frequency (within 2 %) is taken, or,
 * failing one, the highest order's nearest pole (flagged `unstable`).
 *
 * A clear peak of the sum of |H| (prominence ≥ 6 dB, at least 1 % of the
 * highest peak, mean coherence ≥ 0.8 where known) that no mode explains
 * (within 2 % or 2 lines) is named in a warning.
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
import type { Table, TableColumn } from "../io/table.ts";
import type { ModalMetadata } from "./modal_metadata.ts";
import {
  type Complex,
  fitResidues,
  type FrfSet,
  lscfPoles,
  modalPhaseCollinearity,
  type Pole,
} from "./lscf.ts";
import { macValue } from "./mac.ts";
import { findPeaks } from "./peaks.ts";
import { formatFixed } from "../format_number.ts";

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

/** One pole of the stability analysis. */
export interface StabilityPole {
  readonly order: number;
  readonly frequencyHz: number;
  readonly dampingRatio: number;
  /** Each change against the nearest pole of the order before (see the module notes). */
  readonly stableFrequency: boolean;
  readonly stableDamping: boolean;
  readonly stableShape: boolean;
  /** The mode (1-based) whose cluster holds this pole; 0 for none. */
  readonly mode: number;
}

/** A clear peak of the sum of FRFs that no reported mode explains. */
export interface UnexplainedPeak {
  /** Frequency of the peak's line, Hz. */
  readonly frequencyHz: number;
  /** Its prominence in the sum of |H|, dB. */
  readonly prominenceDb: number;
  /** Mean coherence over the FRFs at the line; undefined when they have none. */
  readonly coherence?: number;
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
 * The selection rule's fixed numbers (ours unless marked): a cluster is a
 * mode when it holds a stable pole at more than `mostOrders` of the orders
 * from its first stable pole to the highest order; a clear peak has at least
 * `peakProminenceDb` of prominence in the sum of |H|, is no lower than
 * `peakFloor` of the highest peak, and has mean coherence of at least
 * `peakCoherence` where coherence is known; a mode explains a peak within
 * `peakReach` of its frequency or `peakLines` lines, whichever is wider.
 */
export const SELECTION_RULE = {
  mostOrders: 0.5,
  peakProminenceDb: 6,
  peakFloor: 0.01,
  peakCoherence: 0.8,
  peakReach: 0.02,
  peakLines: 2,
  orderLimit: 128,
} as const;

/**
 * The highest model order a band of `lines` lines supports: LSCF of order n
 * needs more than n + 1 lines, and above 128 (ours) the fit takes long and
 * the z-domain polynomial is ill-conditioned; even.
 *
 * @example
 * ```ts
 * import { largestModelOrder } from "./modal_fit.ts";
 * if (largestModelOrder(41) !== 38 || largestModelOrder(4000) !== 128) throw new Error();
 * ```
 */
export function largestModelOrder(lines: number): number {
  const byLines = lines - 2 - ((lines - 2) % 2);
  return Math.min(byLines, SELECTION_RULE.orderLimit);
}

/**
 * The lowest highest-order with which the automatic rule can find a mode:
 * orders run 2, 4, …, and a pole of order 2 has no order before it to be
 * stable against, so orders 4 … N hold N/2 − 1 stable poles at most; a
 * mode needs `stableOrders` of them (default 5, hence 12).
 *
 * @example
 * ```ts
 * import { smallestAutomaticOrder } from "./modal_fit.ts";
 * if (smallestAutomaticOrder() !== 12 || smallestAutomaticOrder(3) !== 8) throw new Error();
 * ```
 */
export function smallestAutomaticOrder(stableOrders = 5): number {
  // Orders 4, 6, …, N can each hold one stable pole: N/2 − 1 ≥ stableOrders.
  return 2 * stableOrders + 2;
}

/**
 * The fewest band lines a fit of order `order` needs (the inverse of
 * {@linkcode largestModelOrder}: more than order + 1 lines).
 *
 * @example
 * ```ts
 * import { largestModelOrder, linesForOrder } from "./modal_fit.ts";
 * if (linesForOrder(12) !== 14 || largestModelOrder(linesForOrder(12)) !== 12) throw new Error();
 * ```
 */
export function linesForOrder(order: number): number {
  return order + 2;
}

function asReceptance(
  frf: FrfChannel,
  frequencies: Float64Array,
  from: number,
  to: number,
): { re: Float64Array; im: Float64Array; assumed: boolean } {
  if (frf.re === undefined || frf.im === undefined) {
    throw new QuiverError(`FRF "${frf.name}" has no phase: a modal fit needs complex FRFs`);
  }
  const power = frf.form === "accelerance" ? 2 : frf.form === "mobility" ? 1 : 0;
  const re = new Float64Array(to - from), im = new Float64Array(to - from);
  for (let k = from; k < to; k++) {
    const w = 2 * Math.PI * frequencies[k];
    let r = frf.re[k], i = frf.im[k];
    // Divide by jω once per power: (r + ji)/(jω) = (i − jr)/ω.
    for (let p = 0; p < power; p++) [r, i] = [i / w, -r / w];
    re[k - from] = r;
    im[k - from] = i;
  }
  return { re, im, assumed: frf.form === undefined };
}

/**
 * The band [from, to) of line indices: lines above 0 Hz within [minHz, maxHz].
 *
 * @example
 * ```ts
 * import { modalBand } from "./modal_fit.ts";
 * const b = modalBand(new Float64Array([0, 10, 20, 30, 40]), { minHz: 15, maxHz: 30 });
 * if (b.from !== 2 || b.to !== 4) throw new Error();
 * ```
 */
export function modalBand(
  frequencies: Float64Array,
  options: { minHz?: number; maxHz?: number } = {},
): { from: number; to: number } {
  const lo = options.minHz ?? 0;
  const hi = options.maxHz ?? Infinity;
  let from = 0;
  while (from < frequencies.length && !(frequencies[from] > 0 && frequencies[from] >= lo)) from++;
  let to = frequencies.length;
  while (to > from && frequencies[to - 1] > hi) to--;
  return { from, to };
}

/** A pole of one order with its shape, as the selection sees it. */
interface OrderPole {
  readonly order: number;
  readonly pole: Pole;
  readonly shape: readonly Complex[];
  readonly stable: boolean;
  /** Index of its cluster; −1 for none. */
  cluster: number;
  /** The reported mode (1-based) its cluster became; 0 for none. */
  mode: number;
}

/** Stable poles of several orders that are one mode. */
interface Cluster {
  readonly members: OrderPole[];
  /** Median frequency of the members so far, Hz. */
  frequencyHz: number;
}

function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 === 1 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function spreadPercent(values: readonly number[]): number {
  let lo = Infinity, hi = -Infinity;
  for (const v of values) {
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  return (100 * (hi - lo)) / median(values);
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
  const shapeOf = (residues: readonly (readonly Complex[])[], r: number) =>
    residues.map((row) => row[r]);
  const macOf = (a: readonly Complex[], b: readonly Complex[]) => macValue(vector(a), vector(b));

  // Stability over the orders: each pole against the nearest pole (in
  // frequency) of the order before, as the stability chart shows it. A pole
  // doubled at some order may fail here; the clusters below ride over that.
  const stability: { entry: OrderPole; flags: [boolean, boolean, boolean] }[] = [];
  const orders: OrderPole[][] = [];
  let previous: OrderPole[] = [];
  for (let order = 2; order <= maxOrder; order += 2) {
    const poles = lscfPoles(set, order);
    const residues = poles.length > 0 ? fitResidues(set, poles).residues : [];
    const current = poles.map((pole, r): OrderPole => {
      const shape = shapeOf(residues, r);
      let nearest: OrderPole | undefined;
      for (const p of previous) {
        if (
          nearest === undefined ||
          Math.abs(p.pole.frequencyHz - pole.frequencyHz) <
            Math.abs(nearest.pole.frequencyHz - pole.frequencyHz)
        ) nearest = p;
      }
      const flags: [boolean, boolean, boolean] = nearest === undefined ? [false, false, false] : [
        Math.abs(nearest.pole.frequencyHz / pole.frequencyHz - 1) <= tolF,
        Math.abs(nearest.pole.dampingRatio / pole.dampingRatio - 1) <= tolZ,
        macOf(shape, nearest.shape) >= tolMac,
      ];
      const entry: OrderPole = {
        order,
        pole,
        shape,
        stable: flags[0] && flags[1] && flags[2],
        cluster: -1,
        mode: 0,
      };
      stability.push({ entry, flags });
      return entry;
    });
    orders.push(current);
    previous = current;
  }

  // Clusters of stable poles across the orders: a stable pole joins the
  // cluster whose median frequency is within the frequency tolerance and
  // whose latest shape it matches (MAC), at most one pole per cluster and
  // order, the closest first.
  const clusters: Cluster[] = [];
  for (const current of orders) {
    const candidates: { p: OrderPole; c: number; d: number }[] = [];
    for (const p of current) {
      if (!p.stable) continue;
      clusters.forEach((cluster, c) => {
        const df = Math.abs(cluster.frequencyHz / p.pole.frequencyHz - 1);
        const last = cluster.members[cluster.members.length - 1];
        const mac = macOf(p.shape, last.shape);
        if (df <= tolF && mac >= tolMac) {
          candidates.push({ p, c, d: df / tolF + (1 - mac) / (1 - tolMac) });
        }
      });
    }
    candidates.sort((a, b) => a.d - b.d);
    const taken = new Set<number>();
    for (const { p, c } of candidates) {
      if (p.cluster >= 0 || taken.has(c)) continue;
      p.cluster = c;
      taken.add(c);
    }
    for (const p of current) {
      if (!p.stable) continue;
      if (p.cluster < 0) {
        p.cluster = clusters.length;
        clusters.push({ members: [p], frequencyHz: p.pole.frequencyHz });
      } else if (clusters[p.cluster].members.at(-1)?.order !== p.order) {
        const cluster = clusters[p.cluster];
        cluster.members.push(p);
        cluster.frequencyHz = median(cluster.members.map((m) => m.pole.frequencyHz));
      }
    }
  }
  const stats = (c: Cluster) => {
    const first = c.members[0].order;
    return {
      stableOrders: c.members.length,
      ordersSpanned: (maxOrder - first) / 2 + 1,
      frequencySpreadPercent: spreadPercent(c.members.map((m) => m.pole.frequencyHz)),
      dampingSpreadPercent: spreadPercent(c.members.map((m) => m.pole.dampingRatio)),
    };
  };
  // The cluster's pole: median frequency and median damping of its members.
  const clusterPole = (c: Cluster): Pole => {
    const hz = median(c.members.map((m) => m.pole.frequencyHz));
    const zeta = median(c.members.map((m) => m.pole.dampingRatio));
    const wn = 2 * Math.PI * hz;
    return {
      frequencyHz: hz,
      dampingRatio: zeta,
      lambda: { re: -zeta * wn, im: wn * Math.sqrt(1 - zeta * zeta) },
    };
  };

  type Choice = { pole: Pole; cluster?: Cluster; named: boolean };
  let chosen: Choice[];
  if (options.modesHz !== undefined) {
    const last = orders[orders.length - 1];
    chosen = options.modesHz.map((hz): Choice => {
      // The cluster nearest the frequency asked for, else the highest order's pole.
      let bestCluster: Cluster | undefined;
      for (const c of clusters) {
        if (
          Math.abs(c.frequencyHz / hz - 1) <= 2 * tolF &&
          (bestCluster === undefined ||
            Math.abs(c.frequencyHz - hz) < Math.abs(bestCluster.frequencyHz - hz))
        ) bestCluster = c;
      }
      if (bestCluster !== undefined) {
        return { pole: clusterPole(bestCluster), cluster: bestCluster, named: true };
      }
      let best: OrderPole | undefined;
      for (const p of last) {
        if (
          best === undefined ||
          Math.abs(p.pole.frequencyHz - hz) < Math.abs(best.pole.frequencyHz - hz)
        ) best = p;
      }
      if (best === undefined) {
        throw new QuiverError(`no pole at order ${maxOrder} to match ${hz} Hz`);
      }
      return { pole: best.pole, named: true };
    });
  } else {
    const selected = clusters.filter((c) => {
      const s = stats(c);
      return s.stableOrders >= stableOrders &&
        s.stableOrders > SELECTION_RULE.mostOrders * s.ordersSpanned;
    }).sort((a, b) => b.members.length - a.members.length);
    // Two clusters of one mode (same frequency within tolerance, same shape): keep the steadier.
    const kept: Cluster[] = [];
    for (const c of selected) {
      const twin = kept.find((k) =>
        Math.abs(k.frequencyHz / c.frequencyHz - 1) <= tolF &&
        macOf(k.members.at(-1)!.shape, c.members.at(-1)!.shape) >= tolMac
      );
      if (twin === undefined) kept.push(c);
    }
    chosen = kept.map((c) => ({ pole: clusterPole(c), cluster: c, named: false }));
  }
  if (chosen.length === 0) {
    // Name the clear peaks the fit left without a mode, as the success path does.
    // The most prominent first, at most five, so that noise peaks do not bury the clear ones.
    const peaks = unexplained(frequencies, from, to, dofs, []).sort((a, b) =>
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
  const unexplainedPeaks = unexplained(frequencies, from, to, dofs, modes);
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

/**
 * Clear peaks of the sum of |H| over the FRFs (as given) in the band that no
 * mode explains: prominence, height and coherence as {@linkcode SELECTION_RULE}.
 */
function unexplained(
  frequencies: Float64Array,
  from: number,
  to: number,
  dofs: readonly ModalDof[],
  modes: readonly FittedMode[],
): UnexplainedPeak[] {
  const sum = new Float64Array(to - from);
  for (const d of dofs) for (let k = from; k < to; k++) sum[k - from] += d.frf.magnitude[k];
  const f = frequencies.subarray(from, to);
  const peaks = findPeaks(f, sum, { prominenceDb: SELECTION_RULE.peakProminenceDb });
  let top = 0;
  for (const p of peaks) top = Math.max(top, sum[p.index]);
  const spacing = f.length > 1 ? (f[f.length - 1] - f[0]) / (f.length - 1) : 0;
  const withCoherence = dofs.filter((d) => d.frf.coherence !== undefined);
  const out: UnexplainedPeak[] = [];
  for (const p of peaks) {
    if (sum[p.index] < SELECTION_RULE.peakFloor * top) continue;
    let coherence: number | undefined;
    if (withCoherence.length > 0) {
      coherence = 0;
      for (const d of withCoherence) coherence += d.frf.coherence![from + p.index];
      coherence /= withCoherence.length;
      if (coherence < SELECTION_RULE.peakCoherence) continue;
    }
    const hz = f[p.index];
    const reach = Math.max(SELECTION_RULE.peakReach * hz, SELECTION_RULE.peakLines * spacing);
    if (modes.some((m) => Math.abs(m.frequencyHz - hz) <= reach)) continue;
    out.push({
      frequencyHz: hz,
      prominenceDb: p.prominenceDb,
      ...(coherence !== undefined ? { coherence } : {}),
    });
  }
  return out;
}

function vector(shape: readonly Complex[]) {
  return { re: Float64Array.from(shape, (c) => c.re), im: Float64Array.from(shape, (c) => c.im) };
}

/** The method as written into the metadata. */
export const MODAL_METHOD =
  "LSCF common-denominator poles (Guillaume, Verboven, Vanlanduit, Van der Auweraer & Peeters, IMAC XXI, 2003); residues by least squares (LSFD) with complex upper and lower residuals; MPC (Pappa, Elliott & Schenk 1993)";

/**
 * The fit as tables: modes, shapes (tidy), stability, and measured against
 * synthesised FRFs.
 *
 * @example
 * ```ts
 * import { modalTables } from "./modal_fit.ts";
 * const t = modalTables({ modes: [{ mode: 1, frequencyHz: 50, dampingRatio: 0.02, mpc: 1, shape: [{ re: 1, im: 0 }], flags: [],
 *   stableOrders: 12, ordersSpanned: 14, frequencySpreadPercent: 0.1, dampingSpreadPercent: 3 }],
 *   dofs: [{ point: "1", direction: "z" }], stability: [], frequencies: new Float64Array([50]),
 *   measured: [{ re: new Float64Array([0]), im: new Float64Array([1]) }], synthesis: [{ re: new Float64Array([0]), im: new Float64Array([1]) }],
 *   relativeError: new Float64Array([0]), warnings: [] }, {});
 * if (t.modes.columns[1].values[0] !== 50 || t.shapes.columns[1].values[0] !== "1") throw new Error();
 * if (t.modes.columns[5].values[0] !== 12) throw new Error();
 * ```
 */
export function modalTables(
  result: ModalFitResult,
  settings: Readonly<Record<string, unknown>>,
): {
  modes: Table<ModalMetadata, Float64Array | readonly string[]>;
  shapes: Table<ModalMetadata, Float64Array | readonly string[]>;
  stability: Table<ModalMetadata>;
  synthesis: Table<ModalMetadata>;
} {
  const metadata: ModalMetadata = {
    analysis: "modal",
    method: MODAL_METHOD,
    shape_normalisation: "largest component real and 1",
    ...settings,
    dofs: result.dofs,
    fit_relative_error: Array.from(result.relativeError),
    modes: result.modes.map(({ shape: _s, ...m }) => m),
    unexplained_peaks: (result.unexplainedPeaks ?? []).map((p) => ({
      frequency_hz: p.frequencyHz,
      prominence_db: p.prominenceDb,
      coherence: p.coherence ?? null,
    })),
    warnings: result.warnings,
  };
  const num = (
    name: string,
    unit: string,
    values: ArrayLike<number>,
  ): TableColumn<Float64Array> => ({
    name,
    unit,
    values: Float64Array.from(values),
  });
  const shapeRows = result.modes.flatMap((m) =>
    m.shape.map((c, i) => ({ m, c, dof: result.dofs[i] }))
  );
  // Receptance's unit: metres per the FRF's input unit (what follows its last "/").
  const inputUnit = /\/([^/()]+)$/.exec(result.unit ?? "")?.[1];
  const unit = inputUnit === undefined ? "" : `m/${inputUnit}`;
  const dofName = (i: number) =>
    `${result.dofs[i].point}${
      result.dofs[i].direction === "" ? "" : `_${result.dofs[i].direction}`
    }`;
  return {
    modes: {
      columns: [
        num("mode", "", result.modes.map((m) => m.mode)),
        num("frequency_hz", "Hz", result.modes.map((m) => m.frequencyHz)),
        num("damping_ratio", "", result.modes.map((m) => m.dampingRatio)),
        num("mpc", "", result.modes.map((m) => m.mpc)),
        { name: "flags", unit: "", values: result.modes.map((m) => m.flags.join(" ")) },
        num("stable_orders", "", result.modes.map((m) => m.stableOrders)),
        num("orders_spanned", "", result.modes.map((m) => m.ordersSpanned)),
        num("frequency_spread", "%", result.modes.map((m) => m.frequencySpreadPercent)),
        num("damping_spread", "%", result.modes.map((m) => m.dampingSpreadPercent)),
      ],
      metadata,
    },
    shapes: {
      columns: [
        num("mode", "", shapeRows.map((r) => r.m.mode)),
        { name: "point", unit: "", values: shapeRows.map((r) => r.dof.point) },
        { name: "direction", unit: "", values: shapeRows.map((r) => r.dof.direction) },
        num("re", "", shapeRows.map((r) => r.c.re)),
        num("im", "", shapeRows.map((r) => r.c.im)),
        num("frequency_hz", "Hz", shapeRows.map((r) => r.m.frequencyHz)),
      ],
      metadata: { ...metadata, layout: "tidy: one row per (mode, degree of freedom)" },
    },
    stability: {
      columns: [
        num("order", "", result.stability.map((p) => p.order)),
        num("frequency_hz", "Hz", result.stability.map((p) => p.frequencyHz)),
        num("damping_ratio", "", result.stability.map((p) => p.dampingRatio)),
        num("stable_frequency", "", result.stability.map((p) => Number(p.stableFrequency))),
        num("stable_damping", "", result.stability.map((p) => Number(p.stableDamping))),
        num("stable_shape", "", result.stability.map((p) => Number(p.stableShape))),
        num("mode", "", result.stability.map((p) => p.mode)),
      ],
      metadata: { ...metadata, layout: "one row per pole and model order" },
    },
    synthesis: {
      columns: [
        num("frequency_hz", "Hz", result.frequencies),
        ...result.dofs.flatMap((_, i) => [
          num(`${dofName(i)}_measured_re`, unit, result.measured[i].re),
          num(`${dofName(i)}_measured_im`, unit, result.measured[i].im),
          num(`${dofName(i)}_synth_re`, unit, result.synthesis[i].re),
          num(`${dofName(i)}_synth_im`, unit, result.synthesis[i].im),
        ]),
      ],
      metadata: {
        ...metadata,
        layout: "receptance, measured beside synthesised, per degree of freedom",
      },
    },
  };
}
