/**
 * Test against simulation: the analysis behind `compare`. Both curves go on
 * the common grid (align.ts); per line the difference in dB; in summary the
 * FRAC, the matched peaks (and those of each side left unmatched) and, on
 * request, per-band level differences.
 *
 * Power or amplitude: dB = 10·log10 of a ratio of power quantities and
 * 20·log10 of a ratio of root-power quantities (ISO 80000-3,
 * IEC 60027-3:2002). The quantity is the caller's (`quantity`), else what
 * either curve's metadata or unit says (curve_input.ts; the two must agree),
 * else amplitude with a warning. `quantity_from` in the summary says which.
 *
 * Band differences: for each IEC 61260-1 band on the grid, the energy of
 * each curve in the band (Σ|H|² over its lines; for power quantities Σ G,
 * i.e. the same sum of the values) and their ratio in dB.
 *
 * @module
 */
import type { Table } from "../io/table.ts";
import type { CompareMetadata } from "./compare_metadata.ts";
import { type BandFraction, bandsInRange } from "../acoustics/bands.ts";
import { alignCurves } from "./align.ts";
import { type Curve, quantityOfUnit, withQuantity } from "./curve_input.ts";
import { QuiverError } from "../errors.ts";
import { frac } from "./frac.ts";
import { matchUnits } from "./unit_match.ts";
import { matchPeaks, type PeakMatch, type UnmatchedPeak } from "./peak_match.ts";

/** Options of {@linkcode compareCurves}. */
export interface CompareOptions {
  /** Lowest frequency, Hz. Default: the overlap's start. */
  minHz?: number;
  /** Highest frequency, Hz. Default: the overlap's end. */
  maxHz?: number;
  /** Band designator for per-band differences. Default: none. */
  bands?: BandFraction;
  /** Prominence threshold for peaks, dB. Default 6. */
  prominenceDb?: number;
  /**
   * Declares both curves power or amplitude quantities. Default: from the
   * curves' metadata or units, else amplitude with a warning.
   */
  quantity?: "power" | "amplitude";
}

/** The comparison's summary (the `--summary-out` JSON). */
export interface ComparisonSummary {
  readonly frac: number;
  readonly frac_on: "complex" | "magnitude";
  readonly peaks: readonly PeakMatch[];
  /** Test peaks that no simulation peak matches. */
  readonly test_only_peaks: readonly UnmatchedPeak[];
  /** Simulation peaks that no test peak matches. */
  readonly simulation_only_peaks: readonly UnmatchedPeak[];
  readonly bands?: readonly {
    center_hz: number;
    nominal_hz: number;
    test_db: number;
    simulation_db: number;
    difference_db: number;
  }[];
  readonly grid: { from: "test" | "simulation"; min_hz: number; max_hz: number; lines: number };
  readonly quantity: "power" | "amplitude";
  /** Where the quantity came from, in words. */
  readonly quantity_from: string;
  readonly mean_abs_difference_db: number;
  /** What the reader should know (the quantity taken by default). */
  readonly warnings: readonly string[];
}

/** The comparison table and summary. */
export interface ComparisonResult {
  /** frequency_hz, test, simulation, difference_db. */
  readonly table: Table<CompareMetadata>;
  /** Summary. */
  readonly summary: ComparisonSummary;
}

/**
 * Compares a test curve with a simulation, after putting the simulation in
 * the test's unit (unit_match.ts).
 *
 * @throws {QuiverError} when the curves barely overlap or are different quantities.
 *
 * @example
 * ```ts
 * import { compareCurves } from "./comparison.ts";
 * const f = new Float64Array(100).map((_, k) => 1 + k);
 * const c = (m: Float64Array) => ({ frequencies: f, magnitude: m, quantity: "amplitude" as const, unit: "", column: "x" });
 * const r = compareCurves(c(f.map(() => 1)), c(f.map(() => 2)));
 * if (Math.abs(r.summary.mean_abs_difference_db - 6.0206) > 1e-3 || Math.abs(r.summary.frac - 1) > 1e-12) throw new Error();
 * ```
 */
