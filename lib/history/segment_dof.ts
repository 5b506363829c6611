/**
 * The chi-square degrees of freedom of a result's averaged lines, from the
 * segmenting its metadata records (lib/dsp/segment_metadata.ts): Welch's
 * equivalent degrees of freedom of `averages` segments of its window,
 * `block − overlap_samples` apart (confidence_intervals.ts).
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { parseWindowName, windowSamples } from "../dsp/windows.ts";
import { equivalentDegreesOfFreedom } from "./confidence_intervals.ts";

const SEGMENTING = z.looseObject({
  block: z.number().int().positive(),
  averages: z.number().int().positive(),
  overlap_samples: z.number().int().nonnegative().optional(),
  window: z.string(),
  average: z.string().optional(),
});

/** A result's degrees of freedom per line, and how they were found. */
export interface SegmentDegrees {
  /** Equivalent chi-square degrees of freedom of one line. */
  readonly dof: number;
  /** In words, for the summary. */
  readonly how: string;
}

/**
 * The degrees of freedom of one line of a linear average described by
 * `metadata` (block, averages, overlap_samples, window, average), or a
 * reason why there are none to give (an exponential or peak-hold average,
 * keys missing).
 *
 * @example
 * ```ts
 * import { segmentDegrees } from "./segment_dof.ts";
 * const d = segmentDegrees({ block: 1024, averages: 15, overlap_samples: 0, window: "hann" });
 * if (typeof d === "string" || d.dof !== 30) throw new Error();
 * if (typeof segmentDegrees({ block: 1024, averages: 15, window: "hann", average: "max" }) !== "string") throw new Error();
 * ```
 */
export function segmentDegrees(
  metadata: Readonly<Record<string, unknown>> | undefined,
  averages?: number,
): SegmentDegrees | string {
  const parsed = SEGMENTING.safeParse({
    ...metadata,
    ...(averages === undefined ? {} : { averages }),
  });
  if (!parsed.success) return "the result does not record its block, averages and window";
  const m = parsed.data;
  if (m.average !== undefined && m.average !== "linear") {
    return `its ${m.average} average has no chi-square law of its own`;
  }
  const overlap = m.overlap_samples ?? 0;
  if (overlap >= m.block) return "its overlap is not less than its block";
  let window: Float64Array;
  try {
    window = windowSamples(parseWindowName(m.window), m.block);
  } catch {
    return `its window "${m.window}" is not one quiver knows`;
  }
  const dof = equivalentDegreesOfFreedom(window, m.block - overlap, m.averages);
  return {
    dof,
    how:
      `${m.averages} average(s) of ${m.block} samples, ${m.window} window, ${overlap} overlapping: ${
        dof.toFixed(1)
      } degrees of freedom per line (Welch's equivalent for overlap)`,
  };
}
