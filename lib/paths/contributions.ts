/**
 * Transfer-path contributions at a receiver from operating data and measured
 * transfer functions: the analysis behind `quiver paths`.
 *
 * Each path i carries a force (or volume velocity) Fᵢ through a measured
 * transfer Hᵢ (target per force) to the target p. Operating data are random,
 * so contributions are formed from cross spectra with the measured target as
 * the one phase reference:
 *
 *   cᵢ = Hᵢ·E[Fᵢ·p*]/√Gpp,   E[Fᵢ·p*] = conj(G_Fp) (G_ab = E[a*·b], the core's convention)
 *
 * a complex spectrum in the target's unit per √Hz whose phase is relative to
 * p. The cᵢ add as complex numbers, so correlated paths add right; their sum
 * is E[p̂·p*]/√Gpp, which equals √Gpp when the paths explain p (a path left
 * out, or target noise no path carries, shows as a shortfall).
 *
 * - `direct`: the Fᵢ are channels of the operating recording.
 * - `inverse` (matrix inversion): the Fᵢ are estimated from m ≥ q indicator
 *   responses a and the measured indicator FRF matrix M (a per force),
 *   F = M⁺·a, so E[F·p*] = M⁺·E[a·p*]; M⁺ is a regularised pseudo-inverse from
 *   the eigen-decomposition of MᴴM = V·Σ²·Vᴴ: M⁺ = V·diag(φₖ)·Vᴴ·Mᴴ with
 *   φₖ = 1/σₖ² (none), 1/σₖ² for the K largest σ and 0 beyond (svd:K), or
 *   1/(σₖ² + (λ·σ₁)²) (tikhonov:λ, λ relative to the largest singular value
 *   at each line). See e.g. van der Seijs, de Klerk & Rixen, "General
 *   framework for transfer path analysis", MSSP 68–69 (2016), section on
 *   matrix-inverse (classical) TPA.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { formatNumber } from "../format_number.ts";
import { channelIndices } from "../io/recording.ts";
import { asStream, type RecordingSource } from "../io/recording_stream.ts";
import { spectralEstimateOf } from "../dsp/spectral_pipeline.ts";
import type { Table, TableColumn } from "../io/table.ts";
import { segmentMetadata } from "../dsp/segment_metadata.ts";
import type { PathsMetadata } from "./paths_metadata.ts";
import { scaleFactor, type Scaling, type SpectralEstimate } from "../dsp/spectral_core.ts";
import type { DetrendMode } from "../dsp/detrend.ts";
import type { WindowName } from "../dsp/windows.ts";
import { bandPowersFromDensity } from "../acoustics/band_synthesis.ts";
import { type Band, type BandFraction, bandsInRange } from "../acoustics/bands.ts";
import { levelDb, levelUnit, standardReference } from "../acoustics/levels.ts";
import type { Weighting } from "../acoustics/weighting.ts";
import type { FrfChannel, FrfData } from "../frf/frf_data.ts";
import { frfUnit } from "../frf/forms.ts";
import {
  type ComplexSquare,
  eigenComponents,
  fromEigenComponents,
  hermitianEigen,
} from "../frf/hermitian.ts";
import { didYouMean } from "../nearest_name.ts";

/** How the forces are known. */
export const PATH_METHODS = ["direct", "inverse"] as const;

/** `direct` or `inverse`. */
export type PathMethod = typeof PATH_METHODS[number];

/** Regularisation of the inverse method's pseudo-inverse. */
export type Regularisation =
  | { readonly kind: "none" }
  | { readonly kind: "svd"; readonly keep: number }
  | { readonly kind: "tikhonov"; readonly lambda: number };

/**
 * Parses `none`, `svd:K` or `tikhonov:λ`.
 *
 * @throws {QuiverError} (usage) for anything else.
 *
 * @example
 * ```ts
 * import { parseRegularisation } from "./contributions.ts";
 * const r = parseRegularisation("tikhonov:0.01");
 * if (r.kind !== "tikhonov" || r.lambda !== 0.01) throw new Error();
 * ```
 */
