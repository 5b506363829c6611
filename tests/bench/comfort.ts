/**
 * The ride-comfort rows of `deno task bench` (issue #31); also runs alone:
 * `deno run -A tests/bench/comfort.ts`.
 *
 * 1. Throughput of the Wk weighting filter on the same 2^22 samples, quiver's
 *    CascadeFilter in this process against scipy.signal.sosfilt (Debian's
 *    /usr/bin/python3) on the same second-order sections: samples per second
 *    of each and their ratio, in one run (the median of 5 alternating timings
 *    each). The outputs are compared too, so the two really do the same work.
 * 2. End to end: `quiver comfort` on a three-axis seat-pad WAV (float32,
 *    2048 Hz, 10 min) against the script a practitioner would write
 *    (scipy.io.wavfile, sosfilt with the same sections, a_w, running r.m.s.
 *    τ = 1 s, MTVV, VDV, crest factor, a CSV), both under GNU time.
 * 3. Memory flat in record length: peak RSS of `quiver comfort` on 10 min
 *    against 2 h of the same seat pad (goal: ratio ≤ 1.5).
 *
 * Benchmarks, not tests: nothing here asserts. Figures from a loaded machine
 * say little; the ratios say more.
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { writeFile } from "node:fs/promises";
import { mkdir } from "node:fs/promises";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { CascadeFilter } from "../../lib/acoustics/biquad.ts";
import { weightingSections } from "../../lib/comfort/vibration_weighting.ts";
import { encodeWav } from "../../lib/io/wav.ts";
import { maxOf } from "../../lib/extent.ts";
import { gaussianGenerator } from "../helpers/random.ts";
import { DIR, median } from "./bench_files.ts";
import { timed } from "./timed.ts";

const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));
const PYTHON = "/usr/bin/python3";
const RATE = 2048;

/** The peer: sosfilt alone (mode "filter") or the whole seat-pad assessment (mode "wav"). */
const PEER = String.raw`
import json, sys, time
import numpy as np
import scipy.signal as sig
mode, sos_path = sys.argv[1], sys.argv[2]
sos = np.array(json.load(open(sos_path)))
if mode == "filter":
    x = np.fromfile(sys.argv[3], dtype="<f8")
    times = []
    for _ in range(5):
        t0 = time.perf_counter()
        y = sig.sosfilt(sos, x)
        times.append(time.perf_counter() - t0)
    y.astype("<f8").tofile(sys.argv[4])
    print(sorted(times)[2])
else:
    from scipy.io import wavfile
    rate, data = wavfile.read(sys.argv[3])
    n = int(round(rate))  # tau = 1 s
    rows = ["axis,aw,mtvv,vdv,crest_factor"]
    for c, axis in enumerate("xyz"):
        a = sig.sosfilt(sos, data[:, c].astype(np.float64) * 9.80665)
        a2 = a * a
        aw = np.sqrt(a2.mean())
        window = np.convolve(a2, np.ones(n), mode="valid") / n
        mtvv = np.sqrt(window.max())
        vdv = (np.sum(a2 * a2) / rate) ** 0.25
        rows.append(f"{axis},{aw},{mtvv},{vdv},{np.abs(a).max() / aw}")
    open(sys.argv[4], "w").write("\n".join(rows) + "\n")
`;

/** Seat-pad noise: three axes in g (full scale 1 g, SETUP names them), float32 WAV, `seconds` long, unless it exists. */
async function writeSeatPad(path: string, seconds: number): Promise<void> {
  if (existsSync(path)) return;
  const n = RATE * seconds;
  const channels = [0, 1, 2].map((c) => {
    const g = gaussianGenerator(300 + c);
    // A few 0.01 g r.m.s.: the scale of a seat cushion on a rough road.
    return { name: `ch${c + 1}`, unit: "FS", data: new Float64Array(n).map(() => 0.02 * g()) };
  });
  await writeFile(path, encodeWav({ rate: RATE, startTime: 0, channels }, "float32"));
}

