/**
 * The segmenting options of every command built on the spectral core
 * (`--block`, `--resolution`, `--overlap`, `--window`, `--detrend`), and the
 * output options of every table-writing command.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { DETREND_MODES } from "../lib/dsp/detrend.ts";
import { DEFAULT_BLOCK } from "../lib/dsp/spectral_core.ts";
import { WINDOW_NAMES } from "../lib/dsp/windows.ts";
import { integerOption, numberOption, type OptionSpec } from "./args.ts";

/** parseArgs spec of the segmenting options. */
export const SEGMENT_OPTIONS: OptionSpec = {
  block: { type: "string" },
  resolution: { type: "string" },
  overlap: { type: "string" },
  window: { type: "string" },
  detrend: { type: "string" },
};

/** zod shape of the segmenting options. */
export const segmentOptionsShape = {
  block: integerOption().optional(),
  resolution: numberOption().pipe(z.number().positive("must be a positive number of Hz"))
    .optional(),
  overlap: numberOption().pipe(
    z.number().min(0, "must be at least 0").lt(
      1,
      "must be less than 1 (it is a fraction, e.g. 0.5 for 50 %)",
    ),
  ).optional(),
  window: z.enum(WINDOW_NAMES).optional(),
  detrend: z.enum(DETREND_MODES).optional(),
};

/** Help lines of the segmenting options. */
export const SEGMENT_HELP =
  `  --block N            samples per block                          (default ${DEFAULT_BLOCK})
  --resolution HZ      line spacing instead of --block: block = ceil(rate/HZ)
  --overlap F          fraction of a block shared with the next, 0 <= F < 1  (default 0.5)
  --window W           ${WINDOW_NAMES.join(" | ")}  (default hann)
                       flattop is HFT95 (Heinzel, Ruediger & Schilling 2002)
  --detrend D          ${DETREND_MODES.join(" | ")}                 (default mean)`;

/** A refinement: `--block` and `--resolution` exclude each other. */
export function oneBlockChoice(v: { block?: number; resolution?: number }): boolean {
  return v.block === undefined || v.resolution === undefined;
}

/** parseArgs spec of the output options. */
export const OUTPUT_OPTIONS: OptionSpec = {
  out: { type: "string" },
  format: { type: "string" },
};

/** zod shape of the output options. */
export const outputOptionsShape = {
  out: z.string().min(1).optional(),
  format: z.enum(["csv", "json"]).optional(),
};

/** Help lines of the output options. */
export const OUTPUT_HELP = `Output:
  --out FILE           write here (atomically) instead of stdout
  --format F           csv | json        (default csv; json when FILE ends in .json)`;
