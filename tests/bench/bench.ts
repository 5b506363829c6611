/**
 * `deno task bench`: quiver's throughput and memory figures, side by side
 * with the peer a practitioner would write instead (tests/bench/peer_welch.py:
 * pandas.read_csv + scipy.signal.welch + DataFrame.to_csv, run with Debian's
 * /usr/bin/python3). Ours and the peer run alternately on the same generated
 * files; medians are reported. It says which machine it ran on and how
 * loaded it was (other work shares the cores), prints the start-up floor
 * and, for each headline row, where the time goes (stages.ts). Benchmarks,
 * not tests: nothing here asserts. `deno task bench --headline` runs the
 * headline rows only.
 *
 * Needs /usr/bin/time (GNU time) for peak RSS and, for the peer figures,
 * `apt-get install -y python3-pandas python3-scipy`.
 */
import { maxOf } from "../../lib/extent.ts";
import { spawn, spawnSync } from "node:child_process";
import { statSync } from "node:fs";
import { mkdir, writeFile } from "node:fs/promises";
import os from "node:os";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { spectralEstimate } from "../../lib/dsp/spectral_core.ts";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { BLOCK, DIR, median, seeded, writeCsv, writeRigWav } from "./bench_files.ts";
import { stageTimes } from "./stages.ts";
import { timed } from "./timed.ts";
import { comfortBench } from "./comfort.ts";
import { loudnessBench } from "./loudness.ts";
import { benchHdf5 } from "./hdf5.ts";
import { benchMdf4 } from "./mdf4.ts";
import { formatsAgainstCsv } from "./against_csv.ts";
import { cpuFloor } from "./startup.ts";

const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));
const PEER = fileURLToPath(new URL("./peer_welch.py", import.meta.url));
const RUNS = 7; // CSV → PSD runs of each side, alternating

const deno = process.execPath;
const quiver = (args: string[]) => timed(deno, ["run", "-A", MAIN, ...args]);
const peerAvailable = spawnSync("/usr/bin/python3", ["-c", "import pandas, scipy"]).status === 0;
const load = () => os.loadavg().map((l) => l.toFixed(2)).join(", ");

await mkdir(DIR, { recursive: true });
console.log(
  `machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${
    (os.totalmem() / 2 ** 30).toFixed(0)
  } GiB; deno ${Deno.version.deno}; ${new Date().toISOString().slice(0, 10)}`,
);
console.log(`load average (1, 5, 15 min) at the start: ${load()}`);
console.log(
  peerAvailable
    ? "peer: /usr/bin/python3 with pandas and scipy"
    : "peer: not installed (apt-get install -y python3-pandas python3-scipy); peer figures skipped",
);

// 0. The start-up floor: a process that loads the command line and prints, and a spectrum of a
// record too short to take any time.
const tiny = `${DIR}/tiny.csv`;
await writeCsv(tiny, 1024);
const floor = (args: string[]) => median([0, 1, 2, 3, 4].map(() => quiver(args).seconds));
const versionFloor = floor(["--version"]);
const spectrumFloor = floor(["spectrum", tiny, "--block", "256", "--out", `${DIR}/tiny_psd.csv`]);
console.log(
  `\nstart-up floor (median of 5): quiver --version ${versionFloor.toFixed(2)} s, ` +
    `spectrum of 1024 samples ${spectrumFloor.toFixed(2)} s`,
);
console.log(`  as CPU time (user + sys, median of 5): ${cpuFloor(MAIN, tiny, `${DIR}/tiny_psd`)}`);

/** One line of where a command's time goes (stages.ts), beside the command's own time. */
async function printStages(path: string, command: number): Promise<void> {
  const t = await stageTimes(path, BLOCK, `${DIR}/stages_psd.csv`);
  const f = (s: number) => `${s.toFixed(2)} s`;
  console.log(
    `  stages, each alone in one thread: start-up ${f(spectrumFloor)}, reading ${
      f(t.reading)
    }, parsing ${f(t.parsing)}, transforms ${f(t.transforms)}, writing ${f(t.writing)}; sum ${
      f(spectrumFloor + t.reading + t.parsing + t.transforms + t.writing)
    }, command ${f(command)}`,
  );
}

