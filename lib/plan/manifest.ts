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
  /** `running` until the run ends: a manifest left `running` belongs to a killed run. */
  status: z.enum(["ok", "failed", "running"]),
  steps: z.array(step),
  targets: z.array(z.unknown()),
  require_targets: z.boolean(),
  report: z.string().optional(),
  /** A shard's partial manifest: which shard of how many. */
  shard: z.strictObject({ index: z.number().int(), count: z.number().int() }).optional(),
  /** A merged manifest: the number of shards it was merged from. */
  shards: z.number().int().optional(),
});

/** A run's manifest. */
export type Manifest = z.infer<typeof manifestSchema>;
