/**
 * Bench rows of the recording formats MAT v5 and RF64 (`deno task bench`, after the others;
 * `deno run -A tests/bench/formats_bench.ts` alone). Not a test: nothing asserts.
 *
 * - MAT v5 → PSD against CSV → PSD for the same samples (2 channels × 2^21, plain and
 *   compressed MAT), alternating runs, median of the paired ratios.
 * - A 5 GB RF64 file (2 float32 channels; written sparse to /tmp: a header, then the data chunk's
 *   samples left as holes that read as zeros, with noise in its first and last MiB) read → PSD,
 *   with the peak RSS of the same command on a small RF64 file beside it; both deleted after.
 */
import { closeSync, ftruncateSync, openSync, statSync, unlinkSync, writeSync } from "node:fs";
import { existsSync } from "node:fs";
import { mkdir, writeFile } from "node:fs/promises";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { mat5File } from "../helpers/mat5_write.ts";
import { BLOCK, DIR, median, seeded } from "./bench_files.ts";
import { timed } from "./timed.ts";

const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));
const quiver = (args: string[]) => timed(process.execPath, ["run", "-A", MAIN, ...args]);
const RATE = 51200;

/** The same 2 × n samples as CSV (9 significant digits) and as MAT v5, plain and compressed. */
async function writeSamePair(n: number): Promise<{ csv: string; mat: string; matZ: string }> {
  const csv = `${DIR}/formats_same_${n}.csv`;
  const mat = `${DIR}/formats_same_${n}.mat`, matZ = `${DIR}/formats_same_${n}_z.mat`;
  if (existsSync(csv) && existsSync(mat) && existsSync(matZ)) return { csv, mat, matZ };
  const r = seeded(n + 7);
  const a = new Float64Array(n), b = new Float64Array(n);
  const rows: string[] = ["time_s,wheel_hub_z [m/s^2],seat_rail_z [m/s^2]"];
  for (let i = 0; i < n; i++) {
    const x = r().toPrecision(9), y = r().toPrecision(9);
    a[i] = Number(x);
    b[i] = Number(y);
    rows.push(`${i / RATE},${x},${y}`);
  }
  await writeFile(csv, rows.join("\n") + "\n");
  const variables = [
    { name: "fs", values: new Float64Array([RATE]) },
    { name: "wheel_hub_z", values: a },
    { name: "seat_rail_z", values: b },
  ];
  await writeFile(mat, mat5File(variables, false));
  await writeFile(matZ, mat5File(variables, true));
  return { csv, mat, matZ };
}

/**
 * An RF64 file of 2 float32 channels with `dataBytes` of samples (EBU Tech 3306: "RF64",
 * 0xFFFFFFFF, "WAVE", ds64 with the 64-bit sizes, fmt, data of size 0xFFFFFFFF), sparse.
 */
function writeSparseRf64(path: string, dataBytes: number): void {
  const header = new Uint8Array(12 + 36 + 24 + 8);
  const v = new DataView(header.buffer);
  const put = (at: number, s: string) =>
    [...s].forEach((c, i) => (header[at + i] = c.charCodeAt(0)));
  put(0, "RF64");
  v.setUint32(4, 0xffffffff, true);
  put(8, "WAVE");
  put(12, "ds64");
  v.setUint32(16, 28, true);
  v.setBigUint64(20, BigInt(header.length - 8 + dataBytes), true);
  v.setBigUint64(28, BigInt(dataBytes), true);
  v.setBigUint64(36, BigInt(dataBytes / 8), true);
  v.setUint32(44, 0, true);
  put(48, "fmt ");
  v.setUint32(52, 16, true);
  v.setUint16(56, 3, true); // IEEE float
  v.setUint16(58, 2, true);
  v.setUint32(60, RATE, true);
  v.setUint32(64, RATE * 8, true);
  v.setUint16(68, 8, true);
  v.setUint16(70, 32, true);
  put(72, "data");
  v.setUint32(76, 0xffffffff, true);
  const fd = openSync(path, "w");
  try {
    writeSync(fd, header, 0, header.length, 0);
    const r = seeded(5);
    const noise = new Float32Array(1 << 18).map(() => r());
    const bytes = new Uint8Array(noise.buffer);
    writeSync(fd, bytes, 0, bytes.length, header.length);
    writeSync(fd, bytes, 0, bytes.length, header.length + dataBytes - bytes.length);
    ftruncateSync(fd, header.length + dataBytes);
  } finally {
    closeSync(fd);
  }
}

