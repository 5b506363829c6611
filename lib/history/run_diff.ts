/**
 * `quiver diff`'s method: two finished runs compared step by step, with
 * what each analysis's descriptor says of its result (`diff`,
 * run_diff_view.ts): spectral results line by line with their confidence
 * (run_diff_spectral.ts), single values (modes, damping, levels) and the
 * targets' values and verdicts. Nothing here branches on a command's name.
 *
 * A channel counts as changed when more of its lines are significant than
 * chance explains: at confidence c a repeat with the same statistics is
 * significant on about (1 − c) of its lines, so a channel is flagged when
 * its count exceeds n(1 − c) + 3·sqrt(n c (1 − c)) (three binomial standard
 * deviations above the false-alarm count, common practice for a one-sided
 * screen).
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { ANALYSES, type AnalysisTable } from "../analyses.ts";
import { QuiverError } from "../errors.ts";
import { readResultFile } from "../io/result_file.ts";
import { QUIVER_VERSION } from "../version.ts";
import { pairSteps, readRun, type RunRead, trustedResult } from "./run_diff_inputs.ts";
import { type ChannelChange, type DiffTable, spectralDiff } from "./run_diff_spectral.ts";
import type { SingleValue } from "./run_diff_view.ts";

/** Options of {@linkcode diffRuns}. */
export interface DiffOptions {
  /** Confidence of the intervals, between 0 and 1. Default 0.95. */
  readonly confidence?: number;
  /** The analyses (their descriptors' `diff`). Default: quiver's ({@linkcode ANALYSES}). */
  readonly table?: AnalysisTable;
}

/** A spectral step's changes in the summary. */
export interface SpectralStepChange {
  readonly step: string;
  readonly command: string;
  /** The table's file in the diff folder. */
  readonly file: string;
  readonly commonLines: number;
  /** The columns that place a line (frequency; time or rpm and frequency). */
  readonly grid: readonly string[];
  readonly baselineStatistics: string;
  readonly candidateStatistics: string;
  readonly channels: readonly (ChannelChange & { readonly changed: boolean })[];
  readonly onlyBaselineChannels: readonly string[];
  readonly onlyCandidateChannels: readonly string[];
}

/** A single value in both runs. */
export interface ValueChange {
  readonly step: string;
  readonly name: string;
  readonly unit: string;
  readonly old: number | null;
  readonly new: number | null;
  readonly change: number | null;
}

/** A target in either run, with its value and verdict in each. */
export interface TargetChange {
  readonly id: string;
  readonly unit: string;
  readonly old: number | null;
  readonly new: number | null;
  readonly change: number | null;
  readonly oldVerdict: string;
  readonly newVerdict: string;
  readonly verdictChanged: boolean;
}

/** The whole diff, as summary.json holds it (tables aside). */
export interface DiffSummary {
  readonly analysis: "diff";
  readonly quiver_version: string;
  readonly confidence: number;
  readonly note: string;
  readonly baseline: RunIdentity;
  readonly candidate: RunIdentity;
  readonly steps: {
    readonly compared: readonly string[];
    readonly notCompared: readonly { readonly id: string; readonly why: string }[];
    readonly onlyBaseline: readonly string[];
    readonly onlyCandidate: readonly string[];
  };
  /**
   * Channels changed beyond chance: those whose largest change holds for all
   * their lines at once (`familywise`, see ChannelChange) first, each group
   * by largest |change|.
   */
  readonly ranking: readonly RankedChange[];
  readonly spectral: readonly SpectralStepChange[];
  readonly values: readonly ValueChange[];
  readonly targets: readonly TargetChange[];
}

/** One channel of the ranking. */
export interface RankedChange {
  readonly step: string;
  readonly channel: string;
  readonly significantShare: number;
  readonly largestDb: number;
  readonly at: readonly number[];
  /** The largest change holds at the Bonferroni level for all the channel's lines. */
  readonly familywise: boolean;
}

