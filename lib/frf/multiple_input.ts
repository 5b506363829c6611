/**
 * FRFs from several inputs at once, with multiple and partial coherence and
 * the principal components of the inputs: the analysis behind
 * `frf --inputs a,b,c`. One pass of the spectral core gives every auto and
 * cross spectrum; everything else is linear algebra at each line.
 *
 * With G_ab = E[A*·B] (the core's convention) and the model
 * yₒ = Σᵢ Hₒᵢ·xᵢ + nₒ, noise n uncorrelated with the inputs:
 *
 * - H (H1): Gxx·hₒ = gₒ, hₒ = Gxx⁻¹·gₒ with gₒ the column E[xᵢ*·yₒ], the
 *   least-squares solution (Bendat & Piersol, "Random Data", 4th ed., ch. 7,
 *   multiple-input/output relations).
 * - Multiple coherence γ²ₒ = gₒᴴ·Gxx⁻¹·gₒ / Gyy: the share of yₒ's spectrum
 *   the inputs explain together.
 * - Partial coherence of yₒ with xᵢ, each input conditioned on all the
 *   others: |Hₒᵢ|²·Gᵢᵢ·ᵣ / (|Hₒᵢ|²·Gᵢᵢ·ᵣ + Gₙₙ), with Gᵢᵢ·ᵣ = 1/(Gxx⁻¹)ᵢᵢ the
 *   conditioned input spectrum (xᵢ with the parts linear in the other inputs
 *   removed) and Gₙₙ = Gyy − gᴴ·Gxx⁻¹·g the residual (conditioned output)
 *   spectrum; this is |P_iy|²/(P_ii·P_yy) of the inverse P of the augmented
 *   spectral matrix, written through Gxx⁻¹ alone.
 * - Principal components: the eigenvalues λₖ of Gxx (its singular values, as
 *   it is Hermitian and non-negative), in the inputs' unit²/Hz; the virtual
 *   coherence of yₒ with component k is |vₖᴴ·gₒ|²/(λₖ·Gyy), and the virtual
 *   coherences of an output add up to its multiple coherence.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { channelIndices } from "../io/recording.ts";
import { asStream, type RecordingSource } from "../io/recording_stream.ts";
import { spectralEstimateOf } from "../dsp/spectral_pipeline.ts";
import type { Table, TableColumn } from "../io/table.ts";
import { resolveBlock, type SpectralEstimate } from "../dsp/spectral_core.ts";
import { FRF_SEGMENT_KEYS, segmentMetadata } from "../dsp/segment_metadata.ts";
import type {
  FrfMatrixMetadata,
  FrfPartialMetadata,
  FrfPrincipalMetadata,
} from "./frf_matrix_metadata.ts";
import type { DetrendMode } from "../dsp/detrend.ts";
import type { WindowName } from "../dsp/windows.ts";
import { frfUnit } from "./forms.ts";
import { LOW_COHERENCE, SINGLE_AVERAGE_WARNING } from "./frf_analysis.ts";
import {
  type ComplexSquare,
  eigenComponents,
  fromEigenComponents,
  hermitianEigen,
} from "./hermitian.ts";

/** Options of {@linkcode multipleInputFrf}. */
export interface MultipleInputOptions {
  /** The input (reference) channels, at least two. Required. */
  inputs: readonly string[];
  /** The response channels, at least one. Required. */
  outputs: readonly string[];
  /** Estimator: only `"h1"` with several inputs. Default `"h1"`. */
  estimator?: "h1";
  /** Samples per block. Default 4096 unless `resolution` is given. */
  block?: number;
  /** Line spacing in Hz instead of `block`. Default: none. */
  resolution?: number;
  /** Overlap fraction in [0, 1). Default 0.5. */
  overlap?: number;
  /** Window. Default `"hann"`. */
  window?: WindowName;
  /** Detrend. Default `"mean"`. */
  detrend?: DetrendMode;
}

/** A complex spectrum. */
export interface ComplexLines {
  /** Real parts. */
  readonly re: Float64Array;
  /** Imaginary parts. */
  readonly im: Float64Array;
}

