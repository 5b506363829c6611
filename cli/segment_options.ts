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
import { integerOption, numberOption } from "./args.ts";
import { option } from "./option_table.ts";

/** The segmenting options. */
export const SEGMENT_TABLE = {
  block: option(integerOption(), {
    value: "N",
    help: "samples per block",
    default: String(DEFAULT_BLOCK),
  }),
  resolution: option(
    numberOption().pipe(z.number().positive("must be a positive number of Hz")),
    { value: "HZ", help: "line spacing instead of --block: block = ceil(rate/HZ)" },
  ),
  overlap: option(
    numberOption().pipe(
      z.number().min(0, "must be at least 0").lt(
        1,
        "must be less than 1 (it is a fraction, e.g. 0.5 for 50 %)",
      ),
    ),
    { value: "F", help: "fraction of a block shared with the next, 0 <= F < 1", default: "0.5" },
  ),
  window: option(z.enum(WINDOW_NAMES), {
    value: "W",
    help: `${WINDOW_NAMES.join(" | ")}\nflattop is HFT95 (Heinzel, Ruediger & Schilling 2002)`,
    default: "hann",
  }),
  detrend: option(z.enum(DETREND_MODES), {
    value: "D",
    help: DETREND_MODES.join(" | "),
    default: "mean",
  }),
};

/** A refinement: `--block` and `--resolution` exclude each other. */
export function oneBlockChoice(v: { block?: number; resolution?: number }): boolean {
  return v.block === undefined || v.resolution === undefined;
}

/** The output options. */
export const OUTPUT_TABLE = {
  out: option(z.string().min(1), {
    value: "FILE",
    help: "write here (atomically) instead of stdout",
  }),
  format: option(z.enum(["csv", "json"]), {
    value: "F",
    help: "csv | json",
    default: "csv; json when FILE ends in .json",
  }),
};