export function parseRegularisation(text: string): Regularisation {
  if (text === "none") return { kind: "none" };
  const svd = /^svd:(\d+)$/.exec(text);
  if (svd !== null && Number(svd[1]) >= 1) return { kind: "svd", keep: Number(svd[1]) };
  const tik = /^tikhonov:([0-9.eE+-]+)$/.exec(text);
  if (tik !== null && Number(tik[1]) > 0 && Number.isFinite(Number(tik[1]))) {
    return { kind: "tikhonov", lambda: Number(tik[1]) };
  }
  throw new QuiverError(
    `regularisation "${text}": expected none, svd:K (keep the K largest singular values, K ≥ 1) or tikhonov:λ (λ > 0, relative to the largest singular value)`,
    {},
    "usage",
  );
}

/** Options of {@linkcode pathContributions}. */
export interface PathOptions {
  /** `direct` (forces measured) or `inverse` (forces from indicators). Default `"direct"`. */
  method?: PathMethod;
  /**
   * The paths' names, one per transfer. `direct`: the force channels of the
   * operating recording. `inverse`: labels of the estimated forces. Required.
   */
  references: readonly string[];
  /** The receiver channel of the operating recording (e.g. a cabin microphone). Required. */
  target: string;
  /**
   * One FRF set per path, in the order of `references`: the target's response
   * per that path's force (a response named like the target, or the only
   * response), and for `inverse` every indicator's response too. Required.
   */
  transfers: readonly FrfData[];
  /** `inverse`: indicator channels (operating recording; responses in the transfers). */
  indicators?: readonly string[];
  /** `inverse`: regularisation. Default none. */
  regularise?: Regularisation;
  /** Scaling of the per-line columns. Default `"spectrum"` (RMS per line). */
  scaling?: Scaling;
  /** Overlap fraction. Default 0.5. */
  overlap?: number;
  /** Window. Default `"hann"`. */
  window?: WindowName;
  /** Detrend. Default `"mean"`. */
  detrend?: DetrendMode;
  /** Band width for the per-band table: 1 (octave) or 3 (third-octave). Default 3. */
  bandFraction?: BandFraction;
  /** Weighting of band levels and rankings. Default A for a target in Pa, Z otherwise. */
  weighting?: Weighting;
}

/** Contributions of every path, typed. */
export interface PathContributions {
  /** Line frequencies, Hz (those of the transfers). */
  readonly frequencies: Float64Array;
  /** Path names. */
  readonly paths: readonly string[];
  /** Contribution of each path, complex, target unit per √Hz, phase relative to the target. */
  readonly contributions: readonly { re: Float64Array; im: Float64Array }[];
  /** The measured target's density Gpp, unit²/Hz. */
  readonly target: Float64Array;
  /** Condition number of the indicator FRF matrix (inverse method). */
  readonly indicatorCondition?: Float64Array;
  /** Line spacing, Hz. */
  readonly df: number;
}

/** The analysis's tables. */
export interface PathResult {
  /** Typed result. */
  readonly contributions: PathContributions;
  /** Per-line table. */
  readonly table: Table<PathsMetadata>;
  /** Per-band levels of each path, the sum and the target. */
  readonly bandTable: Table;
  /** Warnings, also in the metadata. */
  readonly warnings: readonly string[];
}

/** Below σq²/σ1² of this, the indicator matrix is singular to working precision. */
const SINGULAR = 1e-26;

/**
 * Contributions of each path at the target, their complex sum, the measured
 * target and the synthesis error.
 *
 * @throws {QuiverError} for unknown channels, transfers on different
 * frequency axes or a line spacing the recording's rate cannot give, units
 * that do not agree, or (inverse) fewer indicators than paths.
 *
 * @example
 * ```ts
 * import { pathContributions } from "./contributions.ts";
 * // One path: p = 3·F exactly; the contribution is the whole target.
 * let s = 7;
 * const r = () => ((s = (s * 16807) % 2147483647) / 2147483647) - 0.5;
 * const force = new Float64Array(16384).map(r);
 * const rec = { rate: 512, startTime: 0, channels: [
 *   { name: "mount", unit: "N", data: force }, { name: "mic", unit: "Pa", data: force.map((v) => 3 * v) }] };
 * const frequencies = new Float64Array(129).map((_, k) => k * 2);
 * const transfer = { frequencies, channels: [{ name: "mic", unit: "Pa/N",
 *   re: frequencies.map(() => 3), im: new Float64Array(129), magnitude: frequencies.map(() => 3) }] };
 * const { table } = await pathContributions(rec, { references: ["mount"], target: "mic", transfers: [transfer] });
 * const err = table.columns.find((c) => c.name === "synthesis_error_db")!.values;
 * if (Math.abs(err[40]) > 1e-9) throw new Error();
 * ```
 */