/** Everything the multiple-input analysis finds, typed. */
export interface MultipleInputFrf {
  /** Line frequencies, Hz. */
  readonly frequencies: Float64Array;
  /** The inputs, in the order given. */
  readonly inputs: readonly { name: string; unit: string }[];
  /** The outputs, in the order given. */
  readonly outputs: readonly { name: string; unit: string }[];
  /** H[o][i]: output o per input i, in unit(o)/unit(i). */
  readonly h: readonly (readonly ComplexLines[])[];
  /** Multiple coherence of each output with all inputs. */
  readonly multipleCoherence: readonly Float64Array[];
  /** Partial coherence [o][i] of output o with input i, conditioned on the other inputs. */
  readonly partialCoherence: readonly (readonly Float64Array[])[];
  /** Conditioned input spectra Gᵢᵢ·ᵣ (input i without what the others explain), unit²/Hz. */
  readonly conditionedInputs: readonly Float64Array[];
  /** Residual output spectra Gₙₙ (what the inputs do not explain), unit²/Hz. */
  readonly residuals: readonly Float64Array[];
  /** 2-norm condition number of Gxx, λmax/λmin. */
  readonly condition: Float64Array;
  /** Principal components: eigenvalues of Gxx per line, largest first ([k][line]). */
  readonly principal: readonly Float64Array[];
  /** Virtual coherence [o][k] of output o with principal component k. */
  readonly virtualCoherence: readonly (readonly Float64Array[])[];
  /** Segments averaged. */
  readonly averages: number;
}

/** The analysis's tables and warnings. */
export interface MultipleInputResult {
  /** The typed result. */
  readonly frf: MultipleInputFrf;
  /** H per output and input, multiple coherence, condition number. */
  readonly table: Table<FrfMatrixMetadata>;
  /** Partial coherences and conditioned spectra. */
  readonly partialTable: Table<FrfPartialMetadata>;
  /** Principal components and virtual coherences. */
  readonly principalTable: Table<FrfPrincipalMetadata>;
  /** Warnings, also in each table's metadata. */
  readonly warnings: readonly string[];
}

/**
 * Condition number of Gxx above which a line is flagged: the inputs are then
 * so nearly coherent that H there follows noise (our choice, stated in the
 * warning).
 */
const ILL_CONDITIONED = 1000;

/** Below λmin/λmax of this, Gxx is singular to working precision: H is undefined. */
const SINGULAR = 1e-13;

/** Column name of H for output `y` per input `x`: `y/x`, the FRF's own notation. */
function pairName(output: string, input: string): string {
  return `${output}/${input}`;
}

/**
 * FRFs of every output against several inputs together (H1 by least
 * squares), with multiple and partial coherence, conditioned spectra, the
 * condition number of Gxx and its principal components.
 *
 * @throws {QuiverError} for unknown or repeated channels, a name holding
 * "/", another estimator than h1, inputs that are linearly dependent (Gxx
 * singular at some line), or a record shorter than one block.
 *
 * @example
 * ```ts
 * import { multipleInputFrf } from "./multiple_input.ts";
 * // y = 2·a − 3·b with a and b independent: H recovered exactly, multiple coherence 1.
 * let s = 1;
 * const r = () => ((s = (s * 16807) % 2147483647) / 2147483647) - 0.5;
 * const a = new Float64Array(8192).map(r), b = new Float64Array(8192).map(r);
 * const y = a.map((v, i) => 2 * v - 3 * b[i]);
 * const rec = { rate: 1000, startTime: 0, channels: [
 *   { name: "a", unit: "N", data: a }, { name: "b", unit: "N", data: b }, { name: "y", unit: "m/s^2", data: y }] };
 * const { frf } = await multipleInputFrf(rec, { inputs: ["a", "b"], outputs: ["y"], block: 256 });
 * if (Math.abs(frf.h[0][1].re[40] + 3) > 1e-9) throw new Error();
 * if (Math.abs(frf.multipleCoherence[0][40] - 1) > 1e-9) throw new Error();
 * ```
 */
