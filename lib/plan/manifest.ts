/**
 * The manifest of a run, `<out>/manifest.json`: what was computed from what.
 * One zod schema serves the writer's type and every reader (the report, the
 * next run's clean-up), so a crafted or damaged manifest is refused before
 * anything of it is used.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";

const fileRecord = z.strictObject({
  path: z.string(),
  bytes: z.number().int().nonnegative(),
  sha256: z.string().regex(/^[0-9a-f]{64}$/),
});

/** A file with its size and SHA-256, path relative to the output folder where inside it. */
export type FileRecord = z.infer<typeof fileRecord>;

const step = z.strictObject({
  id: z.string(),
  kind: z.string(),
  command: z.string(),
  argv: z.array(z.string()),
  inputs: z.array(fileRecord),
  outputs: z.record(z.string(), fileRecord),
  status: z.enum(["ok", "failed", "skipped"]),
  error: z.string().optional(),
  seconds: z.number(),
});

/**
 * The zod schema of a manifest.
 *
 * @example
 * ```ts
 * import { manifestSchema } from "./manifest.ts";
 * if (manifestSchema.safeParse({ status: "ok" }).success) throw new Error(); // far from complete
 * ```
 */
export const manifestSchema = z.strictObject({
  quiver_version: z.string(),
  plan: fileRecord.extend({ title: z.string() }),
  out_dir: z.string(),
  started: z.string(),
  /** null while the run is under way (or when it was killed). */
  finished: z.string().nullable(),
  /**
   * `running` until the run ends: a manifest left `running` belongs to a run
   * killed outright (SIGKILL, power). A run stopped by an error of its own or
   * a signal it could catch says `aborted`, with `error` saying why.
   */
  status: z.enum(["ok", "failed", "running", "aborted"]),
  /** Why the run was aborted. */
  error: z.string().optional(),
  steps: z.array(step),
  targets: z.array(z.unknown()),
  require_targets: z.boolean(),
  report: z.string().optional(),
  /**
   * The report and its figures as written, each with its size and SHA-256:
   * the next run removes exactly these (and only while their hash holds).
   */
  report_files: z.array(fileRecord).optional(),
  /** A shard's partial manifest: which shard of how many. */
  shard: z.strictObject({ index: z.number().int(), count: z.number().int() }).optional(),
  /** A merged manifest: the number of shards it was merged from. */
  shards: z.number().int().optional(),
});

/** A run's manifest. */
export type Manifest = z.infer<typeof manifestSchema>;
