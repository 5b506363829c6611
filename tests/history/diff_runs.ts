/**
 * Runs for the diff tests: a small plan (a PSD, an RMS spectrum and an FRF
 * of the same recording) run in-process on a seeded recording, so that two
 * runs differ only in what the test changes.
 */
import { writeFile } from "node:fs/promises";
import { runPlan } from "../../lib/plan/runner.ts";
import { planCommandTable } from "../../cli/plan_commands.ts";
import { gaussianGenerator } from "../helpers/random.ts";

/** What a test recording is made of. */
export interface DiffRecording {
  /** Noise seed. */
  readonly seed: number;
  /** Factor on every channel. Default 1. */
  readonly scale?: number;
  /** Factor on the FRF's path (y against x). Default 1. */
  readonly pathGain?: number;
  /** Unit of channel a. Default m/s^2. */
  readonly unitA?: string;
  /** Seconds. Default 128. */
  readonly seconds?: number;
}

/** Sample rate of the test recordings, Hz. */
export const RATE = 1024;

/**
 * Writes `<dir>/<name>.csv` and runs the plan on it into `<dir>/<name>/`.
 * Channels a, b: white noise of unit variance; x: white noise; y: x through
 * a two-tap path (1, 0.5) plus independent noise of 0.3 (coherence near 0.9).
 */
export async function diffRun(dir: string, name: string, r: DiffRecording): Promise<string> {
  const seconds = r.seconds ?? 128, scale = r.scale ?? 1, gain = r.pathGain ?? 1;
  const noise = gaussianGenerator(r.seed);
  const rows: string[] = [`time_s,a [${r.unitA ?? "m/s^2"}],b [m/s^2],x [N],y [m/s^2]`];
  let previous = 0;
  for (let i = 0; i < seconds * RATE; i++) {
    const a = noise(), b = noise(), x = noise(), e = noise();
    const y = gain * (x + 0.5 * previous) + 0.3 * e;
    previous = x;
    rows.push(
      `${i / RATE},${(scale * a).toPrecision(12)},${(scale * b).toPrecision(12)},${
        (scale * x).toPrecision(12)
      },${(scale * y).toPrecision(12)}`,
    );
  }
  await writeFile(`${dir}/${name}.csv`, rows.join("\n") + "\n");
  const plan = {
    quiver_plan: 1,
    title: `diff test ${name}`,
    recordings: { rec: { file: `${name}.csv` } },
    analyses: [
      {
        id: "psd",
        command: "spectrum",
        recording: "rec",
        options: { channels: ["a", "b"], block: 1024 },
      },
      {
        id: "rms",
        command: "spectrum",
        recording: "rec",
        options: { channels: ["a", "b"], block: 1024, kind: "rms" },
      },
      {
        id: "path",
        command: "frf",
        recording: "rec",
        options: { input: "x", outputs: ["y"], block: 1024 },
      },
    ],
  };
  await writeFile(`${dir}/${name}_plan.json`, JSON.stringify(plan));
  const manifest = await runPlan(`${dir}/${name}_plan.json`, {
    outDir: `${dir}/${name}`,
    commands: await planCommandTable(),
    progress: { start() {}, end() {} },
  });
  if (manifest.status !== "ok") throw new Error(`the test run ${name} did not succeed`);
  return `${dir}/${name}`;
}
