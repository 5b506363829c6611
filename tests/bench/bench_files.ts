/**
 * The bench's generated inputs, written once under out/bench and reused: a
 * 2-channel CSV of noise and a 4-channel float32 WAV of a test rig (TTL
 * tacho of a run-up, hammer hits, a response, a calibrator tone).
 */
import { existsSync } from "node:fs";
import { writeFile } from "node:fs/promises";
import { encodeWav } from "../../lib/io/wav.ts";
import { uniformGenerator } from "../helpers/random.ts";

/** Where the bench writes its files. */
export const DIR = "out/bench";
/** The headline block: 4096 lines. */
export const BLOCK = 8192;

/** Uniform noise on [−0.5, 0.5) from a seed (tests/helpers/random.ts). */
export function seeded(seed: number): () => number {
  const uniform = uniformGenerator(seed);
  return () => uniform() - 0.5;
}

/** A CSV of a time column and two channels of noise, `samples` rows, unless it exists. */
export async function writeCsv(path: string, samples: number): Promise<void> {
  if (existsSync(path)) return;
  const r = seeded(samples);
  const rows: string[] = ["time_s,wheel_hub_z [m/s^2],seat_rail_z [m/s^2]"];
  for (let i = 0; i < samples; i++) {
    rows.push(`${i / 51200},${r().toPrecision(9)},${r().toPrecision(9)}`);
  }
  await writeFile(path, rows.join("\n") + "\n");
}

/** The 4-channel rig recording at 51.2 kHz, `samples` long, as float32 WAV, unless it exists. */
export async function writeRigWav(path: string, samples: number): Promise<void> {
  if (existsSync(path)) return;
  const rate = 51200;
  const rr = seeded(samples + 1);
  const tacho = new Float32Array(samples), force = new Float32Array(samples);
  const response = new Float32Array(samples), calibrator = new Float32Array(samples);
  const seconds = samples / rate;
  let angle = 0;
  for (let i = 0; i < samples; i++) {
    const t = i / rate;
    angle += (1000 + (4000 * t) / seconds) / 60 / rate; // a linear run-up 1000 → 5000 rpm
    tacho[i] = angle * 2 - Math.floor(angle * 2) < 0.5 ? 0.5 : 0; // 2 pulses per revolution
    const sinceHit = i % (rate / 2); // a hit every 0.5 s, 2 ms half-sine
    force[i] = sinceHit < 102 ? 0.8 * Math.sin((Math.PI * sinceHit) / 102) : 0;
    response[i] = 0.3 * Math.sin(2 * Math.PI * 2 * angle) + 0.05 * rr();
    calibrator[i] = 0.05 * Math.sin(2 * Math.PI * 1000 * t); // a 1 kHz calibrator tone, volts
  }
  const toF64 = (x: Float32Array) => Float64Array.from(x);
  await writeFile(
    path,
    encodeWav({
      rate,
      startTime: 0,
      channels: [tacho, force, response, calibrator].map((d, c) => ({
        name: `ch${c + 1}`,
        unit: "FS",
        data: toF64(d),
      })),
    }, "float32"),
  );
}

/** The median of `v` (the upper one of an even count). */
export const median = (v: readonly number[]): number =>
  v.slice().sort((a, b) => a - b)[Math.floor(v.length / 2)];
