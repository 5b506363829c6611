/**
 * The manifest of a finished run, read once for every command that reads a
 * run's folder afterwards (`report`, `diff`, `history add`): a folder without
 * a manifest, a file that is not one, and a run that did not finish are
 * refused here, with the caller's advice on what to do instead.
 *
 * @module
 */
import { readFile } from "node:fs/promises";
import { join } from "node:path";
import { QuiverError } from "../errors.ts";
import { MANIFEST_FILE } from "./campaign_paths.ts";
import { type Manifest, manifestSchema } from "./manifest.ts";

/** What the refusals tell the user to do instead; each caller's own. */
export interface FinishedRunAdvice {
  /** After "no readable manifest.json here: ", e.g. "run a plan first". */
  readonly missing: string;
  /** After "the run did not finish (its manifest says …): ". */
  readonly unfinished: string;
}

/**
 * Reads and validates `dir/manifest.json` of a finished run.
 *
 * @throws {QuiverError} (usage) for a folder without a readable manifest;
 * (data) for a file that is not a quiver manifest or a run whose status is
 * `running` or `aborted` or that has no finishing time.
 *
 * @example
 * ```ts
 * import { readFinishedManifest } from "./finished_run.ts";
 * const dir = Deno.makeTempDirSync();
 * const refused = await readFinishedManifest(dir, { missing: "run a plan first", unfinished: "" })
 *   .then(() => false, (e: Error) => e.message.includes("run a plan first"));
 * if (!refused) throw new Error("an empty folder is not a finished run");
 * ```
 */
export async function readFinishedManifest(
  dir: string,
  advice: FinishedRunAdvice,
): Promise<Manifest> {
  let json: unknown;
  try {
    json = JSON.parse(await readFile(join(dir, MANIFEST_FILE), "utf8"));
  } catch {
    throw new QuiverError(
      `no readable manifest.json here: ${advice.missing}`,
      { file: dir },
      "usage",
    );
  }
  const parsed = manifestSchema.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new QuiverError(
      `manifest.json is not a quiver manifest: ${
        issue.path.join(".") || "(top level)"
      }: ${issue.message}`,
      { file: dir },
    );
  }
  const manifest = parsed.data;
  if (
    manifest.status === "running" || manifest.status === "aborted" || manifest.finished === null
  ) {
    throw new QuiverError(
      `the run did not finish (its manifest says ${manifest.status}): ${advice.unfinished}`,
      { file: dir },
    );
  }
  return manifest;
}