// 1. End to end: CSV → averaged PSD → CSV, 2 channels × 2^21 samples.
const csv = `${DIR}/two_channels_2e21.csv`;
await writeCsv(csv, 2 ** 21);
const ours: { seconds: number; rssMb: number }[] = [];
const peer: { seconds: number; rssMb: number }[] = [];
for (let i = 0; i < RUNS; i++) {
  ours.push(
    quiver([
      "spectrum",
      csv,
      "--block",
      String(BLOCK),
      "--window",
      "hann",
      "--overlap",
      "0.5",
      "--out",
      `${DIR}/ours.csv`,
    ]),
  );
  if (peerAvailable) {
    peer.push(timed("/usr/bin/python3", [PEER, csv, `${DIR}/peer.csv`, String(BLOCK)]));
  }
}
const ourTime = median(ours.map((r) => r.seconds));
const ourRss = maxOf(ours.map((r) => r.rssMb));
console.log(
  `\nCSV → PSD, 2 × 2^21 samples (${
    (statSync(csv).size / 1e6).toFixed(0)
  } MB), Hann, 4096 lines, 50 %:`,
);
console.log(`  quiver: ${ourTime.toFixed(2)} s median, peak RSS ${ourRss.toFixed(0)} MB`);
if (peerAvailable) {
  const peerTime = median(peer.map((r) => r.seconds));
  const peerRss = maxOf(peer.map((r) => r.rssMb));
  console.log(`  peer:   ${peerTime.toFixed(2)} s median, peak RSS ${peerRss.toFixed(0)} MB`);
  // Each run of ours is followed by one of the peer's, so a pair shares the machine's state of
  // the moment (its speed drifts by tens of per cent over minutes); the median of the pairs'
  // ratios is the steadier figure, the ratio of the medians is printed beside it.
  const pairs = ours.map((o, i) => o.seconds / peer[i].seconds);
  console.log(
    `  time ratio quiver/peer: median of ${RUNS} paired runs ${
      median(pairs).toFixed(2)
    } (target ≤ 0.35; pairs ${pairs.map((r) => r.toFixed(2)).join(", ")}); ratio of medians ${
      (ourTime / peerTime).toFixed(2)
    }`,
  );
  console.log(`  memory ratio ${(ourRss / peerRss).toFixed(2)} (target ≤ 1.0)`);
}
await printStages(csv, ourTime);

// 2. The spectral core alone, in memory.
const n = 2 ** 21;
const r = seeded(3);
const a = new Float64Array(n).map(() => r()), b = new Float64Array(n).map(() => r());
const coreRuns: number[] = [];
for (let i = 0; i < 5; i++) {
  const t0 = performance.now();
  spectralEstimate([a, b], { rate: 51200, block: BLOCK });
  coreRuns.push((2 * n) / ((performance.now() - t0) / 1000));
}
// The best of five, as the peer script reports its best of five (the same statistic on both sides).
const coreRate = maxOf(coreRuns);
console.log(
  `\nSpectral core in memory, 2 × 2^21 samples: ${
    (coreRate / 1e6).toFixed(1)
  } M samples/s (best of 5)`,
);
if (peerAvailable) {
  const welch = Number(
    spawnSync("/usr/bin/python3", [PEER, "--core", String(n), String(BLOCK)], { encoding: "utf8" })
      .stdout,
  );
  console.log(
    `  scipy.signal.welch: ${(welch / 1e6).toFixed(1)} M samples/s (best of 5); ratio ${
      (coreRate / welch).toFixed(2)
    } (target ≥ 0.67)`,
  );
}