export async function pathContributions(
  source: RecordingSource,
  options: PathOptions,
): Promise<PathResult> {
  const stream = asStream(source);
  const method = options.method ?? "direct";
  const { references, target, transfers } = options;
  const q = references.length;
  if (q === 0) throw new RangeError("name at least one path");
  if (transfers.length !== q) {
    throw new QuiverError(
      `${q} path(s) (${
        references.join(", ")
      }) but ${transfers.length} transfer file(s): give one per path, in the same order`,
      {},
      "usage",
    );
  }
  const indicators = options.indicators ?? [];
  const warnings: string[] = [];
  if (method === "inverse") {
    if (indicators.length < q) {
      throw new QuiverError(
        `the inverse method needs at least as many indicators as paths: ${indicators.length} indicator(s) for ${q} path(s)`,
        {},
        "usage",
      );
    }
    if (indicators.length < 2 * q) {
      warnings.push(
        `${indicators.length} indicators for ${q} forces: fewer than twice as many, which common practice asks for a robust inversion; check the synthesis error`,
      );
    }
  } else if (indicators.length > 0 || options.regularise !== undefined) {
    throw new QuiverError(
      "indicators and regularisation belong to the inverse method (--method inverse)",
      {},
      "usage",
    );
  }
  // The transfers' common frequency axis fixes the block.
  const frequencies = transfers[0].frequencies;
  transfers.forEach((t, i) => {
    const same = t.frequencies.length === frequencies.length &&
      t.frequencies.every((f, k) => Math.abs(f - frequencies[k]) <= 1e-9 * Math.max(1, f));
    if (!same) {
      throw new QuiverError(
        `the transfer of path "${references[i]}" has other frequencies than that of "${
          references[0]
        }": measure (or export) every transfer on one line spacing`,
      );
    }
  });
  const df = frequencies.length > 1 ? frequencies[1] - frequencies[0] : NaN;
  const block = Math.round(stream.rate / df);
  if (!(block >= 8) || Math.abs(stream.rate / block - df) > 1e-6 * df) {
    throw new QuiverError(
      `the transfers' line spacing ${formatNumber(df, 6)} Hz is not the sample rate ${
        formatNumber(stream.rate, 8)
      } Hz over a whole block: analyse the transfers with a block that divides the operating rate`,
    );
  }
  const lineOf = Array.from(frequencies, (f) => Math.round(f / df));
  if (lineOf.some((k, i) => Math.abs(k * df - frequencies[i]) > 1e-6 * df || k > block / 2)) {
    throw new QuiverError(
      `the transfers' frequencies are not whole multiples of ${formatNumber(df, 6)} Hz up to ${
        formatNumber(stream.rate / 2, 8)
      } Hz`,
    );
  }
  const measured = method === "direct" ? references : indicators;
  const names = [...measured, target];
  const indices = channelIndices(stream.channels, names);
  const channels = indices.map((i) => stream.channels[i]);
  const targetChannel = channels[channels.length - 1];
  const m = measured.length;
  const pairs = Array.from({ length: m }, (_, i) => [i, m] as const);
  const read = await spectralEstimateOf(stream, indices, {
    rate: stream.rate,
    block,
    overlap: options.overlap,
    window: options.window,
    detrend: options.detrend,
    pairs,
  });
  warnings.push(...read.warnings);
  const estimate = read.estimate;

  // The target's transfer of each path, and (inverse) the indicators'.
  const responseOf = (t: FrfData, name: string, path: string, alone: boolean): FrfChannel => {
    const found = t.channels.find((c) => c.name === name) ??
      (alone && t.channels.length === 1 ? t.channels[0] : undefined);
    if (found === undefined || found.re === undefined || found.im === undefined) {
      throw new QuiverError(
        `the transfer of path "${path}" has no complex FRF of "${name}"${
          didYouMean(name, t.channels.map((c) => c.name))
        } (responses: ${t.channels.map((c) => c.name).join(", ")})`,
      );
    }
    return found;
  };
  const toTarget = transfers.map((t, i) => responseOf(t, target, references[i], true));
  toTarget.forEach((h, i) => {
    const inputUnit = inputUnitOf(transfers[i]) ??
      (method === "direct" ? channels[i].unit : undefined);
    if (
      inputUnit !== undefined && h.unit !== "" && h.unit !== frfUnit(targetChannel.unit, inputUnit)
    ) {
      throw new QuiverError(
        `the transfer of path "${
          references[i]
        }" is in [${h.unit}], but the target "${target}" is in [${targetChannel.unit}] and the force in [${inputUnit}]: expected [${
          frfUnit(targetChannel.unit, inputUnit)
        }]`,
      );
    }
    if (method === "direct" && inputUnit !== undefined && inputUnit !== channels[i].unit) {
      throw new QuiverError(
        `the transfer of path "${
          references[i]
        }" is per [${inputUnit}], but the operating channel is in [${channels[i].unit}]`,
      );
    }
  });
  const indicatorFrf = method === "inverse"
    ? transfers.map((t, i) => indicators.map((a) => responseOf(t, a, references[i], false)))
    : [];

  const lines = frequencies.length;
  const contributions = references.map(() => ({
    re: new Float64Array(lines),
    im: new Float64Array(lines),
  }));
  const gpp = new Float64Array(lines);
  const condition = method === "inverse" ? new Float64Array(lines) : undefined;
  const singular: number[] = [];
  const regularise = options.regularise ?? { kind: "none" };
  if (regularise.kind === "svd" && regularise.keep > q) {
    throw new QuiverError(
      `svd:${regularise.keep} keeps more singular values than there are forces (${q})`,
      {},
      "usage",
    );
  }
  // E[force·p*] per path at one line, then cᵢ = Hᵢ·E[Fᵢ·p*]/√Gpp.
  const forceRe = new Float64Array(q), forceIm = new Float64Array(q);
  const mtm: ComplexSquare = { n: q, re: new Float64Array(q * q), im: new Float64Array(q * q) };
  for (let n = 0; n < lines; n++) {
    const k = lineOf[n];
    const pp = estimate.auto[m][k];
    gpp[n] = pp;
    if (method === "direct") {
      for (let i = 0; i < q; i++) {
        forceRe[i] = estimate.cross[i].re[k];
        forceIm[i] = -estimate.cross[i].im[k]; // conj(G_Fp) = E[F·p*]
      }
    } else {
      // M (indicators × forces) at this line; b = E[a·p*]; F = M⁺·b.
      const mRe = (a: number, i: number) => indicatorFrf[i][a].re![n];
      const mIm = (a: number, i: number) => indicatorFrf[i][a].im![n];
      for (let i = 0; i < q; i++) {
        for (let j = 0; j < q; j++) {
          let sr = 0, si = 0; // Σₐ conj(M_ai)·M_aj
          for (let a = 0; a < m; a++) {
            sr += mRe(a, i) * mRe(a, j) + mIm(a, i) * mIm(a, j);
            si += mRe(a, i) * mIm(a, j) - mIm(a, i) * mRe(a, j);
          }
          mtm.re[i * q + j] = sr;
          mtm.im[i * q + j] = si;
        }
      }
      const eigen = hermitianEigen(mtm);
      const s2 = eigen.values;
      if (!(s2[0] > 0) || !(s2[q - 1] > SINGULAR * s2[0])) {
        if (regularise.kind === "none") singular.push(frequencies[n]);
      }
      (condition as Float64Array)[n] = Math.sqrt(s2[0] / s2[q - 1]);
      const factors = new Float64Array(q);
      for (let c = 0; c < q; c++) {
        factors[c] = regularise.kind === "none"
          ? 1 / s2[c]
          : regularise.kind === "svd"
          ? (c < regularise.keep ? 1 / s2[c] : 0)
          : 1 / (s2[c] + regularise.lambda ** 2 * s2[0]);
      }
      // Mᴴ·b, b = E[a·p*] = conj(G_ap).
      const bRe = new Float64Array(q), bIm = new Float64Array(q);
      for (let i = 0; i < q; i++) {
        let sr = 0, si = 0;
        for (let a = 0; a < m; a++) {
          const gr = estimate.cross[a].re[k], gi = -estimate.cross[a].im[k];
          sr += mRe(a, i) * gr + mIm(a, i) * gi;
          si += mRe(a, i) * gi - mIm(a, i) * gr;
        }
        bRe[i] = sr;
        bIm[i] = si;
      }
      const force = fromEigenComponents(eigen, eigenComponents(eigen, bRe, bIm), factors);
      forceRe.set(force.re);
      forceIm.set(force.im);
    }
    const norm = 1 / Math.sqrt(pp);
    for (let i = 0; i < q; i++) {
      const hr = toTarget[i].re![n], hi = toTarget[i].im![n];
      contributions[i].re[n] = (hr * forceRe[i] - hi * forceIm[i]) * norm;
      contributions[i].im[n] = (hr * forceIm[i] + hi * forceRe[i]) * norm;
    }
  }
  if (singular.length > 0) {
    throw new QuiverError(
      `the indicator FRF matrix is singular at ${singular.length} line(s) (from ${
        formatNumber(singular[0], 6)
      } Hz): the indicators cannot tell the forces apart there; add indicators or regularise (--regularise svd:K or tikhonov:λ)`,
    );
  }
  const result: PathContributions = {
    frequencies,
    paths: references,
    contributions,
    target: gpp,
    df,
    ...(condition !== undefined ? { indicatorCondition: condition } : {}),
  };
  return tablesOf(result, {
    estimate,
    options,
    method,
    regularise,
    targetChannel,
    warnings,
  });
}

