/**
 * `quiver merge`: joins the shards of a campaign into one manifest and report.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { mergeShards } from "../lib/plan/merge.ts";
import { writeReport } from "../lib/report/html_report.ts";
import { parseCommandArgs, usageError } from "./args.ts";
import { shapeOf, specOf } from "./option_table.ts";
import { planCommandTable } from "./plan_commands.ts";
import { reportOutcome } from "./run.ts";

/** One-line summary for the command list. */
export const summary = "merges the shards of a campaign run with run --shard: manifest and report";

/** The command's help text. */
export const help = `quiver merge DIR

Joins the shards of a campaign (each a quiver run of shard K of N into DIR,
on one machine or many) into DIR/manifest.json, evaluates the plan's targets and
writes the report, as one run of the whole plan would. It checks first that
every shard 1 … N finished, all with the same plan (unchanged since) and
quiver version, and that every result is still the file its shard wrote (size
and SHA-256); a missing, unfinished or inconsistent shard is named and the
merge writes nothing (exit code 1). A step that failed inside a shard is
reported as in a run (exit code 1).

The merge takes the folder's one lock: the lock the shards of this plan share
(it waits for no shard: one still running is named), released when the merge
has written the manifest; a failed merge leaves it for the shards.
`;

const TABLE = {};

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 1) usageError(`merge takes one folder, got ${positionals.length}`);
  const manifest = await mergeShards(positionals[0], {
    commands: await planCommandTable(),
    report: writeReport,
  });
  reportOutcome(manifest, "merge");
}