// 3. Ingest: the chunked CSV reader alone.
{
  const t0 = performance.now();
  const stream = await openRecordingStream(csv);
  await stream.read([0, 1], () => {});
  const s = (performance.now() - t0) / 1000;
  console.log(
    `\nCSV ingest (chunked fast path): ${(statSync(csv).size / 1e6 / s).toFixed(0)} MB/s`,
  );
}

// 4. WAV → PSD against scipy.io.wavfile + welch, and memory against record length for every
// recording command: a 4-channel WAV (TTL tacho of a run-up, hammer hits, a response, a
// calibrator tone) of 2^20 and of 2^24 samples.
const setup = `${DIR}/rig_setup.json`;
await writeFile(
  setup,
  JSON.stringify({ channels: { ch4: { full_scale_volts: 1 } } }),
);
const commands: Record<string, (wav: string) => string[]> = {
  spectrum: (w) => ["spectrum", w, "--block", String(BLOCK), "--out", `${DIR}/r_spectrum.csv`],
  frf: (w) => ["frf", w, "--input", "ch2", "--outputs", "ch3", "--out", `${DIR}/r_frf.csv`],
  hammer: (
    w,
  ) => ["hammer", w, "--force", "ch2", "--outputs", "ch3", "--out", `${DIR}/r_hammer.csv`],
  "bands (fft)": (w) => ["bands", w, "--reference", "1", "--out", `${DIR}/r_bands.csv`],
  "bands (filter)": (w) => [
    "bands",
    w,
    "--reference",
    "1",
    "--method",
    "filter",
    "--min-hz",
    "100",
    "--out",
    `${DIR}/r_bandsf.csv`,
  ],
  level: (w) => ["level", w, "--reference", "1", "--out", `${DIR}/r_level.csv`],
  calibrate: (
    w,
  ) => ["calibrate", w, "--channel", "ch4", "--setup", setup, "--out", `${DIR}/r_cal.json`],
  orders: (w) => [
    "orders",
    w,
    "--tacho",
    "ch1",
    "--ppr",
    "2",
    "--channels",
    "ch3",
    "--orders",
    "2",
    "--rpm-step",
    "500",
    "--out",
    `${DIR}/r_orders.csv`,
  ],
};
const rigs = [20, 24].map((e) => `${DIR}/rig_2e${e}.wav`);
await writeRigWav(rigs[0], 2 ** 20);
await writeRigWav(rigs[1], 2 ** 24);
console.log(
  `\nWAV → PSD, 4 × 2^24 samples (${(statSync(rigs[1]).size / 1e6).toFixed(0)} MB float32):`,
);
{
  // Alternating, as for CSV: the median of the pairs' ratios is the figure.
  const wavOurs: number[] = [], wavPeer: number[] = [];
  for (let i = 0; i < 3; i++) {
    wavOurs.push(quiver(commands.spectrum(rigs[1])).seconds);
    if (peerAvailable) {
      wavPeer.push(
        timed("/usr/bin/python3", [PEER, "--wav", rigs[1], `${DIR}/peer_wav.csv`, String(BLOCK)])
          .seconds,
      );
    }
  }
  const ourWav = median(wavOurs);
  console.log(`  quiver: ${ourWav.toFixed(2)} s median`);
  if (peerAvailable) {
    const pairs = wavOurs.map((o, i) => o / wavPeer[i]);
    console.log(
      `  peer:   ${median(wavPeer).toFixed(2)} s median; time ratio quiver/peer: median of 3 ` +
        `paired runs ${median(pairs).toFixed(2)} (target ≤ 0.25; pairs ${
          pairs.map((r) => r.toFixed(2)).join(", ")
        })`,
    );
  }
  await printStages(rigs[1], ourWav);
}
await benchMdf4(quiver); // MDF 4 → PSD's memory against record length
// MDF 4 → PSD and HDF5 → PSD against CSV → PSD for the same samples, at 4 × 2^21 and 4 × 2^24.
await formatsAgainstCsv();
// `--headline`: the headline rows only (start-up floor, CSV and WAV → PSD with their stages, the
// core, ingest), without the memory table and the campaign.
await loudnessBench(quiver, Deno.args.includes("--headline"));
if (!Deno.args.includes("--headline")) await memoryAndCampaign();
if (!Deno.args.includes("--headline")) await comfortBench(); // ride comfort (issue #31)

