/**
 * A modal test to modes and shapes: every FRF of one reference fitted with
 * one set of poles (LSCF, lscf.ts) over increasing model orders, the poles
 * that stay stable chosen by a stated rule, then residues and shapes by
 * least squares (LSFD) with upper and lower residuals.
 *
 * Stability (common practice; tolerances are options): a pole of order n
 * is stable against the nearest pole of order n − 2 in frequency (relative
 * change ≤ 1 %), damping (≤ 5 %) and shape (MAC ≥ 0.98). Selection: the
 * poles of the highest order that are stable in all three at each of the
 * last `stableOrders` orders (default 5), merged when within the frequency
 * tolerance of each other; or, given `modesHz`, the pole of the highest
 * order nearest each of those frequencies.
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
import {
  type Complex,
  fitResidues,
  type FrfSet,
  lscfPoles,
  modalPhaseCollinearity,
  type Pole,
} from "./lscf.ts";
import { macValue } from "./mac.ts";

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
  /** Highest model order (even). Default 32. */
  maxOrder?: number;
  /** Relative frequency change for a stable pole. Default 0.01. */
  frequencyTolerance?: number;
  /** Relative damping change for a stable pole. Default 0.05. */
  dampingTolerance?: number;
  /** Smallest MAC with the previous order's shape for a stable pole. Default 0.98. */
  macTolerance?: number;
  /** Consecutive orders (steps of 2) a pole must stay stable. Default 5. */
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
  /** Quality flags: `low_mpc` (MPC < 0.9), `form_assumed`, `window_corrected`. */
  readonly flags: readonly string[];
}

/** One pole of the stability analysis. */
export interface StabilityPole {
  readonly order: number;
  readonly frequencyHz: number;
  readonly dampingRatio: number;
  readonly stableFrequency: boolean;
  readonly stableDamping: boolean;
  readonly stableShape: boolean;
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
  readonly warnings: readonly string[];
  /** The unit of the first FRF as given, e.g. `(m/s^2)/N`. */
  readonly unit?: string;
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
 * Fits the modes of a set of FRFs of one reference.
 *
 * @throws {QuiverError} for FRFs without phase or a band without a stable
 * pole; RangeError for bad options.
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
  const lo = options.minHz ?? 0;
  const hi = options.maxHz ?? Infinity;
  let from = 0;
  while (from < frequencies.length && !(frequencies[from] > 0 && frequencies[from] >= lo)) from++;
  let to = frequencies.length;
  while (to > from && frequencies[to - 1] > hi) to--;
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

  // Stability over the orders.
  const stability: StabilityPole[] = [];
  type Tracked = { pole: Pole; shape: Complex[]; run: number };
  let previous: Tracked[] = [];
  for (let order = 2; order <= maxOrder; order += 2) {
    const poles = lscfPoles(set, order);
    const residues = poles.length > 0 ? fitResidues(set, poles).residues : [];
    const current: Tracked[] = poles.map((pole, r) => {
      const shape = shapeOf(residues, r);
      let nearest: Tracked | undefined;
      for (const p of previous) {
        if (
          nearest === undefined ||
          Math.abs(p.pole.frequencyHz - pole.frequencyHz) <
            Math.abs(nearest.pole.frequencyHz - pole.frequencyHz)
        ) nearest = p;
      }
      const stableFrequency = nearest !== undefined &&
        Math.abs(nearest.pole.frequencyHz / pole.frequencyHz - 1) <= tolF;
      const stableDamping = nearest !== undefined &&
        Math.abs(nearest.pole.dampingRatio / pole.dampingRatio - 1) <= tolZ;
      const stableShape = nearest !== undefined &&
        macValue(vector(shape), vector(nearest.shape)) >= tolMac;
      stability.push({
        order,
        frequencyHz: pole.frequencyHz,
        dampingRatio: pole.dampingRatio,
        stableFrequency,
        stableDamping,
        stableShape,
      });
      const stable = stableFrequency && stableDamping && stableShape;
      return { pole, shape, run: stable ? (nearest as Tracked).run + 1 : 0 };
    });
    previous = current;
  }
  let chosen: Pole[];
  if (options.modesHz !== undefined) {
    chosen = options.modesHz.map((hz) => {
      let best: Tracked | undefined;
      for (const p of previous) {
        if (
          best === undefined ||
          Math.abs(p.pole.frequencyHz - hz) < Math.abs(best.pole.frequencyHz - hz)
        ) best = p;
      }
      if (best === undefined) {
        throw new QuiverError(`no pole at order ${maxOrder} to match ${hz} Hz`);
      }
      return best.pole;
    });
  } else {
    const stable = previous.filter((p) => p.run >= stableOrders).map((p) => p.pole);
    chosen = [];
    for (const p of stable) {
      const twin = chosen.find((c) => Math.abs(c.frequencyHz / p.frequencyHz - 1) <= tolF);
      if (twin === undefined) chosen.push(p);
    }
  }
  if (chosen.length === 0) {
    throw new QuiverError(
      `no pole stayed stable over ${stableOrders} orders up to order ${maxOrder}; raise --max-order, narrow the band, or name the modes with --modes-hz`,
    );
  }
  chosen.sort((a, b) => a.frequencyHz - b.frequencyHz);
  const fit = fitResidues(set, chosen);
  const modes: FittedMode[] = chosen.map((pole, r) => {
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
    ];
    // Undo the exponential window's shift of the pole: λ_true = λ + 1/τ.
    const re = pole.lambda.re + (tau !== undefined ? 1 / tau : 0);
    const wn = Math.hypot(re, pole.lambda.im);
    return {
      mode: r + 1,
      frequencyHz: wn / (2 * Math.PI),
      dampingRatio: -re / wn,
      mpc,
      shape,
      flags: tau !== undefined ? [...flags, "window_corrected"] : flags,
    };
  });
  return {
    modes,
    dofs: dofs.map(({ point, direction }) => ({ point, direction })),
    stability,
    frequencies: band,
    measured: converted.map(({ re, im }) => ({ re, im })),
    synthesis: fit.synthesis,
    relativeError: fit.relativeError,
    warnings,
    unit: dofs[0].frf.unit,
  };
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
 * const t = modalTables({ modes: [{ mode: 1, frequencyHz: 50, dampingRatio: 0.02, mpc: 1, shape: [{ re: 1, im: 0 }], flags: [] }],
 *   dofs: [{ point: "1", direction: "z" }], stability: [], frequencies: new Float64Array([50]),
 *   measured: [{ re: new Float64Array([0]), im: new Float64Array([1]) }], synthesis: [{ re: new Float64Array([0]), im: new Float64Array([1]) }],
 *   relativeError: new Float64Array([0]), warnings: [] }, {});
 * if (t.modes.columns[1].values[0] !== 50 || t.shapes.columns[1].values[0] !== "1") throw new Error();
 * ```
 */
export function modalTables(
  result: ModalFitResult,
  settings: Readonly<Record<string, unknown>>,
): {
  modes: Table<Float64Array | readonly string[]>;
  shapes: Table<Float64Array | readonly string[]>;
  stability: Table;
  synthesis: Table;
} {
  const metadata = {
    analysis: "modal",
    method: MODAL_METHOD,
    shape_normalisation: "largest component real and 1",
    ...settings,
    dofs: result.dofs,
    fit_relative_error: Array.from(result.relativeError),
    modes: result.modes.map(({ shape: _s, ...m }) => m),
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
