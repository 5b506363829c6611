/**
 * HDF5 bench rows of `deno task bench` (also runnable alone: `deno run -A tests/bench/hdf5.ts`):
 * 1. memory: a large HDF5 file (4 × 2^26 float32, 1 GiB, written by Debian's /usr/bin/python3
 *    with h5py to /tmp and deleted after) read → PSD, peak RSS against a small one of 2^16;
 * 2. the start-up of each path: a spectrum of 2^14 samples from HDF5 and from CSV, alternating
 *    pairs, as wall and CPU time (HDF5's includes loading h5wasm, which every HDF5 file of a
 *    process pays once).
 * HDF5 → PSD against CSV → PSD for the same samples is in against_csv.ts. Nothing asserts;
 * skipped when /usr/bin/python3 has no h5py.
 */
import { spawnSync } from "node:child_process";
import { rmSync } from "node:fs";
import { fileURLToPath } from "node:url";
import process from "node:process";
import { timed, type TimedRun } from "./timed.ts";

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

const PAIRS = 5; // alternating HDF5/CSV pairs of the start-up comparison

/** The median of a list. */
const med = (v: number[]) => [...v].sort((x, y) => x - y)[Math.floor(v.length / 2)];

/** Runs the HDF5 bench rows, printing them. */
export function benchHdf5(): void {
  if (spawnSync(PY, ["-c", "import h5py"]).status !== 0) {
    console.log("\nHDF5: skipped (/usr/bin/python3 has no h5py: apt-get install python3-h5py)");
    return;
  }
  const deno = process.execPath;
  const spectrum = (input: string, out: string) =>
    timed(deno, ["run", "-A", MAIN, "spectrum", input, "--block", "8192", "--out", out]);
  const small = "/tmp/quiver-bench-small.h5", large = "/tmp/quiver-bench-large.h5";
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
    writeHdf5(tinyH5, 1 << 14, tinyCsv);
    const h5: TimedRun[] = [], csv: TimedRun[] = [];
    for (let i = 0; i < PAIRS; i++) {
      h5.push(spectrum(tinyH5, "/tmp/quiver-bench-tiny-psd.csv"));
      csv.push(spectrum(tinyCsv, "/tmp/quiver-bench-tiny-psd.csv"));
    }
    const wall = (v: TimedRun[]) => med(v.map((r) => r.seconds)).toFixed(2);
    const cpu = (v: TimedRun[]) => med(v.map((r) => r.cpuSeconds)).toFixed(2);
    console.log(
      `HDF5 start-up, spectrum of 4 × 2^14 samples (${PAIRS} alternating pairs, medians): HDF5 ${
        wall(h5)
      } s (CPU ${cpu(h5)} s), CSV ${wall(csv)} s (CPU ${
        cpu(csv)
      } s); the difference is mostly loading h5wasm`,
    );
  } finally {
    for (const f of [small, large, tinyH5, tinyCsv]) rmSync(f, { force: true });
    for (const f of ["small", "large", "tiny"]) {
      rmSync(`/tmp/quiver-bench-${f}-psd.csv`, { force: true });
      rmSync(`/tmp/quiver-bench-${f}-psd.csv.meta.json`, { force: true });
    }
  }
}

if (import.meta.main) benchHdf5();
