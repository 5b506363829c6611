/**
 * `deno run -A tests/bench/spectrum_driver.ts IN OUT SPECTRAL`: what
 * `quiver spectrum IN --block 8192 --out OUT` does (read, the spectral core,
 * the PSD table written as CSV with its sidecar), with the internal switch
 * of the worker path set: SPECTRAL `auto` or a number of threads (how many
 * share the transforms: `1` none but this one). For worker_paths.ts, which
 * times the path on against off in alternating processes. A measurement
 * aid, not a test.
 */
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { spectralEstimateOf } from "../../lib/dsp/spectral_pipeline.ts";
import { autoSpectrum } from "../../lib/dsp/spectrum_kinds.ts";
import { writeTable } from "../../cli/output.ts";
import { BLOCK } from "./bench_files.ts";

const [input, out, spectral] = Deno.args;
const stream = await openRecordingStream(input);
const indices = stream.channels.map((_, i) => i);
const { estimate } = await spectralEstimateOf(
  stream,
  indices,
  { rate: stream.rate, block: BLOCK },
  spectral === "auto" ? {} : { threads: Number(spectral) },
);
await writeTable(
  {
    columns: [
      { name: "frequency_hz", unit: "", values: estimate.frequencies },
      ...stream.channels.map((c, i) => ({
        name: c.name,
        unit: `${c.unit}^2/Hz`,
        values: autoSpectrum(estimate, i, "psd"),
      })),
    ],
    metadata: { source: input, averages: estimate.averages },
  },
  "csv",
  out,
);
