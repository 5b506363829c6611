/**
 * What the metadata of each analysis's result holds, as far as quiver's own
 * readers use it (damping, compare, targets, the report): one zod schema per
 * analysis, kept beside the analysis (e.g. lib/dsp/spectrum_metadata.ts) and
 * listed here, keyed by the `analysis` name the result carries. Readers ask for
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
import { COMMON_FIELDS } from "./result_common.ts";
// Each schema lives beside its analysis; only schemas are imported (no analysis code).
import { SPECTRUM_METADATA } from "../dsp/spectrum_metadata.ts";
import { SPECTROGRAM_METADATA } from "../dsp/spectrogram_metadata.ts";
import { FRF_METADATA } from "../frf/frf_metadata.ts";
import { HAMMER_METADATA, HAMMER_RECORDS_METADATA } from "../frf/hammer_metadata.ts";
import {
  FRF_MATRIX_METADATA,
  FRF_PARTIAL_METADATA,
  FRF_PRINCIPAL_METADATA,
} from "../frf/frf_matrix_metadata.ts";
import { PATHS_METADATA } from "../paths/paths_metadata.ts";
import { DAMPING_METADATA } from "../modal/damping_metadata.ts";
import { BANDS_METADATA } from "../acoustics/bands_metadata.ts";
import { LEVEL_METADATA } from "../acoustics/level_metadata.ts";
import { ORDER_MAP_METADATA, ORDERS_METADATA } from "../orders/orders_metadata.ts";
import { MODAL_METADATA } from "../modal/modal_metadata.ts";
import { MAC_METADATA } from "../modal/mac_metadata.ts";
import { COMPARE_METADATA } from "../compare/compare_metadata.ts";

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
  spectrum: SPECTRUM_METADATA,
  spectrogram: SPECTROGRAM_METADATA,
  frf: FRF_METADATA,
  hammer: HAMMER_METADATA,
  hammer_records: HAMMER_RECORDS_METADATA,
  paths: PATHS_METADATA,
  frf_matrix: FRF_MATRIX_METADATA,
  frf_partial: FRF_PARTIAL_METADATA,
  frf_principal: FRF_PRINCIPAL_METADATA,
  damping: DAMPING_METADATA,
  bands: BANDS_METADATA,
  level: LEVEL_METADATA,
  orders: ORDERS_METADATA,
  "order map": ORDER_MAP_METADATA,
  modal: MODAL_METADATA,
  mac: MAC_METADATA,
  compare: COMPARE_METADATA,
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

const commonSchema = z.looseObject({ ...COMMON_FIELDS, test: z.string().optional() });

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
