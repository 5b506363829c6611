/**
 * `quiver spectrum`: averaged, correctly scaled spectra of a recording.
 *
 * @module
 */
import process from "node:process";
import { z } from "zod";
import { AVERAGING_MODES } from "../lib/dsp/spectral_core.ts";
import { averagedSpectrum, DEFAULT_BLOCK } from "../lib/dsp/averaged_spectrum.ts";
import { DETREND_MODES } from "../lib/dsp/detrend.ts";
import { SPECTRUM_KINDS } from "../lib/dsp/spectrum_kinds.ts";
import { WINDOW_NAMES } from "../lib/dsp/windows.ts";
import { readRecordingFile } from "../lib/io/read_recording.ts";
import {
  inFile,
  integerOption,
  listOption,
  numberOption,
  parseCommandArgs,
  usageError,
} from "./args.ts";
import { resolveFormat, writeTable } from "./output.ts";
import {
  RECORDING_HELP,
  RECORDING_OPTIONS,
  recordingOptionsShape,
  toReadOptions,
} from "./recording_options.ts";

/** One-line summary for the command list. */
export const summary = "averaged auto spectra (PSD, autopower, RMS or peak) of a recording";

/** The command's help text. */
export const help = `quiver spectrum IN [options]

Averaged one-sided spectra of the channels of IN (CSV or WAV), by Welch's
method: segments, detrend, window, FFT, average.

Analysis:
  --channels a,b       channels to analyse, in output order       (default all)
  --block N            samples per block                          (default ${DEFAULT_BLOCK})
  --resolution HZ      line spacing instead of --block: block = ceil(rate/HZ)
  --overlap F          fraction of a block shared with the next, 0 <= F < 1  (default 0.5)
  --window W           ${WINDOW_NAMES.join(" | ")}  (default hann)
                       flattop is HFT95 (Heinzel, Ruediger & Schilling 2002)
  --detrend D          ${DETREND_MODES.join(" | ")}                 (default mean)
  --kind K             psd (unit^2/Hz) | power (unit^2 per line) |
                       rms (unit RMS per line) | peak (unit peak per line)  (default psd)
  --average A          ${AVERAGING_MODES.join(" | ")}           (default linear)
  --tau S              time constant of exponential averaging, seconds  (default 1)

${RECORDING_HELP}

Output:
  --out FILE           write here (atomically) instead of stdout
  --format F           csv | json        (default csv; json when FILE ends in .json)

CSV columns: frequency_hz, then one per channel headed "name [unit]".
JSON: the same columns plus metadata (rate, block, df, window, overlap,
averages, ...).
`;

const schema = z.strictObject({
  channels: listOption().optional(),
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
  kind: z.enum(SPECTRUM_KINDS).optional(),
  average: z.enum(AVERAGING_MODES).optional(),
  tau: numberOption().pipe(z.number().positive("must be a positive number of seconds")).optional(),
  out: z.string().min(1).optional(),
  format: z.enum(["csv", "json"]).optional(),
  ...recordingOptionsShape,
}).refine((v) => v.block === undefined || v.resolution === undefined, {
  message: "give --block or --resolution, not both",
}).refine((v) => v.tau === undefined || v.average === "exponential", {
  message: "--tau applies to --average exponential only",
});

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, {
    channels: { type: "string" },
    block: { type: "string" },
    resolution: { type: "string" },
    overlap: { type: "string" },
    window: { type: "string" },
    detrend: { type: "string" },
    kind: { type: "string" },
    average: { type: "string" },
    tau: { type: "string" },
    out: { type: "string" },
    format: { type: "string" },
    ...RECORDING_OPTIONS,
  }, schema);
  if (positionals.length !== 1) {
    usageError(`spectrum takes one recording, got ${positionals.length}`);
  }
  const [input] = positionals;
  const recording = await readRecordingFile(input, toReadOptions(values));
  const table = inFile(input, () =>
    averagedSpectrum(recording, {
      channels: values.channels,
      block: values.block,
      resolution: values.resolution,
      overlap: values.overlap,
      window: values.window,
      detrend: values.detrend,
      kind: values.kind,
      average: values.average,
      tau: values.tau,
    }));
  const traced = { ...table, metadata: { source: input, ...table.metadata } };
  await writeTable(traced, resolveFormat(values.format, values.out), values.out);
  const m = table.metadata;
  process.stderr.write(
    `spectrum: ${
      table.columns.length - 1
    } channel(s), ${m.kind}, ${m.averages} average(s) of ${m.block} samples, ` +
      `df ${m.df_hz} Hz, ${m.window} window${
        values.out !== undefined ? ` -> ${values.out}` : ""
      }\n`,
  );
}