async function memoryAndCampaign(): Promise<void> {
  console.log("\nPeak RSS against record length (4-channel WAV, 2^20 and 2^24 samples):");
  for (const [name, args] of Object.entries(commands)) {
    const rss = rigs.map((w) => maxOf([0, 1].map(() => quiver(args(w)).rssMb)));
    console.log(
      `  ${name.padEnd(15)} ${rss[0].toFixed(0).padStart(5)} MB → ${
        rss[1].toFixed(0).padStart(5)
      } MB; ratio ${(rss[1] / rss[0]).toFixed(2)} (target ≤ 1.5)`,
    );
  }

  // 5. A campaign of 8 recordings: --jobs 1 against --jobs 2.
  const campaign = {
    quiver_plan: 1,
    title: "bench campaign",
    recordings: Object.fromEntries(
      Array.from({ length: 8 }, (_, i) => [`r${i}`, { file: "two_channels_2e21.csv" }]),
    ),
    analyses: Array.from(
      { length: 8 },
      (_, i) => ({
        id: `psd${i}`,
        command: "spectrum",
        recording: `r${i}`,
        options: { block: BLOCK },
      }),
    ),
  };
  await writeFile(`${DIR}/campaign.json`, JSON.stringify(campaign));
  const campaignTimes: Record<string, number[]> = { 1: [], 2: [] };
  for (let i = 0; i < 3; i++) {
    for (const jobs of [1, 2]) {
      campaignTimes[jobs].push(
        quiver([
          "run",
          `${DIR}/campaign.json`,
          "--out-dir",
          `${DIR}/campaign_${jobs}`,
          "--jobs",
          String(jobs),
        ]).seconds,
      );
    }
  }
  const c1 = median(campaignTimes[1]), c2 = median(campaignTimes[2]);
  // What this machine gives two independent processes: two spectra one after the other,
  // against the same two side by side.
  const pair = ["spectrum", csv, "--block", String(BLOCK), "--out"];
  const sequential: number[] = [], parallel: number[] = [];
  for (let i = 0; i < 3; i++) {
    const t0 = performance.now();
    quiver([...pair, `${DIR}/p1.csv`]);
    quiver([...pair, `${DIR}/p2.csv`]);
    sequential.push((performance.now() - t0) / 1000);
    const t1 = performance.now();
    await Promise.all([`${DIR}/p1.csv`, `${DIR}/p2.csv`].map((out) =>
      new Promise<void>((done) => {
        const child = spawn(deno, ["run", "-A", MAIN, ...pair, out]);
        child.on("exit", () => done());
      })
    ));
    parallel.push((performance.now() - t1) / 1000);
  }
  const independent = median(sequential) / median(parallel);
  console.log(
    `\nCampaign of 8 recordings: --jobs 1 ${c1.toFixed(2)} s, --jobs 2 ${
      c2.toFixed(2)
    } s; speed-up ${(c1 / c2).toFixed(2)}; two independent processes ${
      independent.toFixed(2)
    }; ratio ${(c1 / c2 / independent).toFixed(2)} (target ≥ 0.9)`,
  );
}

if (!Deno.args.includes("--headline")) await (await import("./formats_bench.ts")).formatRows();
benchHdf5(); // HDF5: memory of a 1 GiB file, and the start-up loading h5wasm adds

console.log(`\nload average (1, 5, 15 min) at the end: ${load()}`);
