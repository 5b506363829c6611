/**
 * Where the time of `quiver spectrum` goes, stage by stage, each timed alone
 * in this process and in one thread: reading (the file's bytes, one pass),
 * parsing (opening and reading the recording through the one reader, its
 * signal checks included, less the reading), transforms (the spectral core
 * over the same chunks, held in memory) and writing (the PSD table and its
 * sidecar). Start-up is a process's own and is timed by the bench as the
 * floor (`quiver --version`, a tiny `spectrum`). The command overlaps
 * reading and parsing with transforms on two cores for long records
 * (lib/dsp/spectral_pipeline.ts), so its time may be below their sum.
 */
import { closeSync, openSync, readSync } from "node:fs";
import { SpectralAccumulator, type SpectralEstimate } from "../../lib/dsp/spectral_core.ts";
import { autoSpectrum } from "../../lib/dsp/spectrum_kinds.ts";
import { openRecordingStream, readChecked } from "../../lib/io/recording_stream.ts";
import { writeTable } from "../../cli/output.ts";
import { median } from "./bench_files.ts";

/** Seconds per stage, each the median of its runs. */
export interface StageTimes {
  reading: number;
  parsing: number;
  transforms: number;
  writing: number;
}

const seconds = async (work: () => unknown): Promise<number> => {
  const t0 = performance.now();
  await work();
  return (performance.now() - t0) / 1000;
};

/** Reads the whole file in 1 MiB pieces, as the readers do. */
function readBytes(path: string): void {
  const fd = openSync(path, "r");
  const bytes = new Uint8Array(1 << 20);
  try {
    while (readSync(fd, bytes, 0, bytes.length, null) > 0) { /* the bytes only */ }
  } finally {
    closeSync(fd);
  }
}

/** The stages of a PSD of every channel of `path` (block `block`, Hann, 50 %), `runs` times each. */
export async function stageTimes(
  path: string,
  block: number,
  out: string,
  runs = 3,
): Promise<StageTimes> {
  const reading: number[] = [], read: number[] = [], transforms: number[] = [];
  const writing: number[] = [];
  let chunks: Float64Array[][] = [];
  let stream = await openRecordingStream(path);
  for (let i = 0; i < runs; i++) {
    reading.push(await seconds(() => readBytes(path)));
    read.push(
      await seconds(async () => {
        stream = await openRecordingStream(path);
        await readChecked(stream, stream.channels.map((_, c) => c), () => {});
      }),
    );
  }
  await readChecked(
    stream,
    stream.channels.map((_, c) => c),
    (chunk) => chunks.push(chunk.map((c) => c.slice())),
  );
  const options = { rate: stream.rate, block };
  let e: SpectralEstimate | undefined;
  for (let i = 0; i < runs; i++) {
    transforms.push(
      await seconds(() => {
        const accumulator = new SpectralAccumulator(stream.channels.length, options);
        for (const chunk of chunks) accumulator.push(chunk);
        e = accumulator.finish();
      }),
    );
  }
  chunks = [];
  const estimate = e!;
  const table = {
    columns: [
      { name: "frequency_hz", unit: "", values: estimate.frequencies },
      ...stream.channels.map((c, i) => ({
        name: c.name,
        unit: `${c.unit}^2/Hz`,
        values: autoSpectrum(estimate, i, "psd"),
      })),
    ],
    metadata: { source: path, averages: estimate.averages },
  };
  for (let i = 0; i < runs; i++) writing.push(await seconds(() => writeTable(table, "csv", out)));
  const r = median(reading);
  return {
    reading: r,
    parsing: Math.max(0, median(read) - r),
    transforms: median(transforms),
    writing: median(writing),
  };
}