export function compareCurves(
  testAsRead: Curve,
  simulationAsRead: Curve,
  options: CompareOptions = {},
): ComparisonResult {
  const { quantity, from: quantityFrom, warnings } = resolveQuantity(
    testAsRead,
    simulationAsRead,
    options.quantity,
  );
  warnings.push(...missingUnitWarnings(testAsRead, simulationAsRead));
  const { test, simulation, conversion } = matchUnits(
    withQuantity(testAsRead, quantity.test.quantity, quantity.test.source),
    withQuantity(simulationAsRead, quantity.simulation.quantity, quantity.simulation.source),
  );
  const aligned = alignCurves(test, simulation, options.minHz, options.maxHz);
  const perDecade = test.quantity === "power" ? 10 : 20;
  const f = aligned.frequencies;
  const t = aligned.test.magnitude;
  const s = aligned.simulation.magnitude;
  const difference = s.map((v, k) => perDecade * Math.log10(v / t[k]));
  const finite = Array.from(difference).filter(Number.isFinite);
  const f0 = f[0], f1 = f[f.length - 1];
  const inRange = (c: Curve) => {
    const keep = Array.from(c.frequencies).map((v, k) => [v, c.magnitude[k]]).filter(([v]) =>
      v >= f0 && v <= f1
    );
    return [
      new Float64Array(keep.map(([v]) => v)),
      new Float64Array(keep.map(([, m]) => m)),
    ] as const;
  };
  const [tf, tm] = inRange(test);
  const [sf, sm] = inRange(simulation);
  const peaks = matchPeaks({ frequencies: tf, magnitude: tm }, { frequencies: sf, magnitude: sm }, {
    prominenceDb: options.prominenceDb,
    dbPerDecade: perDecade,
    common: { frequencies: f, test: t, simulation: s },
  });
  const { value, complex } = frac(aligned.test, aligned.simulation);
  let bands: ComparisonSummary["bands"];
  if (options.bands !== undefined) {
    const energy = (m: Float64Array, lo: number, hi: number) => {
      let sum = 0;
      for (let k = 0; k < f.length; k++) {
        if (f[k] >= lo && f[k] < hi) {
          sum += perDecade === 20 ? m[k] * m[k] : m[k];
        }
      }
      return sum;
    };
    bands = bandsInRange(options.bands, Math.max(f0, 1e-3), f1)
      .filter((b) => b.lowerHz >= f0 && b.upperHz <= f1)
      .map((b) => {
        const te = energy(t, b.lowerHz, b.upperHz);
        const se = energy(s, b.lowerHz, b.upperHz);
        return {
          center_hz: b.centerHz,
          nominal_hz: b.nominalHz,
          test_db: 10 * Math.log10(te),
          simulation_db: 10 * Math.log10(se),
          difference_db: 10 * Math.log10(se / te),
        };
      })
      .filter((b) => Number.isFinite(b.difference_db));
  }
  const summary: ComparisonSummary = {
    frac: value,
    frac_on: complex ? "complex" : "magnitude",
    peaks: peaks.matched,
    test_only_peaks: peaks.testOnly,
    simulation_only_peaks: peaks.simulationOnly,
    ...(bands !== undefined ? { bands } : {}),
    grid: { from: aligned.gridFrom, min_hz: f0, max_hz: f1, lines: f.length },
    quantity: test.quantity,
    quantity_from: quantityFrom,
    mean_abs_difference_db: finite.reduce((a, v) => a + Math.abs(v), 0) / finite.length,
    warnings,
  };
  return {
    summary,
    table: {
      columns: [
        { name: "frequency_hz", unit: "", values: f },
        { name: "test", unit: test.unit, values: t },
        { name: "simulation", unit: simulation.unit, values: s },
        { name: "difference_db", unit: "dB", values: difference },
      ],
      metadata: {
        analysis: "compare",
        test_column: test.column,
        simulation_column: simulation.column,
        ...(conversion !== undefined ? { unit_conversion: conversion } : {}),
        ...summary,
      },
    },
  };
}

/**
 * A curve without a unit cannot be checked against the other: say so, name
 * its file and what was assumed, rather than compare in silence.
 */
function missingUnitWarnings(test: Curve, simulation: Curve): string[] {
  const named = (c: Curve, side: string) =>
    `the ${side}${c.file === undefined ? "" : ` "${c.file}"`} (column "${c.column}")`;
  const t = test.unit.trim(), s = simulation.unit.trim();
  if (t === "" && s === "") {
    return [
      `neither ${named(test, "test")} nor ${
        named(simulation, "simulation")
      } states a unit: compared as they are, assumed to be the same quantity in the same unit (unchecked)`,
    ];
  }
  if (t === "") {
    return [
      `${
        named(test, "test")
      } states no unit: assumed to be in the simulation's unit [${s}] (unchecked)`,
    ];
  }
  if (s === "") {
    return [
      `${
        named(simulation, "simulation")
      } states no unit: assumed to be in the test's unit [${t}] (unchecked)`,
    ];
  }
  return [];
}

type Side = { quantity: "power" | "amplitude"; source: "option" | "metadata" | "unit" | "default" };

/** The quantity of both curves and where it came from (see the module's doc). */
function resolveQuantity(
  test: Curve,
  simulation: Curve,
  declared: "power" | "amplitude" | undefined,
): { quantity: { test: Side; simulation: Side }; from: string; warnings: string[] } {
  const both = (side: Side) => ({ test: side, simulation: side });
  if (declared !== undefined) {
    return {
      quantity: both({ quantity: declared, source: "option" }),
      from: "declared",
      warnings: [],
    };
  }
  const said = (c: Curve, name: string): { side: Side; why: string } | undefined => {
    // A curve built by a caller without a source states its quantity itself.
    const source = c.quantitySource ?? "option";
    if (source === "default") return undefined;
    const why = source === "unit"
      ? `the ${name}'s unit: ${quantityOfUnit(c.unit)?.reason ?? c.unit}`
      : source === "option"
      ? "declared"
      : `the ${name}'s metadata`;
    return { side: { quantity: c.quantity, source }, why };
  };
  const t = said(test, "test"), s = said(simulation, "simulation");
  if (t !== undefined && s !== undefined && t.side.quantity !== s.side.quantity) {
    throw new QuiverError(
      `the test is a ${t.side.quantity} quantity (${t.why}) and the simulation a ${s.side.quantity} quantity (${s.why}): compare like with like`,
    );
  }
  const known = t ?? s;
  if (known === undefined) {
    return {
      quantity: both({ quantity: "amplitude", source: "default" }),
      from: "default",
      warnings: [
        "neither curve's metadata nor its unit says whether it is a power quantity (PSD, power spectrum: dB = 10·lg) or an amplitude (FRF, RMS: dB = 20·lg); taken as amplitudes: declare power quantities with --power",
      ],
    };
  }
  const other = { quantity: known.side.quantity, source: known.side.source };
  return {
    quantity: { test: t?.side ?? other, simulation: s?.side ?? other },
    from: [t?.why, s?.why].filter((w) => w !== undefined).join("; "),
    warnings: [],
  };
}
