/**
 * `deno run -A tests/bench/one_gigabyte.ts`: every command that reads a recording, run once
 * on a CSV of more than 1 GB (4 channels × 2^24 rows: a TTL tacho of a run-up, hammer
 * hits, a response and a 1 kHz calibrator tone, each with a little noise), with its wall
 * time and peak RSS (GNU time). A check that nothing reads the whole file into one string
 * or array, not a speed claim: nothing here asserts, it prints what happened.
 */
import { existsSync, statSync } from "node:fs";
import { mkdir, open, writeFile } from "node:fs/promises";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { uniformGenerator } from "../helpers/random.ts";
import { timedRun } from "./timed.ts";

const DIR = "out/bench";
const CSV = `${DIR}/rig_1gb.csv`;
const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));
const ROWS = 2 ** 24;
const RATE = 51200;

async function writeBigCsv(): Promise<void> {
  if (existsSync(CSV)) return;
  const noise = uniformGenerator(1);
  const file = await open(CSV, "w");
  await file.write("time_s,tacho [V],hammer [N],seat_rail_z [m/s^2],mic_cal [V]\n");
  const seconds = ROWS / RATE;
  let angle = 0;
  let lines: string[] = [];
  for (let i = 0; i < ROWS; i++) {
    const t = i / RATE;
    angle += (1000 + (4000 * t) / seconds) / 60 / RATE; // a linear run-up 1000 → 5000 rpm
    const n = () => 1e-3 * (noise() - 0.5);
    const tacho = (angle * 2 - Math.floor(angle * 2) < 0.5 ? 5 : 0) + n(); // 2 pulses per rev
    const sinceHit = i % (RATE / 2); // a hit every 0.5 s, 2 ms half-sine
    const force = (sinceHit < 102 ? 800 * Math.sin((Math.PI * sinceHit) / 102) : 0) + n();
    const response = 0.3 * Math.sin(2 * Math.PI * 2 * angle) + 50 * n();
    const mic = 0.05 * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * t) + n(); // 94 dB at 50 mV/Pa
    lines.push(
      `${t},${tacho.toPrecision(9)},${force.toPrecision(9)},${response.toPrecision(9)},${
        mic.toPrecision(9)
      }`,
    );
    if (lines.length === 65536) {
      await file.write(lines.join("\n") + "\n");
      lines = [];
    }
  }
  if (lines.length > 0) await file.write(lines.join("\n") + "\n");
  await file.close();
}

await mkdir(DIR, { recursive: true });
await writeBigCsv();
const setup = `${DIR}/big_setup.json`;
await writeFile(setup, JSON.stringify({ channels: {} }));
const out = (name: string) => `${DIR}/big_${name}`;
/** The band analysis of the calibrator-tone channel, as both methods run it. */
const bandsOfMicrophone = ["bands", CSV, "--channels", "mic_cal", "--reference", "1"];

const runs: [string, string[]][] = [
  ["spectrum", ["spectrum", CSV, "--block", "8192", "--out", out("spectrum.csv")]],
  ["spectrogram", [
    "spectrogram",
    CSV,
    "--block",
    "8192",
    "--frames",
    "64",
    "--out",
    out("sg.csv"),
  ]],
  ["frf", [
    "frf",
    CSV,
    "--input",
    "hammer",
    "--outputs",
    "seat_rail_z",
    "--block",
    "8192",
    "--out",
    out("frf.csv"),
  ]],
  ["hammer", [
    "hammer",
    CSV,
    "--force",
    "hammer",
    "--outputs",
    "seat_rail_z",
    "--out",
    out("h.csv"),
  ]],
  ["bands (fft)", [...bandsOfMicrophone, "--out", out("bands.csv")]],
  ["bands (filter)", [
    ...bandsOfMicrophone,
    "--method",
    "filter",
    "--min-hz",
    "100",
    "--out",
    out("bandsf.csv"),
  ]],
  ["level", ["level", CSV, "--channels", "mic_cal", "--reference", "1", "--out", out("level.csv")]],
  ["calibrate", [
    "calibrate",
    CSV,
    "--channel",
    "mic_cal",
    "--setup",
    setup,
    "--out",
    out("cal.json"),
  ]],
  ["orders", [
    "orders",
    CSV,
    "--tacho",
    "tacho",
    "--ppr",
    "2",
    "--channels",
    "seat_rail_z",
    "--orders",
    "2",
    "--rpm-step",
    "500",
    "--out",
    out("orders.csv"),
  ]],
  ["paths", [
    "paths",
    CSV,
    "--references",
    "hammer",
    "--transfer",
    out("frf.csv"),
    "--target",
    "seat_rail_z",
    "--out",
    out("paths.csv"),
  ]],
];
console.log(`${CSV}: ${(statSync(CSV).size / 1e9).toFixed(2)} GB, 4 channels × ${ROWS} rows`);
for (const [name, args] of runs) {
  const r = timedRun(process.execPath, ["run", "-A", MAIN, ...args]);
  console.log(
    `  ${name.padEnd(15)} exit ${r.status}  ${r.seconds.toFixed(1).padStart(6)} s  peak RSS ${
      r.rssMb.toFixed(0).padStart(5)
    } MB${r.status === 0 ? "" : `\n    ${r.stderr.split("\n").slice(-3).join("\n    ")}`}`,
  );
}
