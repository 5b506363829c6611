/**
 * One spectral step of `quiver diff`: the baseline's and the candidate's
 * results on their common lines, each channel's change in dB with its
 * interval and whether it is significant (confidence_intervals.ts), as a
 * table, and a summary of it.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { Table, TableColumn } from "../io/table.ts";
import {
  type ChangeInterval,
  frfChangeInterval,
  frfRandomError,
  powerRatioInterval,
} from "./confidence_intervals.ts";
import type { SpectralDiffColumn, SpectralDiffView } from "./run_diff_view.ts";

/** One channel's changes in short, for the summary and the ranking. */
export interface ChannelChange {
  readonly channel: string;
  readonly quantity: SpectralDiffColumn["quantity"];
  /** Lines compared (both values usable). */
  readonly lines: number;
  /** Lines with a verdict (degrees of freedom known). */
  readonly judged: number;
  /** Lines whose change is significant. */
  readonly significant: number;
  /**
   * The line to name first: the one of largest |change| among lines still
   * significant when the confidence is raised for all the channel's judged
   * lines at once (Bonferroni: 1 − (1 − c)/judged; `familywise` true); else
   * among those significant with both neighbours, else among all
   * significant lines (`familywise` false); null when none is.
   */
  readonly largest: {
    readonly at: readonly number[];
    readonly differenceDb: number;
    readonly familywise: boolean;
  } | null;
  /** Mean change over the compared lines, dB. */
  readonly meanDifferenceDb: number | null;
}

/** A spectral step's diff as a table: grid columns, then four columns per channel. */
export type DiffTable = Table<Record<string, unknown>, Float64Array | readonly string[]>;

/** A spectral step's diff. */
export interface SpectralDiff {
  readonly table: DiffTable;
  readonly channels: readonly ChannelChange[];
  /** Channels in only one of the runs. */
  readonly onlyBaseline: readonly string[];
  readonly onlyCandidate: readonly string[];
  /** Lines on the common grid. */
  readonly commonLines: number;
  /** The grid's column names. */
  readonly gridNames: readonly string[];
}

/** The key of a line: its grid values to 12 significant digits (the runs write the same doubles). */
function lineKey(grid: SpectralDiffView["grid"], i: number): string {
  return grid.map((g) => g.values[i].toPrecision(12)).join("|");
}

function degreesAt(dof: number | Float64Array | undefined, i: number): number | undefined {
  if (dof === undefined) return undefined;
  return typeof dof === "number" ? dof : dof[i];
}

/** The change of one line, or undefined when either value cannot be compared. */
function lineChange(
  b: SpectralDiffColumn,
  c: SpectralDiffColumn,
  i: number,
  j: number,
  confidence: number,
): ChangeInterval | { differenceDb: number } | undefined {
  const vb = b.values[i], vc = c.values[j];
  if (!Number.isFinite(vb) || !Number.isFinite(vc)) return undefined;
  if (b.quantity === "frf") {
    const gb = b.coherence?.[i] ?? NaN, gc = c.coherence?.[j] ?? NaN;
    if (!(vb > 0 && vc > 0)) return undefined;
    const differenceDb = 20 * Math.log10(vc / vb);
    if (!(gb > 0 && gc > 0) || b.averages === undefined || c.averages === undefined) {
      return { differenceDb };
    }
    return frfChangeInterval(
      vb,
      vc,
      frfRandomError(Math.min(gb, 1), b.averages),
      frfRandomError(Math.min(gc, 1), c.averages),
      confidence,
    );
  }
  let ratio: number;
  if (b.quantity === "level") ratio = 10 ** ((vc - vb) / 10);
  else if (!(vb > 0 && vc > 0)) return undefined;
  else if (b.quantity === "power") ratio = vc / vb;
  else ratio = (vc / vb) ** 2; // an amplitude: the power ratio is its square
  const nb = degreesAt(b.degreesOfFreedom, i), nc = degreesAt(c.degreesOfFreedom, j);
  if (nb === undefined || nc === undefined || !(nb > 0 && nc > 0)) {
    return { differenceDb: b.quantity === "level" ? vc - vb : 10 * Math.log10(ratio) };
  }
  return powerRatioInterval(ratio, nb, nc, confidence);
}

/**
 * The diff of one step's spectral results, candidate against baseline, at
 * `confidence`: each channel both have, on the lines both have.
 *
 * @throws {QuiverError} (data) when a channel's unit differs between the runs, naming both.
 *
 * @example
 * ```ts
 * import { spectralDiff } from "./run_diff_spectral.ts";
 * const f = new Float64Array([1, 2]);
 * const view = (v: number) => ({ grid: [{ name: "frequency_hz", unit: "", values: f }], statistics: "",
 *   columns: [{ name: "a", unit: "V^2/Hz", quantity: "power" as const, values: new Float64Array([v, v]), degreesOfFreedom: 200 }] });
 * const d = spectralDiff(view(1), view(4), 0.95, "psd");
 * if (Math.abs(d.channels[0].meanDifferenceDb! - 6.0206) > 1e-4 || d.channels[0].significant !== 2) throw new Error();
 * ```
 */
