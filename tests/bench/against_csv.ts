/**
 * MDF 4 → PSD and HDF5 → PSD against CSV → PSD for the same samples (issue #33's goal: several
 * times faster than CSV), at two sizes: 4 channels × 2^21 samples and 4 × 2^24 (the WAV
 * headline's size, where reading dominates the CSV path). `deno task bench` runs it;
 * `deno run -A tests/bench/against_csv.ts [--small-only]` alone. A measurement: nothing asserts.
 *
 * The three files of a size hold the same samples to the bit: int16 codes of noise times 2^-15,
 * which float32 (HDF5, written by Debian's /usr/bin/python3 with h5py, contiguous datasets), an
 * MDF 4 logger's int16 codes with the linear conversion 2^-15 (fixtures/demo/mdf4_logger.ts) and
 * CSV (each value printed in the fewest digits that read back exactly) all hold exactly; the PSD
 * tables of the three are compared byte for byte. Written once under out/bench/ and reused.
 *
 * For each size: the three commands run in rotating order (a round shares the machine's state of
 * its moment), medians of wall and CPU time and the median of the rounds' own ratios CSV/format;
 * opening and reading alone in this process (best of 3, HDF5's library already loaded); and the
 * Amdahl bound from the CSV path's stages (stages.ts): what a reader of no cost at all would give,
 * (start-up + reading + parsing + transforms + writing) / (start-up + transforms + writing). The
 * HDF5 row is skipped when /usr/bin/python3 has no h5py.
 */
import { spawnSync } from "node:child_process";
import { existsSync, readFileSync, renameSync, rmSync, statSync } from "node:fs";
import { mkdir, open, writeFile } from "node:fs/promises";
import os from "node:os";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { loggerMdf4 } from "../../fixtures/demo/mdf4_logger.ts";
import { BLOCK, DIR, median, seeded, writeCsv } from "./bench_files.ts";
import { stageTimes } from "./stages.ts";
import { timed, type TimedRun } from "./timed.ts";

const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));
const PY = "/usr/bin/python3";
const RATE = 51200;
const CHANNELS = 4;
const LSB = 2 ** -15; // code × 2^-15: exact in float32, in float64 and in the shortest decimal

const quiver = (args: string[]) => timed(process.execPath, ["run", "-A", MAIN, ...args]);
const load = () => os.loadavg().map((l) => l.toFixed(2)).join(", ");

/** The int16 codes of channel `c`, `n` samples (noise within ±30 000). */
function codes(n: number, c: number): Int16Array {
  const r = seeded(n * 8 + c);
  return Int16Array.from({ length: n }, () => Math.round(r() * 60000));
}

/** The stem's CSV, MDF 4 and (with h5py) HDF5 files of 4 × `n` samples, unless they exist. */
async function writeSameSamples(stem: string, n: number, hdf5: boolean): Promise<void> {
  const want = [".csv", ".mf4", ...(hdf5 ? [".h5"] : [])];
  if (want.every((ext) => existsSync(`${stem}${ext}`))) return;
  const all = Array.from({ length: CHANNELS }, (_, c) => codes(n, c));
  const names = all.map((_, c) => `ch${c}`);
  // CSV, written in pieces under a temporary name (a run stopped half-way leaves no file).
  const part = `${stem}.csv.part`;
  const out = await open(part, "w");
  try {
    await out.write(`time_s,${names.map((c) => `${c} [m/s^2]`).join(",")}\n`);
    const rows = 1 << 16;
    for (let i0 = 0; i0 < n; i0 += rows) {
      const lines: string[] = [];
      for (let i = i0; i < Math.min(n, i0 + rows); i++) {
        let line = String(i / RATE);
        for (let c = 0; c < CHANNELS; c++) line += `,${all[c][i] * LSB}`;
        lines.push(line);
      }
      await out.write(lines.join("\n") + "\n");
    }
  } finally {
    await out.close();
  }
  renameSync(part, `${stem}.csv`);
  // MDF 4: range 32767 × 2^-15 makes the logger's conversion factor (range / 32767) 2^-15.
  await writeFile(
    `${stem}.mf4`,
    loggerMdf4(
      "bench",
      RATE,
      all.map((k, c) => ({
        name: names[c],
        unit: "m/s^2",
        data: Float64Array.from(k, (v) => v * LSB),
        range: 32767 * LSB,
      })),
    ),
  );
  if (!hdf5) return;
  const raw = `${stem}.i16`;
  const interleaved = new Int16Array(n * CHANNELS);
  all.forEach((k, c) => k.forEach((v, i) => (interleaved[i * CHANNELS + c] = v)));
  await writeFile(raw, new Uint8Array(interleaved.buffer));
  const script = `
import h5py, numpy as np
codes = np.fromfile("${raw}", dtype="<i2").reshape(-1, ${CHANNELS})
with h5py.File("${stem}.h5", "w") as f:
    g = f.create_group("run"); g.attrs["sample_rate"] = ${RATE}.0
    for c in range(${CHANNELS}):
        d = g.create_dataset(f"ch{c}", data=codes[:, c].astype("f4") * np.float32(2.0 ** -15))
        d.attrs["unit"] = "m/s^2"
`;
  const r = spawnSync(PY, ["-c", script], { encoding: "utf8" });
  rmSync(raw, { force: true });
  if (r.status !== 0) throw new Error(`h5py could not write ${stem}.h5: ${r.stderr}`);
}

