/**
 * The bench's loudness rows: time-varying loudness (ISO 532-1) at 48 kHz as
 * a multiple of real time on one core (in this process, no workers; goal
 * ≥ 20×), and, unless `headline`, peak RSS of `quiver loudness --method
 * time-varying` against record length (float32 WAV of 2^20 and 2^24 samples).
 */
import { existsSync } from "node:fs";
import { writeFile } from "node:fs/promises";
import { encodeWav } from "../../lib/io/wav.ts";
import { TimeVaryingLoudnessMeter } from "../../lib/quality/loudness_time_varying.ts";
import { DIR, median } from "./bench_files.ts";
import { gaussianNoise } from "../helpers/random.ts";
import type { TimedRun } from "./timed.ts";

const RATE = 48000;

/** Pink-ish cabin noise: white noise through a one-pole low-pass at 500 Hz (invented). */
function cabinNoise(samples: number, seed: number): Float64Array {
  const x = gaussianNoise(seed, samples);
  const a = Math.exp(-2 * Math.PI * 500 / RATE);
  let y = 0;
  for (let i = 0; i < samples; i++) x[i] = y = a * y + (1 - a) * x[i];
  return x;
}

async function writeMicWav(path: string, samples: number): Promise<void> {
  if (existsSync(path)) return;
  const data = cabinNoise(samples, samples);
  for (let i = 0; i < samples; i++) data[i] *= 0.05;
  const rec = { rate: RATE, startTime: 0, channels: [{ name: "ch1", unit: "FS", data }] };
  await writeFile(path, encodeWav(rec, "float32"));
}

/** Prints the loudness rows; `quiver` runs the command line under GNU time. */
export async function loudnessBench(
  quiver: (args: string[]) => TimedRun,
  headline: boolean,
): Promise<void> {
  const seconds = 60;
  const x = cabinNoise(RATE * seconds, 3);
  const times: number[] = [];
  for (let run = 0; run < 3; run++) {
    const t0 = performance.now();
    const m = new TimeVaryingLoudnessMeter(RATE);
    for (let at = 0; at < x.length; at += 65536) m.push(x.slice(at, at + 65536));
    m.finish();
    times.push((performance.now() - t0) / 1000);
  }
  console.log(
    `\nTime-varying loudness (ISO 532-1), 48 kHz, one core: ${
      (seconds / median(times)).toFixed(1)
    }× real time (median of 3 over ${seconds} s; goal ≥ 20×)`,
  );
  if (headline) return;
  const setup = `${DIR}/loudness_setup.json`;
  await writeFile(
    setup,
    JSON.stringify({
      channels: {
        ch1: { name: "mic", unit: "Pa", full_scale_volts: 5, sensitivity_mv_per_unit: 50 },
      },
    }),
  );
  const lengths = [2 ** 20, 2 ** 24];
  const rss: number[] = [];
  for (const n of lengths) {
    const wav = `${DIR}/mic_${n}.wav`;
    await writeMicWav(wav, n);
    rss.push(
      quiver([
        "loudness",
        wav,
        "--setup",
        setup,
        "--method",
        "time-varying",
        "--out",
        `${DIR}/r_loudness.csv`,
      ]).rssMb,
    );
  }
  console.log(
    `  loudness (time-varying) peak RSS ${rss[0].toFixed(0)} MB → ${rss[1].toFixed(0)} MB; ` +
      `ratio ${(rss[1] / rss[0]).toFixed(2)} (target ≤ 1.5)`,
  );
}