/** The input unit a quiver FRF's metadata names, if any. */
function inputUnitOf(t: FrfData): string | undefined {
  const input = t.metadata?.input;
  if (typeof input === "object" && input !== null && "unit" in input) {
    const unit = (input as { unit: unknown }).unit;
    return typeof unit === "string" ? unit : undefined;
  }
  return undefined;
}

function tablesOf(
  result: PathContributions,
  context: {
    estimate: SpectralEstimate;
    options: PathOptions;
    method: PathMethod;
    regularise: Regularisation;
    targetChannel: { name: string; unit: string };
    warnings: string[];
  },
): PathResult {
  const { estimate, options, method, regularise, targetChannel, warnings } = context;
  const { frequencies, paths, contributions, target, df } = result;
  const scaling = options.scaling ?? "spectrum";
  const factor = Math.sqrt(scaleFactor(estimate, scaling));
  const unit = scaling === "density" ? `${targetChannel.unit}/Hz^0.5` : targetChannel.unit;
  const lines = frequencies.length;
  const sumRe = new Float64Array(lines), sumIm = new Float64Array(lines);
  for (const c of contributions) {
    for (let n = 0; n < lines; n++) {
      sumRe[n] += c.re[n];
      sumIm[n] += c.im[n];
    }
  }
  const magnitude = (re: Float64Array, im: Float64Array) =>
    re.map((v, n) => Math.hypot(v, im[n]) * factor);
  const phase = (re: Float64Array, im: Float64Array) =>
    re.map((v, n) => (Math.atan2(im[n], v) * 180) / Math.PI);
  const measured = target.map((g) => Math.sqrt(g) * factor);
  const sum = magnitude(sumRe, sumIm);
  const columns: TableColumn[] = [{ name: "frequency_hz", unit: "", values: frequencies }];
  paths.forEach((name, i) => {
    columns.push(
      {
        name: `${name}_contribution`,
        unit,
        values: magnitude(contributions[i].re, contributions[i].im),
      },
      {
        name: `${name}_phase_deg`,
        unit: "deg",
        values: phase(contributions[i].re, contributions[i].im),
      },
    );
  });
  columns.push(
    { name: "sum_of_paths", unit, values: sum },
    { name: "sum_phase_deg", unit: "deg", values: phase(sumRe, sumIm) },
    { name: "target_measured", unit, values: measured },
    {
      name: "synthesis_error_db",
      unit: "dB",
      values: sum.map((s, n) => 20 * Math.log10(s / measured[n])),
    },
  );
  if (result.indicatorCondition !== undefined) {
    columns.push({ name: "indicator_condition", unit: "", values: result.indicatorCondition });
  }

  // Band levels and rankings from the densities |cᵢ|² (band power = Σ density·df).
  const weighting: Weighting = options.weighting ??
    (targetChannel.unit === "Pa" ? "A" : "Z");
  const reference = standardReference(targetChannel.unit) ?? 1; // stated in the level unit

  const fraction = options.bandFraction ?? 3;
  const top = frequencies[lines - 1];
  const low = Math.max(frequencies[0], df);
  const bands = top > low * 1.5 ? bandsInRange(fraction, low * 1.12, top / 1.12) : [];
  // Every density once on the full 0 … top axis (the transfers' lines may start above 0 Hz),
  // then band powers from it: per-band levels, and the ranking bands in one call per path.
  const fullAxis = new Float64Array(Math.round(top / df) + 1).map((_, k) => k * df);
  const onFullAxis = (value: (n: number) => number) => {
    const d = new Float64Array(fullAxis.length);
    frequencies.forEach((f, n) => d[Math.round(f / df)] = value(n));
    return d;
  };
  const powers = (density: Float64Array, wanted: readonly Band[]) =>
    bandPowersFromDensity({ frequencies: fullAxis, density, df }, wanted, weighting).power;
  const pathDensities = contributions.map((c) => onFullAxis((n) => c.re[n] ** 2 + c.im[n] ** 2));
  const sumDensity = onFullAxis((n) => sumRe[n] ** 2 + sumIm[n] ** 2);
  const levelName = levelUnit(weighting, reference, targetChannel.unit);
  const inDb = (power: Float64Array) => power.map((p) => levelDb(p, reference));
  const bandColumns: TableColumn[] = [
    { name: "band_hz", unit: "Hz", values: new Float64Array(bands.map((b) => b.nominalHz)) },
    ...paths.map((name, i) => ({
      name: `${name}_level`,
      unit: levelName,
      values: inDb(powers(pathDensities[i], bands)),
    })),
    { name: "sum_of_paths_level", unit: levelName, values: inDb(powers(sumDensity, bands)) },
    {
      name: "target_level",
      unit: levelName,
      values: inDb(powers(onFullAxis((n) => target[n]), bands)),
    },
  ];
  // Rankings: the analysed range whole, then each octave band in it.
  const whole = { index: 0, centerHz: NaN, nominalHz: NaN, lowerHz: low - df / 2, upperHz: top };
  const octaves = top > low * 2 ? bandsInRange(1, low * 1.5, top / 1.5) : [];
  const rankBands: Band[] = [whole, ...octaves];
  const energies = pathDensities.map((d) => powers(d, rankBands));
  const ranking = rankBands.map((band, j) => {
    const energy = energies.map((e) => e[j]);
    const total = energy.reduce((sum, e) => sum + e, 0);
    return {
      band: j === 0 ? "analysed range" : `${band.nominalHz} Hz octave`,
      from_hz: band.lowerHz,
      to_hz: band.upperHz,
      paths: paths
        .map((name, i) => ({
          name,
          level_db: levelDb(energy[i], reference),
          share_percent: total > 0 ? (100 * energy[i]) / total : null,
        }))
        .sort((a, b) => b.level_db - a.level_db),
    };
  });
  const metadata: PathsMetadata = {
    analysis: "paths",
    method,
    paths: paths.map((name) => ({ name })),
    target: { name: targetChannel.name, unit: targetChannel.unit },
    ...(method === "inverse"
      ? { indicators: options.indicators, regularisation: regularisationText(regularise) }
      : {}),
    scaling,
    phase_reference: `the measured target "${targetChannel.name}"`,
    weighting,
    level_unit: levelName,
    ranking,
    // df: the transfers' own line spacing (checked against the block's above).
    ...segmentMetadata({ ...estimate, df }, ["rate_hz", "block", "df_hz", "averages", "window"]),
    method_source: method === "inverse"
      ? "matrix-inverse TPA: forces from indicators by a regularised pseudo-inverse (e.g. van der Seijs, de Klerk & Rixen, MSSP 68-69, 2016)"
      : "direct forces; contributions Hᵢ·E[Fᵢ·p*]/√Gpp with the target as phase reference",
    warnings,
  };
  return {
    contributions: result,
    warnings,
    table: { columns, metadata },
    bandTable: {
      columns: bandColumns,
      metadata: { ...metadata, analysis: "paths_bands", band_fraction: fraction },
    },
  };
}

function regularisationText(r: Regularisation): string {
  return r.kind === "none"
    ? "none (plain pseudo-inverse)"
    : r.kind === "svd"
    ? `truncated SVD keeping the ${r.keep} largest singular value(s)`
    : `Tikhonov, λ = ${r.lambda} of the largest singular value at each line`;
}