/** Opening and reading every channel in this process, best of 3 (s). */
async function readingAlone(path: string): Promise<number> {
  let best = Infinity;
  for (let i = 0; i < 3; i++) {
    const t0 = performance.now();
    const stream = await openRecordingStream(path);
    await stream.read(stream.channels.map((_, k) => k), () => {});
    best = Math.min(best, (performance.now() - t0) / 1000);
  }
  return best;
}

const s2 = (s: number) => `${s.toFixed(2)} s`;

/** Prints the rows of one size: 4 × `n` samples, `rounds` rotating rounds. */
async function compare(n: number, label: string, rounds: number, hdf5: boolean): Promise<void> {
  const stem = `${DIR}/same_samples_4x${label.replace("^", "e")}`;
  await writeSameSamples(stem, n, hdf5);
  const formats = ["csv", "mf4", ...(hdf5 ? ["h5"] : [])];
  const runs: Record<string, TimedRun[]> = Object.fromEntries(formats.map((f) => [f, []]));
  const psd = (f: string) => `${DIR}/same_samples_psd_${f}.csv`;
  for (let round = 0; round < rounds; round++) {
    for (let k = 0; k < formats.length; k++) {
      const f = formats[(round + k) % formats.length];
      runs[f].push(quiver(["spectrum", `${stem}.${f}`, "--block", String(BLOCK), "--out", psd(f)]));
    }
  }
  const same = formats.every((f) => readFileSync(psd(f)).equals(readFileSync(psd("csv"))));
  const mb = (f: string) => (statSync(`${stem}.${f}`).size / 1e6).toFixed(0);
  console.log(
    `\n4 × ${label} samples (CSV ${mb("csv")} MB, MDF 4 ${mb("mf4")} MB${
      hdf5 ? `, HDF5 ${mb("h5")} MB` : ""
    }), spectrum → PSD CSV, ${rounds} rounds in rotating order; load ${load()}; ` +
      `PSD tables equal to the byte: ${same ? "yes" : "NO"}`,
  );
  const wall = (f: string) => median(runs[f].map((r) => r.seconds));
  const cpu = (f: string) => median(runs[f].map((r) => r.cpuSeconds));
  console.log(`  CSV → PSD ${s2(wall("csv"))} (CPU ${s2(cpu("csv"))})`);
  const read = { csv: await readingAlone(`${stem}.csv`) } as Record<string, number>;
  for (const f of formats.slice(1)) read[f] = await readingAlone(`${stem}.${f}`);
  for (const f of formats.slice(1)) {
    const ratios = runs.csv.map((r, i) => r.seconds / runs[f][i].seconds);
    console.log(
      `  ${f === "h5" ? "HDF5" : "MDF 4"} → PSD ${s2(wall(f))} (CPU ${s2(cpu(f))}): CSV/${
        f === "h5" ? "HDF5" : "MDF 4"
      } ${median(ratios).toFixed(2)} (median of the rounds; ${
        ratios.map((r) => r.toFixed(2)).join(", ")
      }; CPU ${(cpu("csv") / cpu(f)).toFixed(2)}); reading alone ${s2(read[f])} against CSV's ${
        s2(read.csv)
      } (${(read.csv / read[f]).toFixed(1)}×)`,
    );
  }
  // The bound: the CSV path with its reading and parsing taken away (start-up as a tiny spectrum).
  const tiny = `${DIR}/tiny.csv`;
  await writeCsv(tiny, 1024);
  const floor = median(
    [0, 1, 2].map(() =>
      quiver(["spectrum", tiny, "--block", "256", "--out", `${DIR}/tiny_psd.csv`]).seconds
    ),
  );
  const t = await stageTimes(`${stem}.csv`, BLOCK, `${DIR}/same_samples_stages.csv`, 1);
  const sum = floor + t.reading + t.parsing + t.transforms + t.writing;
  console.log(
    `  CSV stages (one thread): start-up ${s2(floor)}, reading ${s2(t.reading)}, parsing ${
      s2(t.parsing)
    }, transforms ${s2(t.transforms)}, writing ${s2(t.writing)}; Amdahl bound (a reader of no ` +
      `cost): ${(sum / (floor + t.transforms + t.writing)).toFixed(2)}×`,
  );
}

/** Prints the rows of both sizes (the large one unless `smallOnly`). */
export async function formatsAgainstCsv(smallOnly = false): Promise<void> {
  await mkdir(DIR, { recursive: true });
  const hdf5 = spawnSync(PY, ["-c", "import h5py"]).status === 0;
  if (!hdf5) console.log("\nHDF5 rows skipped: /usr/bin/python3 has no h5py (python3-h5py)");
  await compare(2 ** 21, "2^21", 5, hdf5);
  if (!smallOnly) await compare(2 ** 24, "2^24", 3, hdf5);
}

if (import.meta.main) {
  console.log(`load average (1, 5, 15 min) at the start: ${load()}`);
  await formatsAgainstCsv(Deno.args.includes("--small-only"));
  console.log(`\nload average (1, 5, 15 min) at the end: ${load()}`);
}
