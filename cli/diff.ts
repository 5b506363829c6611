/**
 * `quiver diff`: two finished runs compared step by step, with confidence
 * (lib/history/run_diff.ts). Not a plan analysis: it reads two run folders.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { formatNumber } from "../lib/format_number.ts";
import { diffRuns } from "../lib/history/run_diff.ts";
import { writeRunDiff } from "../lib/history/run_diff_write.ts";
import { numberOption, parseCommandArgs, usageError } from "./args.ts";
import { commandHelp, option, shapeOf, specOf } from "./option_table.ts";

/** One-line summary for the command list. */
export const summary =
  "two finished runs step by step: changes in dB and whether random error explains them";

const TABLE = {
  "out-dir": option(z.string().min(1), { value: "D", help: "where the diff goes", required: true }),
  confidence: option(
    numberOption().pipe(
      z.number().gt(0, "must lie between 0 and 1").lt(1, "must lie between 0 and 1"),
    ),
    { value: "C", help: "confidence of the intervals", default: "0.95" },
  ),
};

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver diff BASELINE_DIR CANDIDATE_DIR --out-dir D [--confidence 0.95]",
  about: `Compares the finished run in CANDIDATE_DIR with the one in BASELINE_DIR
(two folders written by quiver run), step by step by id. Steps both ran with
the same command and options are compared; titles, recordings and builds may
differ. Steps in one run only, or run differently, are listed.

Each spectral result (spectrum, frf, hammer, bands, orders, spectrogram) gives
D/<id>.csv on the lines both have: per channel <channel>_difference_db
(10·lg of a power ratio, 20·lg of an amplitude or FRF magnitude ratio, as the
result's metadata says), <channel>_lower_db and <channel>_upper_db (the
interval at the confidence) and <channel>_significant (true when the interval
leaves out 0 dB). Intervals come from each estimate's own averages: the F
distribution of two averaged autospectra (overlap counted by Welch's
equivalent degrees of freedom), the FRF magnitude's random error from its
coherence (Bendat & Piersol, Random Data, ch. 8 and 9).

Modes, damping and levels are listed old, new and change; targets with both
verdicts. D/summary.json ranks what changed beyond chance; D/diff.html shows it.`,
  groups: [[undefined, TABLE]],
  notes: `A result whose SHA-256 is not its manifest's, or a shared step whose
units differ, refuses the diff (exit code 1) naming the file or both units.
quiver is for engineering comparison, not a certified instrument: follow
local regulations and licensed practice for compliance.`,
});

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 2) {
    usageError(`diff takes two run folders (baseline, candidate), got ${positionals.length}`);
  }
  const diff = await diffRuns(positionals[0], positionals[1], { confidence: values.confidence });
  const files = await writeRunDiff(diff, values["out-dir"]);
  const s = diff.summary;
  console.error(
    `diff: ${s.steps.compared.length} step(s) compared, ${
      s.steps.notCompared.length + s.steps.onlyBaseline.length + s.steps.onlyCandidate.length
    } not (see summary.json)`,
  );
  for (const r of s.ranking.slice(0, 10)) {
    console.error(
      `  ${r.step} ${r.channel}: ${
        formatNumber(100 * r.significantShare, 3)
      } % of lines significant, largest ${formatNumber(r.largestDb, 3)} dB at ${
        r.at.map((v) => formatNumber(v, 5)).join(", ")
      }${r.familywise ? " (holds for all lines)" : ""}`,
    );
  }
  if (s.ranking.length === 0) console.error("  nothing changed beyond chance");
  for (const t of s.targets.filter((t) => t.verdictChanged)) {
    console.error(`  target ${t.id}: ${t.oldVerdict} -> ${t.newVerdict}`);
  }
  console.error(`-> ${files.length} file(s) in ${values["out-dir"]}`);
  console.error("Engineering comparison only; not a certified measurement.");
}
