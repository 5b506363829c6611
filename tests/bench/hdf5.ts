/**
 * HDF5 bench rows of `deno task bench` (also runnable alone: `deno run -A tests/bench/hdf5.ts`):
 * 1. memory: a large HDF5 file (4 × 2^26 float32, 1 GiB, written by Debian's /usr/bin/python3
 *    with h5py to /tmp and deleted after) read → PSD, peak RSS against a small one of 2^16;
 * 2. speed: HDF5 → PSD against CSV → PSD for the same samples (4 × 2^21), alternating pairs,
 *    medians and the median of the pairs' own ratios;
 * 3. where the difference goes: the start-up of each path (a spectrum of 2^14 samples of each,
 *    alternating: HDF5's includes loading h5wasm), and opening and reading alone in this process
 *    (best of 3, the library already loaded).
 * Nothing asserts; skipped when /usr/bin/python3 has no h5py.
 */
import { spawnSync } from "node:child_process";
import { rmSync } from "node:fs";
import { fileURLToPath } from "node:url";
import process from "node:process";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { timed } from "./timed.ts";

const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));
const PY = "/usr/bin/python3";

/** Writes `path` with h5py: group /run, 4 float32 channels of `n` samples, sample_rate 51 200 Hz. */
function writeHdf5(path: string, n: number, csv?: string): void {
  const script = `
import h5py, numpy as np, sys
n = ${n}; step = 1 << 21
with h5py.File("${path}", "w") as f:
    g = f.create_group("run"); g.attrs["sample_rate"] = 51200.0
    for k in range(4):
        d = g.create_dataset(f"ch{k}", shape=(n,), dtype="f4")
        for i in range(0, n, step):
            d[i:i + step] = np.random.default_rng(k * 7919 + i).standard_normal(min(step, n - i)).astype("f4")
if ${csv === undefined ? "False" : "True"}:
    with h5py.File("${path}", "r") as f, open("${csv}", "w") as out:
        out.write("time_s,ch0,ch1,ch2,ch3\\n")
        cols = [f[f"run/ch{k}"][:].astype(np.float64) for k in range(4)]
        t = np.arange(n) / 51200.0
        np.savetxt(out, np.column_stack([t] + cols), delimiter=",", fmt="%.9g")
`;
  const r = spawnSync(PY, ["-c", script], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`h5py could not write ${path}: ${r.stderr}`);
}

const PAIRS = 5; // alternating HDF5/CSV pairs of each timed comparison

/** The median of a list. */
const med = (v: number[]) => [...v].sort((x, y) => x - y)[Math.floor(v.length / 2)];

/** Opening and reading every channel in this process, best of 3 (s). */
async function ingest(path: string): Promise<number> {
  let best = Infinity;
  for (let i = 0; i < 3; i++) {
    const t0 = performance.now();
    const stream = await openRecordingStream(path);
    await stream.read(stream.channels.map((_, k) => k), () => {});
    best = Math.min(best, (performance.now() - t0) / 1000);
  }
  return best;
}

/** Runs the HDF5 bench rows, printing them. */
export async function benchHdf5(): Promise<void> {
  if (spawnSync(PY, ["-c", "import h5py"]).status !== 0) {
    console.log("\nHDF5: skipped (/usr/bin/python3 has no h5py: apt-get install python3-h5py)");
    return;
  }
  const deno = process.execPath;
  const spectrum = (input: string, out: string) =>
    timed(deno, ["run", "-A", MAIN, "spectrum", input, "--block", "8192", "--out", out]);
  const small = "/tmp/quiver-bench-small.h5", large = "/tmp/quiver-bench-large.h5";
  const mid = "/tmp/quiver-bench-mid.h5", midCsv = "/tmp/quiver-bench-mid.csv";
  const tinyH5 = "/tmp/quiver-bench-tiny.h5", tinyCsv = "/tmp/quiver-bench-tiny.csv";
  try {
    writeHdf5(small, 1 << 16);
    writeHdf5(large, 1 << 26);
    const a = spectrum(small, "/tmp/quiver-bench-small-psd.csv");
    const b = spectrum(large, "/tmp/quiver-bench-large-psd.csv");
    console.log(
      `\nHDF5 → PSD, 4 × 2^16 float32: ${a.seconds.toFixed(2)} s, peak RSS ${
        a.rssMb.toFixed(0)
      } MB; 4 × 2^26 float32 (1 GiB): ${b.seconds.toFixed(2)} s, peak RSS ${
        b.rssMb.toFixed(0)
      } MB (ratio ${(b.rssMb / a.rssMb).toFixed(2)}; target: about 1)`,
    );
    rmSync(large, { force: true });
    writeHdf5(mid, 1 << 21, midCsv);
    writeHdf5(tinyH5, 1 << 14, tinyCsv);
    const pairs = (h5: string, csv: string) => {
      const t = { h5: [] as number[], csv: [] as number[], ratio: [] as number[] };
      for (let i = 0; i < PAIRS; i++) {
        const a = spectrum(h5, "/tmp/quiver-bench-mid-psd.csv").seconds;
        const b = spectrum(csv, "/tmp/quiver-bench-mid-psd.csv").seconds;
        t.h5.push(a), t.csv.push(b), t.ratio.push(b / a);
      }
      return t;
    };
    const speed = pairs(mid, midCsv);
    console.log(
      `HDF5 → PSD against CSV → PSD, same 4 × 2^21 samples (${PAIRS} alternating pairs): HDF5 ${
        med(speed.h5).toFixed(2)
      } s, CSV ${med(speed.csv).toFixed(2)} s; CSV/HDF5 ${
        (med(speed.csv) / med(speed.h5)).toFixed(2)
      } (pairs ${speed.ratio.map((r) => r.toFixed(2)).join(", ")}; goal: several times)`,
    );
    const floor = pairs(tinyH5, tinyCsv);
    const [ih, ic] = [await ingest(mid), await ingest(midCsv)];
    console.log(
      `  start-up, spectrum of 2^14 samples: HDF5 ${med(floor.h5).toFixed(2)} s, CSV ${
        med(floor.csv).toFixed(2)
      } s (HDF5's includes loading h5wasm); opening and reading alone, in this process (best of 3): HDF5 ${
        ih.toFixed(2)
      } s, CSV ${ic.toFixed(2)} s; ratio ${(ic / ih).toFixed(1)}`,
    );
  } finally {
    for (const f of [small, large, mid, midCsv, tinyH5, tinyCsv]) rmSync(f, { force: true });
    for (const f of ["small", "large", "mid"]) {
      rmSync(`/tmp/quiver-bench-${f}-psd.csv`, { force: true });
      rmSync(`/tmp/quiver-bench-${f}-psd.csv.meta.json`, { force: true });
    }
  }
}

if (import.meta.main) await benchHdf5();