/** The ride-comfort bench rows. */
export async function comfortBench(): Promise<void> {
  await mkdir(DIR, { recursive: true });
  const peerAvailable = spawnSync(PYTHON, ["-c", "import scipy"]).status === 0;
  const peerScript = `${DIR}/peer_comfort.py`;
  await writeFile(peerScript, PEER);
  const sections = weightingSections("wk", RATE);
  const sosPath = `${DIR}/wk_sos.json`;
  await writeFile(
    sosPath,
    JSON.stringify(sections.map((s) => [s.b0, s.b1, s.b2, 1, s.a1, s.a2])),
  );

  // 1. The filter alone, same samples.
  const n = 2 ** 22;
  const g = gaussianGenerator(31);
  const x = new Float64Array(n).map(() => g());
  const raw = `${DIR}/comfort_filter_in.f64`;
  await writeFile(raw, new Uint8Array(x.buffer));
  new CascadeFilter(sections).process(x.slice()); // compiled before it is timed
  const ourTimes: number[] = [];
  let ours = new Float64Array(0);
  for (let i = 0; i < 5; i++) {
    const y = x.slice();
    const t0 = performance.now();
    new CascadeFilter(sections).process(y);
    ourTimes.push((performance.now() - t0) / 1000);
    ours = y;
  }
  const ourRate = n / median(ourTimes);
  console.log(`\nComfort: the Wk weighting filter on 2^22 samples (${RATE} Hz sections):`);
  console.log(`  quiver CascadeFilter: ${(ourRate / 1e6).toFixed(1)} M samples/s (median of 5)`);
  if (peerAvailable) {
    const out = `${DIR}/comfort_filter_peer.f64`;
    const r = spawnSync(PYTHON, [peerScript, "filter", sosPath, raw, out], { encoding: "utf8" });
    if (r.status !== 0) throw new Error(`peer failed: ${r.stderr}`);
    const peerRate = n / Number(r.stdout.trim());
    const theirs = new Float64Array(Deno.readFileSync(out).buffer);
    let worst = 0, scale = 0;
    for (let i = 0; i < n; i++) {
      worst = Math.max(worst, Math.abs(ours[i] - theirs[i]));
      scale = Math.max(scale, Math.abs(theirs[i]));
    }
    console.log(
      `  scipy sosfilt:        ${(peerRate / 1e6).toFixed(1)} M samples/s (median of 5); ` +
        `throughput ratio quiver/scipy ${(ourRate / peerRate).toFixed(2)} (goal ≥ 1); ` +
        `outputs differ by at most ${(worst / scale).toExponential(1)} of the peak`,
    );
  }

  // 2. End to end, and 3. memory against record length.
  const setup = `${DIR}/seat_pad_setup.json`;
  const axis = (name: string) => ({
    name,
    unit: "g",
    full_scale_volts: 1,
    sensitivity_mv_per_unit: 1000,
  });
  await writeFile(
    setup,
    JSON.stringify({ channels: { ch1: axis("x"), ch2: axis("y"), ch3: axis("z") } }),
  );
  const short = `${DIR}/seat_pad_10min.wav`, long = `${DIR}/seat_pad_2h.wav`;
  await writeSeatPad(short, 600);
  await writeSeatPad(long, 7200);
  const args = (wav: string) => [
    "run",
    "-A",
    MAIN,
    "comfort",
    wav,
    "--setup",
    setup,
    "--x",
    "x",
    "--y",
    "y",
    "--z",
    "z",
    "--location",
    "seat",
    "--purpose",
    "comfort",
    "--out",
    `${DIR}/comfort_out.csv`,
  ];
  const deno = process.execPath;
  const e2eOurs: number[] = [], e2ePeer: number[] = [];
  for (let i = 0; i < 3; i++) {
    e2eOurs.push(timed(deno, args(short)).seconds);
    if (peerAvailable) {
      e2ePeer.push(
        timed(PYTHON, [peerScript, "wav", sosPath, short, `${DIR}/comfort_peer.csv`]).seconds,
      );
    }
  }
  console.log("  seat pad, 3 axes × 10 min at 2048 Hz, WAV → comfort table, end to end:");
  console.log(`    quiver comfort: ${median(e2eOurs).toFixed(2)} s median of 3`);
  if (peerAvailable) {
    const pairs = e2eOurs.map((o, i) => o / e2ePeer[i]);
    console.log(
      `    peer script:    ${median(e2ePeer).toFixed(2)} s median of 3; time ratio ` +
        `quiver/peer ${median(pairs).toFixed(2)} (goal ≤ 1)`,
    );
  }
  const rss = [short, long].map((w) => maxOf([0, 1].map(() => timed(deno, args(w)).rssMb)));
  console.log(
    `  peak RSS of quiver comfort, 10 min → 2 h: ${rss[0].toFixed(0)} MB → ${
      rss[1].toFixed(0)
    } MB; ratio ${(rss[1] / rss[0]).toFixed(2)} (target ≤ 1.5)`,
  );
}

if (import.meta.main) await comfortBench();