export async function multipleInputFrf(
  source: RecordingSource,
  options: MultipleInputOptions,
): Promise<MultipleInputResult> {
  const stream = asStream(source);
  checkOptions(options);
  const indices = channelIndices(stream.channels, [...options.inputs, ...options.outputs]);
  const channels = indices.map((i) => stream.channels[i]);
  const q = options.inputs.length, p = options.outputs.length;
  const pairs: (readonly [number, number])[] = [];
  for (let i = 0; i < q; i++) for (let j = i + 1; j < q; j++) pairs.push([i, j]);
  for (let i = 0; i < q; i++) for (let o = 0; o < p; o++) pairs.push([i, q + o]);
  const { estimate, warnings: signalWarnings } = await spectralEstimateOf(stream, indices, {
    rate: stream.rate,
    block: resolveBlock(stream.rate, options),
    overlap: options.overlap,
    window: options.window,
    detrend: options.detrend,
    pairs,
  });
  const frf = solveLines(estimate, channels.slice(0, q), channels.slice(q));
  return tables(frf, estimate, options, stream.length, signalWarnings);
}

function checkOptions(options: MultipleInputOptions): void {
  if (options.inputs.length < 2) {
    throw new RangeError("name at least two inputs (one input: frequencyResponse)");
  }
  if (options.outputs.length === 0) throw new RangeError("name at least one response channel");
  if ((options.estimator ?? "h1") !== "h1") {
    throw new QuiverError(
      `with several inputs only the h1 estimator is available (least squares, noise on the outputs); got "${options.estimator}"`,
      {},
      "usage",
    );
  }
  const names = [...options.inputs, ...options.outputs];
  const repeated = names.find((n, i) => names.indexOf(n) !== i);
  if (repeated !== undefined) {
    throw new QuiverError(
      `"${repeated}" is named twice among inputs and outputs`,
      {},
      "usage",
    );
  }
  const slashed = names.find((n) => n.includes("/"));
  if (slashed !== undefined) {
    throw new QuiverError(
      `channel "${slashed}" holds "/", which the FRF matrix uses between output and input (output/input): rename it in the recording or a set-up`,
      {},
      "usage",
    );
  }
}

/** The linear algebra at every line. */
function solveLines(
  estimate: SpectralEstimate,
  inputs: readonly { name: string; unit: string }[],
  outputs: readonly { name: string; unit: string }[],
): MultipleInputFrf {
  const q = inputs.length, p = outputs.length;
  const lines = estimate.frequencies.length;
  const crossOf = new Map(estimate.cross.map((c) => [`${c.x},${c.y}`, c]));
  const cross = (x: number, y: number) => crossOf.get(`${x},${y}`)!;
  const h = outputs.map(() =>
    inputs.map(() => ({ re: new Float64Array(lines), im: new Float64Array(lines) }))
  );
  const multiple = outputs.map(() => new Float64Array(lines));
  const partial = outputs.map(() => inputs.map(() => new Float64Array(lines)));
  const conditioned = inputs.map(() => new Float64Array(lines));
  const residuals = outputs.map(() => new Float64Array(lines));
  const condition = new Float64Array(lines);
  const principal = inputs.map(() => new Float64Array(lines));
  const virtual = outputs.map(() => inputs.map(() => new Float64Array(lines)));
  const gxx: ComplexSquare = { n: q, re: new Float64Array(q * q), im: new Float64Array(q * q) };
  const gRe = new Float64Array(q), gIm = new Float64Array(q);
  const singular: number[] = [];
  for (let k = 0; k < lines; k++) {
    for (let i = 0; i < q; i++) {
      gxx.re[i * q + i] = estimate.auto[i][k];
      gxx.im[i * q + i] = 0;
      for (let j = i + 1; j < q; j++) {
        const c = cross(i, j);
        gxx.re[i * q + j] = c.re[k];
        gxx.im[i * q + j] = c.im[k];
        gxx.re[j * q + i] = c.re[k];
        gxx.im[j * q + i] = -c.im[k];
      }
    }
    const eigen = hermitianEigen(gxx);
    const { values } = eigen;
    const largest = values[0], smallest = values[q - 1];
    if (!(largest > 0) || !(smallest > SINGULAR * largest)) {
      singular.push(estimate.frequencies[k]);
      continue;
    }
    condition[k] = largest / smallest;
    const inverse = values.map((v) => 1 / v);
    for (let c = 0; c < q; c++) principal[c][k] = values[c];
    // (Gxx⁻¹)ᵢᵢ = Σₖ |Vᵢₖ|²/λₖ, for the conditioned input spectra.
    const { re: vre, im: vim } = eigen.vectors;
    for (let i = 0; i < q; i++) {
      let d = 0;
      for (let c = 0; c < q; c++) {
        d += (vre[i * q + c] ** 2 + vim[i * q + c] ** 2) * inverse[c];
      }
      conditioned[i][k] = 1 / d;
    }
    for (let o = 0; o < p; o++) {
      for (let i = 0; i < q; i++) {
        const g = cross(i, q + o);
        gRe[i] = g.re[k];
        gIm[i] = g.im[k];
      }
      const gyy = estimate.auto[q + o][k];
      const components = eigenComponents(eigen, gRe, gIm);
      const solution = fromEigenComponents(eigen, components, inverse);
      let explained = 0;
      for (let c = 0; c < q; c++) {
        const share = (components.re[c] ** 2 + components.im[c] ** 2) / values[c];
        explained += share;
        virtual[o][c][k] = share / gyy;
      }
      multiple[o][k] = explained / gyy;
      const noise = gyy - explained;
      residuals[o][k] = noise;
      for (let i = 0; i < q; i++) {
        h[o][i].re[k] = solution.re[i];
        h[o][i].im[k] = solution.im[i];
        const through = (solution.re[i] ** 2 + solution.im[i] ** 2) * conditioned[i][k];
        partial[o][i][k] = through / (through + noise);
      }
    }
  }
  if (singular.length > 0) {
    throw new QuiverError(
      `the inputs ${inputs.map((c) => `"${c.name}"`).join(", ")} are linearly dependent at ${
        ranges(singular)
      } (their cross-spectral matrix is singular): H is undefined there; drop an input that copies or sums the others`,
    );
  }
  return {
    frequencies: estimate.frequencies,
    inputs,
    outputs,
    h,
    multipleCoherence: multiple,
    partialCoherence: partial,
    conditionedInputs: conditioned,
    residuals,
    condition,
    principal,
    virtualCoherence: virtual,
    averages: estimate.averages,
  };
}