/** Prints the MAT v5 and RF64 rows. */
export async function formatRows(): Promise<void> {
  await mkdir(DIR, { recursive: true });
  const { csv, mat, matZ } = await writeSamePair(2 ** 21);
  const spectrum = (file: string) => [
    "spectrum",
    file,
    "--block",
    String(BLOCK),
    "--out",
    `${DIR}/formats_psd.csv`,
  ];
  const times: Record<string, number[]> = { csv: [], mat: [], matZ: [] };
  for (let i = 0; i < 3; i++) {
    times.csv.push(quiver(spectrum(csv)).seconds);
    times.mat.push(quiver(spectrum(mat)).seconds);
    times.matZ.push(quiver(spectrum(matZ)).seconds);
  }
  const ratio = (k: string) => median(times[k].map((t, i) => times.csv[i] / t)).toFixed(2);
  console.log(
    `\nMAT v5 → PSD against CSV → PSD, the same 2 × 2^21 samples (CSV ${
      (statSync(csv).size / 1e6).toFixed(0)
    } MB, MAT ${(statSync(mat).size / 1e6).toFixed(0)} MB, compressed ${
      (statSync(matZ).size / 1e6).toFixed(0)
    } MB):`,
  );
  console.log(
    `  CSV ${median(times.csv).toFixed(2)} s, MAT ${median(times.mat).toFixed(2)} s, ` +
      `compressed MAT ${median(times.matZ).toFixed(2)} s (medians of 3); CSV/MAT time ratio ` +
      `${ratio("mat")}, CSV/compressed ${ratio("matZ")} (goal: several times faster)`,
  );

  // The reading alone, in this process (the command's start-up and transforms are the same for
  // both): best of 3 of opening and reading both channels.
  const ingest = async (file: string) => {
    const runs: number[] = [];
    for (let i = 0; i < 3; i++) {
      const t0 = performance.now();
      const stream = await openRecordingStream(file);
      await stream.read([0, 1], () => {});
      runs.push((performance.now() - t0) / 1000);
    }
    return Math.min(...runs);
  };
  const [ic, im, iz] = [await ingest(csv), await ingest(mat), await ingest(matZ)];
  console.log(
    `  reading alone (best of 3): CSV ${ic.toFixed(2)} s, MAT ${im.toFixed(2)} s, compressed MAT ${
      iz.toFixed(2)
    } s; CSV/MAT ${(ic / im).toFixed(1)}, CSV/compressed ${(ic / iz).toFixed(1)}`,
  );

  const big = "/tmp/quiver_bench_5gb_rf64.wav", small = "/tmp/quiver_bench_small_rf64.wav";
  try {
    writeSparseRf64(big, 5 * 2 ** 30);
    writeSparseRf64(small, 2 ** 24);
    const psd = (file: string) =>
      quiver([...spectrum(file).slice(0, 4), "--out", `${DIR}/rf64.csv`]);
    const s = psd(small), b = psd(big);
    console.log(
      `\nRF64 → PSD, 2 float32 channels: 16 MiB ${s.seconds.toFixed(1)} s, peak RSS ${
        s.rssMb.toFixed(0)
      } MB; 5 GiB ${b.seconds.toFixed(1)} s, peak RSS ${b.rssMb.toFixed(0)} MB; ratio ${
        (b.rssMb / s.rssMb).toFixed(2)
      } (target ≤ 1.5)`,
    );
  } finally {
    for (const f of [big, small]) if (existsSync(f)) unlinkSync(f);
  }
}

if (import.meta.main) await formatRows();