/**
 * The channels changed beyond chance, those whose largest change holds for
 * all their lines at once first, each group by largest |change|.
 *
 * @example
 * ```ts
 * import { rankChanges } from "./run_diff.ts";
 * const ch = (channel: string, db: number, familywise: boolean) => ({ channel, quantity: "power" as const,
 *   lines: 10, judged: 10, significant: 9, changed: true, meanDifferenceDb: db,
 *   largest: { at: [1], differenceDb: db, familywise } });
 * const r = rankChanges([{ step: "s", channels: [ch("a", -50, false), ch("b", 6, true), ch("c", -12, true)] }]);
 * if (r.map((x) => x.channel).join() !== "c,b,a") throw new Error(r.map((x) => x.channel).join());
 * ```
 */
export function rankChanges(
  spectral: readonly {
    readonly step: string;
    readonly channels: readonly (ChannelChange & { readonly changed: boolean })[];
  }[],
): RankedChange[] {
  return spectral.flatMap((s) =>
    s.channels.filter((ch) => ch.changed && ch.largest !== null).map((ch) => ({
      step: s.step,
      channel: ch.channel,
      significantShare: ch.significant / ch.judged,
      largestDb: ch.largest!.differenceDb,
      at: ch.largest!.at,
      familywise: ch.largest!.familywise,
    }))
  ).sort((x, y) =>
    Number(y.familywise) - Number(x.familywise) || Math.abs(y.largestDb) - Math.abs(x.largestDb)
  );
}

/** Which run a side of the diff is. */
export interface RunIdentity {
  readonly dir: string;
  readonly title: string;
  readonly plan_sha256: string;
  readonly finished: string | null;
}

/** The diff: its summary and each spectral step's table by step id. */
export interface RunDiff {
  readonly summary: DiffSummary;
  readonly tables: ReadonlyMap<string, DiffTable>;
}

const targetSchema = z.looseObject({
  id: z.string(),
  unit: z.string().optional(),
  value: z.number().nullable().optional(),
  pass: z.boolean().optional(),
  status: z.string().optional(),
});

function verdictOf(t: z.infer<typeof targetSchema> | undefined): string {
  if (t === undefined) return "absent";
  if (t.status !== undefined && t.status !== "checked") return "not checked";
  return t.pass === true ? "pass" : t.pass === false ? "fail" : "not checked";
}

function targetChanges(baseline: RunRead, candidate: RunRead): TargetChange[] {
  const read = (run: RunRead) =>
    new Map(
      run.manifest.targets.flatMap((t) => {
        const p = targetSchema.safeParse(t);
        return p.success ? [[p.data.id, p.data] as const] : [];
      }),
    );
  const b = read(baseline), c = read(candidate);
  const ids = [...b.keys(), ...[...c.keys()].filter((id) => !b.has(id))];
  return ids.map((id) => {
    const o = b.get(id), n = c.get(id);
    const old = typeof o?.value === "number" ? o.value : null;
    const now = typeof n?.value === "number" ? n.value : null;
    const oldVerdict = verdictOf(o), newVerdict = verdictOf(n);
    return {
      id,
      unit: n?.unit ?? o?.unit ?? "",
      old,
      new: now,
      change: old !== null && now !== null ? now - old : null,
      oldVerdict,
      newVerdict,
      // A target of one run only is listed, not counted as a changed verdict.
      verdictChanged: o !== undefined && n !== undefined && oldVerdict !== newVerdict,
    };
  });
}

function valueChanges(
  step: string,
  old: readonly SingleValue[],
  now: readonly SingleValue[],
): ValueChange[] {
  const byName = new Map(now.map((v) => [v.name, v]));
  const out: ValueChange[] = old.map((o) => {
    const n = byName.get(o.name);
    const usable = n !== undefined && n.unit === o.unit;
    return {
      step,
      name: o.name,
      unit: o.unit,
      old: o.value,
      new: usable ? n.value : null,
      change: usable ? n.value - o.value : null,
    };
  });
  for (const n of now) {
    if (!old.some((o) => o.name === n.name)) {
      out.push({ step, name: n.name, unit: n.unit, old: null, new: n.value, change: null });
    }
  }
  return out;
}

