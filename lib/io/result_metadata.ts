/**
 * What the metadata of each analysis's result holds, as far as quiver's own
 * readers use it (damping, compare, targets, the report): one zod schema per
 * analysis, keyed by the `analysis` name the result carries. Readers ask for
 * the analysis they expect and get typed metadata or a message naming the
 * file and the key; nothing is cast. Keys a reader does not use pass
 * through unchecked, so adding metadata never breaks a reader.
 *
 * Numbers that were not finite are `null` in JSON; schemas say where a
 * number may be missing.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { QuiverError } from "../errors.ts";
import type { ResultTable } from "./result_file.ts";

const finiteOrNull = z.number().nullable();

// What every result may carry: where it came from and what went wrong on the way.
const common = {
  source: z.string().optional(),
  warnings: z.array(z.string()).optional(),
};

const channel = z.looseObject({ name: z.string(), unit: z.string() });

const frfResponse = z.looseObject({
  name: z.string(),
  unit: z.string(),
  form: z.enum(["receptance", "mobility", "accelerance"]).nullable(),
  frf_unit: z.string(),
});

const frf = z.looseObject({
  ...common,
  analysis: z.enum(["frf", "hammer"]),
  estimator: z.string(),
  averages: z.number(),
  responses: z.array(frfResponse),
  exponential_window_tau_s: z.number().nullable().optional(),
  hits_summary: z.string().optional(),
});

const mode = z.looseObject({
  channel: z.string(),
  // null: a candidate flagged noise, listed but not a mode (lib/modal/damping_analysis.ts).
  mode: z.number().nullable(),
  frequencyHz: finiteOrNull,
  dampingRatio: finiteOrNull,
  qFactor: finiteOrNull,
  method: z.string(),
  flags: z.array(z.string()),
  halfPower: z.looseObject({ dampingRatio: finiteOrNull }).optional(),
});

/**
 * The metadata schema of each analysis: what every reader of a quiver result
 * file checks the sidecar's metadata against (unknown fields are kept).
 *
 * @example
 * ```ts
 * import { RESULT_METADATA } from "./result_metadata.ts";
 * import { averagedSpectrum } from "../dsp/averaged_spectrum.ts";
 * const data = new Float64Array(1024).map((_, i) => Math.sin(i));
 * const { metadata } = await averagedSpectrum({ rate: 256, startTime: 0, channels: [{ name: "a", unit: "V", data }] }, { block: 256 });
 * if (!RESULT_METADATA.spectrum.safeParse(metadata).success) throw new Error("a spectrum's own metadata");
 * if (RESULT_METADATA.spectrum.safeParse({ ...metadata, kind: "psd2" }).success) throw new Error("an unknown kind");
 * ```
 */
export const RESULT_METADATA = {
  spectrum: z.looseObject({
    ...common,
    analysis: z.literal("spectrum"),
    kind: z.enum(["psd", "power", "rms", "peak"]),
    df_hz: z.number(),
    averages: z.number(),
    window: z.string(),
  }),
  spectrogram: z.looseObject({
    ...common,
    analysis: z.literal("spectrogram"),
    against: z.enum(["time", "rpm"]),
    kind: z.enum(["psd", "power", "rms", "peak"]),
    db: z.boolean(),
    order_lines: z.array(z.number()).optional(),
  }),
  frf,
  hammer: frf.extend({
    analysis: z.literal("hammer"),
    usable_bandwidth_hz: z.number().nullable().optional(),
    usable_bandwidth_drop_db: z.number().optional(),
  }),
  hammer_records: z.looseObject({
    analysis: z.literal("hammer_records"),
    force: channel,
    response: channel,
    hits: z.array(z.looseObject({
      hit: z.number(),
      status: z.string(),
      reason: z.string().nullable(),
    })),
  }),
  paths: z.looseObject({
    ...common,
    analysis: z.literal("paths"),
    method: z.enum(["direct", "inverse"]),
    paths: z.array(z.looseObject({ name: z.string() })),
    target: channel,
    level_unit: z.string(),
    ranking: z.array(z.looseObject({
      band: z.string(),
      paths: z.array(z.looseObject({
        name: z.string(),
        level_db: finiteOrNull,
        share_percent: finiteOrNull,
      })),
    })),
  }),
  frf_matrix: z.looseObject({
    ...common,
    analysis: z.literal("frf_matrix"),
    averages: z.number(),
    inputs: z.array(channel),
    outputs: z.array(channel),
  }),
  frf_partial: z.looseObject({
    ...common,
    analysis: z.literal("frf_partial"),
    inputs: z.array(channel),
    outputs: z.array(channel),
  }),
  frf_principal: z.looseObject({
    ...common,
    analysis: z.literal("frf_principal"),
    inputs: z.array(channel),
    outputs: z.array(channel),
  }),
  damping: z.looseObject({ ...common, analysis: z.literal("damping"), modes: z.array(mode) }),
  bands: z.looseObject({
    ...common,
    analysis: z.literal("bands"),
    fraction: z.number(),
    weighting: z.string(),
    overall: z.array(
      z.looseObject({ channel: z.string(), level_db: finiteOrNull, unit: z.string() }),
    ),
  }),
  level: z.looseObject({
    ...common,
    analysis: z.literal("level"),
    weighting: z.string(),
    time_weighting: z.string(),
    summary: z.array(z.looseObject({
      channel: z.string(),
      unit: z.string(),
      leq_db: finiteOrNull,
      lmax_db: finiteOrNull,
    })),
  }),
  orders: z.looseObject({
    ...common,
    analysis: z.literal("orders"),
    amplitude: z.enum(["rms", "peak"]),
    method: z.enum(["angle", "time"]),
    weighting: z.string(),
    db: z.boolean(),
  }),
  "order map": z.looseObject({ ...common, analysis: z.literal("order map") }),
  modal: z.looseObject({
    ...common,
    analysis: z.literal("modal"),
    method: z.string(),
    dofs: z.array(z.looseObject({ point: z.string(), direction: z.string() })),
    fit_relative_error: z.array(finiteOrNull),
    geometry: z.looseObject({
      points: z.array(
        z.looseObject({ point: z.string(), x: z.number(), y: z.number(), z: z.number() }),
      ),
      lines: z.array(z.tuple([z.string(), z.string()])),
    }).optional(),
    modes: z.array(z.looseObject({
      mode: z.number(),
      frequencyHz: z.number(),
      dampingRatio: z.number(),
      mpc: finiteOrNull,
      flags: z.array(z.string()),
    })),
  }),
  mac: z.looseObject({
    ...common,
    analysis: z.literal("mac"),
    dofs_used: z.number(),
    dofs_test_only: z.number(),
    dofs_simulation_only: z.number(),
    auto_mac: z.array(z.array(finiteOrNull)),
    pairs: z.array(z.looseObject({
      test_mode: z.number(),
      simulation_mode: z.number(),
      test_hz: finiteOrNull,
      simulation_hz: finiteOrNull,
      shift_percent: finiteOrNull,
      mac: z.number(),
      ambiguous: z.boolean().optional(),
      rival: z.strictObject({
        side: z.enum(["simulation", "test"]),
        mode: z.number(),
        mac: z.number(),
      }).nullable().optional(),
    })),
  }),
  compare: z.looseObject({
    ...common,
    analysis: z.literal("compare"),
    frac: finiteOrNull,
    frac_on: z.enum(["complex", "magnitude"]),
    peaks: z.array(z.looseObject({
      test_hz: z.number(),
      simulation_hz: z.number(),
      shift_percent: z.number(),
      level_difference_db: finiteOrNull,
    })),
    grid: z.looseObject({ from: z.enum(["test", "simulation"]), lines: z.number() }),
    bands: z.array(z.looseObject({ nominal_hz: z.number(), difference_db: finiteOrNull }))
      .optional(),
    test: z.string().optional(),
    simulation: z.string().optional(),
  }),
} as const;