/** "a–b Hz" ranges of consecutive lines, at most three named. */
function ranges(frequencies: readonly number[], df?: number): string {
  const step = df ?? (frequencies.length > 1 ? frequencies[1] - frequencies[0] : 1);
  const spans: [number, number][] = [];
  for (const f of frequencies) {
    const last = spans[spans.length - 1];
    if (last !== undefined && f - last[1] <= step * 1.5) last[1] = f;
    else spans.push([f, f]);
  }
  const shown = spans.slice(0, 3).map(([a, b]) =>
    a === b ? `${formatNumber(a, 6)} Hz` : `${formatNumber(a, 6)}–${formatNumber(b, 6)} Hz`
  );
  return `${shown.join(", ")}${spans.length > 3 ? `, … (${spans.length} ranges)` : ""}`;
}

/** Lines where `values` passes `test`, as ranges, or undefined when none does. */
function flaggedRanges(
  frequencies: Float64Array,
  values: Float64Array,
  test: (v: number) => boolean,
  df: number,
): string | undefined {
  const found: number[] = [];
  for (let k = 1; k < values.length; k++) if (test(values[k])) found.push(frequencies[k]);
  return found.length === 0 ? undefined : ranges(found, df);
}

function tables(
  frf: MultipleInputFrf,
  estimate: SpectralEstimate,
  options: MultipleInputOptions,
  length: number,
  signalWarnings: string[],
): MultipleInputResult {
  const { frequencies, inputs, outputs } = frf;
  const f: TableColumn = { name: "frequency_hz", unit: "", values: frequencies };
  const warnings: string[] = [
    ...(estimate.averages === 1 ? [SINGLE_AVERAGE_WARNING] : []),
    ...signalWarnings,
  ];
  const illConditioned = flaggedRanges(
    frequencies,
    frf.condition,
    (c) => c > ILL_CONDITIONED,
    estimate.df,
  );
  if (illConditioned !== undefined) {
    warnings.push(
      `the inputs are nearly coherent (condition number of Gxx above ${ILL_CONDITIONED}) at ${illConditioned}: H there is sensitive to noise; see gxx_condition and the principal components`,
    );
  }
  if (estimate.averages > 1) {
    outputs.forEach((o, n) => {
      const low = flaggedRanges(
        frequencies,
        frf.multipleCoherence[n],
        (c) => c < LOW_COHERENCE,
        estimate.df,
      );
      if (low !== undefined) {
        warnings.push(
          `multiple coherence of "${o.name}" is below ${LOW_COHERENCE} at ${low}: the inputs explain less than half of it there (other sources, noise or nonlinearity)`,
        );
      }
    });
  }
  const columns: TableColumn[] = [f];
  outputs.forEach((o, n) => {
    inputs.forEach((x, i) => {
      const name = pairName(o.name, x.name);
      const unit = frfUnit(o.unit, x.unit);
      const { re, im } = frf.h[n][i];
      columns.push(
        { name: `${name}_re`, unit, values: re },
        { name: `${name}_im`, unit, values: im },
        { name: `${name}_mag`, unit, values: re.map((v, k) => Math.hypot(v, im[k])) },
        {
          name: `${name}_phase_deg`,
          unit: "deg",
          values: re.map((v, k) => (Math.atan2(im[k], v) * 180) / Math.PI),
        },
      );
    });
    columns.push({
      name: `${o.name}_multiple_coherence`,
      unit: "",
      values: frf.multipleCoherence[n],
    });
  });
  columns.push({ name: "gxx_condition", unit: "", values: frf.condition });
  const common = {
    estimator: "h1",
    inputs: inputs.map((c) => ({ name: c.name, unit: c.unit })),
    outputs: outputs.map((c) => ({ name: c.name, unit: c.unit })),
    column_naming: "output/input_re|im|mag|phase_deg; output_multiple_coherence",
    ill_conditioned_above: ILL_CONDITIONED,
    ...segmentMetadata({ ...estimate, overlap: options.overlap ?? 0.5 }, FRF_SEGMENT_KEYS),
    record_samples: length,
    method: "Bendat & Piersol, Random Data, 4th ed., ch. 7 (multiple-input/output relations)",
    warnings,
  };
  const partialColumns: TableColumn[] = [f];
  outputs.forEach((o, n) => {
    inputs.forEach((x, i) => {
      partialColumns.push({
        name: `${pairName(o.name, x.name)}_partial_coherence`,
        unit: "",
        values: frf.partialCoherence[n][i],
      });
    });
    partialColumns.push({
      name: `${o.name}_residual`,
      unit: `${o.unit}^2/Hz`,
      values: frf.residuals[n],
    });
  });
  inputs.forEach((x, i) => {
    partialColumns.push({
      name: `${x.name}_conditioned`,
      unit: `${x.unit}^2/Hz`,
      values: frf.conditionedInputs[i],
    });
  });
  const unitsAgree = inputs.every((c) => c.unit === inputs[0].unit);
  const principalColumns: TableColumn[] = [f];
  inputs.forEach((_, c) => {
    principalColumns.push({
      name: `pc${c + 1}`,
      unit: unitsAgree ? `${inputs[0].unit}^2/Hz` : "mixed^2/Hz",
      values: frf.principal[c],
    });
  });
  outputs.forEach((o, n) => {
    inputs.forEach((_, c) => {
      principalColumns.push({
        name: `${pairName(o.name, `pc${c + 1}`)}_virtual_coherence`,
        unit: "",
        values: frf.virtualCoherence[n][c],
      });
    });
  });
  const principalWarnings = unitsAgree ? warnings : [
    ...warnings,
    `the inputs have different units (${
      inputs.map((c) => `${c.name} [${c.unit}]`).join(", ")
    }): the principal components mix them and depend on the choice of units`,
  ];
  return {
    frf,
    warnings,
    table: { columns, metadata: { analysis: "frf_matrix", ...common } },
    partialTable: {
      columns: partialColumns,
      metadata: {
        analysis: "frf_partial",
        ...common,
        column_naming:
          "output/input_partial_coherence (each input conditioned on all the other inputs); output_residual (Gyy minus what all inputs explain); input_conditioned (Gii with what the other inputs explain removed)",
      },
    },
    principalTable: {
      columns: principalColumns,
      metadata: {
        analysis: "frf_principal",
        ...common,
        column_naming:
          "pcK: K-th largest eigenvalue of Gxx (a singular value, in the inputs' unit squared per Hz); output/pcK_virtual_coherence",
        warnings: principalWarnings,
      },
    },
  };
}