/** Whether `significant` of `judged` lines is more than chance at `confidence` (module note). */
export function beyondChance(significant: number, judged: number, confidence: number): boolean {
  const p = 1 - confidence;
  return judged > 0 && significant > judged * p + 3 * Math.sqrt(judged * p * (1 - p));
}

/**
 * Compares the finished run in `candidateDir` with the one in `baselineDir`.
 *
 * @throws {QuiverError} (data) for a folder that is no finished run, a
 * result or plan whose hash is not its manifest's (naming the file), or a
 * shared step whose units differ (naming both).
 * @throws {RangeError} for a confidence outside (0, 1).
 */
export async function diffRuns(
  baselineDir: string,
  candidateDir: string,
  options: DiffOptions = {},
): Promise<RunDiff> {
  const confidence = options.confidence ?? 0.95;
  if (!(confidence > 0 && confidence < 1)) {
    throw new RangeError(`the confidence must lie between 0 and 1, got ${confidence}`);
  }
  const table = options.table ?? ANALYSES;
  const [baseline, candidate] = [await readRun(baselineDir), await readRun(candidateDir)];
  const pairing = pairSteps(baseline, candidate);
  const notCompared = [...pairing.differing];
  const compared: string[] = [];
  const spectral: SpectralStepChange[] = [];
  const values: ValueChange[] = [];
  const tables = new Map<string, DiffTable>();
  for (const { baseline: b, candidate: c } of pairing.shared) {
    const reader = await table.get(b.command)?.diff?.();
    if (reader === undefined || b.result === undefined || c.result === undefined) {
      notCompared.push({ id: b.id, why: `quiver diff does not read ${b.command} results` });
      continue;
    }
    // Both results are proven theirs before either is read.
    await trustedResult(b);
    await trustedResult(c);
    const [rb, rc] = [await readResultFile(b.result.path), await readResultFile(c.result.path)];
    try {
      if (reader.spectral !== undefined) {
        const d = spectralDiff(reader.spectral(rb), reader.spectral(rc), confidence, b.id);
        tables.set(b.id, d.table);
        spectral.push({
          step: b.id,
          command: b.command,
          file: `${b.id}.csv`,
          commonLines: d.commonLines,
          grid: d.gridNames,
          baselineStatistics: String(d.table.metadata.baseline_statistics),
          candidateStatistics: String(d.table.metadata.candidate_statistics),
          channels: d.channels.map((ch) => ({
            ...ch,
            changed: beyondChance(ch.significant, ch.judged, confidence),
          })),
          onlyBaselineChannels: d.onlyBaseline,
          onlyCandidateChannels: d.onlyCandidate,
        });
      }
      if (reader.values !== undefined) {
        values.push(...valueChanges(b.id, reader.values(rb), reader.values(rc)));
      }
      compared.push(b.id);
    } catch (error) {
      if (error instanceof QuiverError) throw error; // units differ: the diff is refused
      notCompared.push({ id: b.id, why: error instanceof Error ? error.message : String(error) });
    }
  }
  const ranking = rankChanges(spectral);
  const identity = (run: RunRead): RunIdentity => ({
    dir: run.dir,
    title: run.title,
    plan_sha256: run.manifest.plan.sha256,
    finished: run.manifest.finished,
  });
  return {
    summary: {
      analysis: "diff",
      quiver_version: QUIVER_VERSION,
      confidence,
      note:
        "engineering comparison of two test runs; levels are not certified measurements: follow local regulations and licensed practice for compliance",
      baseline: identity(baseline),
      candidate: identity(candidate),
      steps: {
        compared,
        notCompared,
        onlyBaseline: pairing.onlyBaseline,
        onlyCandidate: pairing.onlyCandidate,
      },
      ranking,
      spectral,
      values,
      targets: targetChanges(baseline, candidate),
    },
    tables,
  };
}