export function spectralDiff(
  baseline: SpectralDiffView,
  candidate: SpectralDiffView,
  confidence: number,
  step: string,
): SpectralDiff {
  const candidateLines = new Map<string, number>();
  const n = candidate.grid[0]?.values.length ?? 0;
  for (let j = 0; j < n; j++) candidateLines.set(lineKey(candidate.grid, j), j);
  const pairs: [number, number][] = [];
  const m = baseline.grid[0]?.values.length ?? 0;
  for (let i = 0; i < m; i++) {
    const j = candidateLines.get(lineKey(baseline.grid, i));
    if (j !== undefined) pairs.push([i, j]);
  }
  const byName = new Map(candidate.columns.map((c) => [c.name, c]));
  const shared = baseline.columns.filter((b) => byName.has(b.name));
  for (const b of shared) {
    const c = byName.get(b.name)!;
    if (b.unit !== c.unit || b.quantity !== c.quantity) {
      throw new QuiverError(
        `step "${step}": "${b.name}" is in ${
          b.unit || "no unit"
        } (${b.quantity}) in the baseline and in ${
          c.unit || "no unit"
        } (${c.quantity}) in the candidate; the runs cannot be compared there`,
        {},
        "data",
      );
    }
  }
  const columns: TableColumn<Float64Array | readonly string[]>[] = baseline.grid.map((g) => ({
    name: g.name,
    unit: g.unit,
    values: Float64Array.from(pairs, ([i]) => g.values[i]),
  }));
  const channels: ChannelChange[] = [];
  for (const b of shared) {
    const c = byName.get(b.name)!;
    const difference = new Float64Array(pairs.length).fill(NaN);
    const lower = new Float64Array(pairs.length).fill(NaN);
    const upper = new Float64Array(pairs.length).fill(NaN);
    const verdict: string[] = new Array(pairs.length).fill("n/a");
    let lines = 0, judged = 0, significant = 0, sum = 0;
    let largest: ChannelChange["largest"] = null;
    pairs.forEach(([i, j], k) => {
      const change = lineChange(b, c, i, j, confidence);
      if (change === undefined || !Number.isFinite(change.differenceDb)) return;
      difference[k] = change.differenceDb;
      lines++;
      sum += change.differenceDb;
      if (!("significant" in change)) return;
      lower[k] = change.lowerDb;
      upper[k] = change.upperDb;
      verdict[k] = String(change.significant);
      judged++;
      if (!change.significant) return;
      significant++;
    });
    // The largest change among lines significant with both neighbours (same sign): over
    // thousands of lines, chance alone makes some isolated line extreme (multiple comparisons);
    // a lone significant line counts only when no run of three exists.
    // Over thousands of lines of few degrees of freedom (a spectrogram's cells) even runs of
    // three arise by chance; a change that holds at the Bonferroni level for every judged line
    // at once does not (the family-wise error stays at 1 − c), so such a line is named first.
    const strict = 1 - (1 - confidence) / Math.max(judged, 1);
    pairs.forEach(([i, j], k) => {
      if (verdict[k] !== "true") return;
      const change = lineChange(b, c, i, j, strict);
      if (change === undefined || !("significant" in change) || !change.significant) return;
      if (largest === null || Math.abs(difference[k]) > Math.abs(largest.differenceDb)) {
        largest = {
          at: baseline.grid.map((g) => g.values[i]),
          differenceDb: difference[k],
          familywise: true,
        };
      }
    });
    let sustained = false;
    pairs.forEach(([i], k) => {
      if (largest?.familywise || verdict[k] !== "true") return;
      const run = k > 0 && k < pairs.length - 1 && verdict[k - 1] === "true" &&
        verdict[k + 1] === "true" && Math.sign(difference[k - 1]) === Math.sign(difference[k]) &&
        Math.sign(difference[k + 1]) === Math.sign(difference[k]);
      if (sustained && !run) return;
      if (
        largest === null || (run && !sustained) ||
        Math.abs(difference[k]) > Math.abs(largest.differenceDb)
      ) {
        largest = {
          at: baseline.grid.map((g) => g.values[i]),
          differenceDb: difference[k],
          familywise: false,
        };
        sustained ||= run;
      }
    });
    columns.push(
      { name: `${b.name}_difference_db`, unit: "dB", values: difference },
      { name: `${b.name}_lower_db`, unit: "dB", values: lower },
      { name: `${b.name}_upper_db`, unit: "dB", values: upper },
      { name: `${b.name}_significant`, unit: "", values: verdict },
    );
    channels.push({
      channel: b.name,
      quantity: b.quantity,
      lines,
      judged,
      significant,
      largest,
      meanDifferenceDb: lines > 0 ? sum / lines : null,
    });
  }
  return {
    table: {
      columns,
      metadata: {
        analysis: "diff",
        step,
        confidence,
        baseline_statistics: baseline.statistics,
        candidate_statistics: candidate.statistics,
        difference:
          "candidate against baseline, dB: 10·lg of a power ratio, 20·lg of an amplitude or FRF magnitude ratio, a difference of levels",
        significant:
          `the interval at ${confidence} confidence leaves out 0 dB; n/a where a value is missing or the result gives no degrees of freedom`,
      },
    },
    channels,
    onlyBaseline: baseline.columns.filter((b) => !byName.has(b.name)).map((b) => b.name),
    onlyCandidate: candidate.columns.filter((c) => !shared.some((b) => b.name === c.name)).map((
      c,
    ) => c.name),
    commonLines: pairs.length,
    gridNames: baseline.grid.map((g) => g.name),
  };
}