/** An analysis whose result metadata has a schema. */
export type ResultAnalysis = keyof typeof RESULT_METADATA;

/** The typed metadata of an analysis. */
export type ResultMetadata<A extends ResultAnalysis> = z.infer<typeof RESULT_METADATA[A]>;

/**
 * The metadata of a result read back, checked against the schema of the
 * analysis it should come from.
 *
 * @throws {QuiverError} when the table has no quiver metadata, comes from
 * another analysis, or its metadata lacks what the schema needs (naming
 * the key).
 *
 * @example
 * ```ts
 * import { resultMetadata } from "./result_metadata.ts";
 * const table = { file: "b.json", columns: [], metadata: { analysis: "bands", fraction: 3, weighting: "A", overall: [{ channel: "mic", level_db: 71.2, unit: "dB(A)" }] } };
 * if (resultMetadata(table, "bands").overall[0].level_db !== 71.2) throw new Error();
 * ```
 */
export function resultMetadata<A extends ResultAnalysis>(
  table: ResultTable,
  analysis: A,
): ResultMetadata<A> {
  const metadata = table.metadata;
  if (metadata === undefined) {
    throw new QuiverError(
      `no quiver metadata (a ${analysis} result was expected; a CSV needs its .meta.json)`,
      { file: table.file },
    );
  }
  const parsed = RESULT_METADATA[analysis].safeParse(metadata);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const found = typeof metadata.analysis === "string" ? metadata.analysis : "unknown";
    throw new QuiverError(
      found !== analysis && !(analysis === "frf" && found === "hammer")
        ? `a ${found} result where a ${analysis} result was expected`
        : `the ${analysis} metadata ${
          issue.path.length > 0 ? `at ${issue.path.join(".")} ` : ""
        }is not as quiver writes it: ${issue.message}`,
      { file: table.file },
    );
  }
  return parsed.data as ResultMetadata<A>;
}

/**
 * Whether a result table carries metadata of the given analysis (without
 * throwing), e.g. to tell a quiver FRF from a solver export.
 *
 * @example
 * ```ts
 * import { isResultOf } from "./result_metadata.ts";
 * if (isResultOf({ file: "x", columns: [] }, "frf")) throw new Error();
 * ```
 */
export function isResultOf(table: ResultTable, analysis: ResultAnalysis): boolean {
  return table.metadata !== undefined &&
    RESULT_METADATA[analysis].safeParse(table.metadata).success;
}

const commonSchema = z.looseObject({ ...common, test: z.string().optional() });

/**
 * What any result may say about itself: its source file (or a comparison's
 * test file) and its warnings; empty when the table has no such metadata.
 *
 * @example
 * ```ts
 * import { commonMetadata } from "./result_metadata.ts";
 * const m = commonMetadata({ file: "x", columns: [], metadata: { source: "run.csv", warnings: ["clipped"] } });
 * if (m.source !== "run.csv" || m.warnings?.[0] !== "clipped") throw new Error();
 * ```
 */
export function commonMetadata(
  table: ResultTable,
): { source?: string; warnings?: string[]; test?: string } {
  const parsed = commonSchema.safeParse(table.metadata ?? {});
  return parsed.success ? parsed.data : {};
}
