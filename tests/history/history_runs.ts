/**
 * Finished runs for the history tests: a one-microphone recording of a
 * steady sine whose Leq is known in closed form, run through quiver's own
 * `level` command in a plan with two targets (one checkable, one naming a
 * channel the recording lacks, so never checked).
 */
import { mkdir, writeFile } from "node:fs/promises";
import { runPlan } from "../../lib/plan/runner.ts";
import { planCommandTable } from "../../cli/plan_commands.ts";

/** The sample rate and length of the recordings. */
const RATE = 8000;
const SECONDS = 2;
/** 250 Hz: a whole number of cycles in the record and in every 0.1 s step. */
const FREQUENCY = 250;

/** The Leq limit of the plan's target `cabin_leq` (max), dB. */
export const LEQ_LIMIT_DB = 90;

/**
 * Leq of a sine of r.m.s. `rms` Pa, Z-weighted: 20·lg(rms / 20 µPa)
 * (ISO 1683: the reference sound pressure is 20 µPa; the mean square of a
 * sine is its r.m.s. squared over whole cycles).
 */
export function sineLeqDb(rms: number): number {
  return 20 * Math.log10(rms / 20e-6);
}

/** Writes the plan and its recording (a sine of r.m.s. `rms` Pa) under `dir`; returns the plan. */
export async function runInputs(dir: string, rms: number): Promise<string> {
  await mkdir(dir, { recursive: true });
  const rows = ["time_s,mic [Pa]"];
  const amplitude = rms * Math.SQRT2;
  for (let i = 0; i < RATE * SECONDS; i++) {
    rows.push(`${i / RATE},${amplitude * Math.sin((2 * Math.PI * FREQUENCY * i) / RATE)}`);
  }
  await writeFile(`${dir}/cabin.csv`, rows.join("\n") + "\n");
  await writeFile(
    `${dir}/plan.json`,
    JSON.stringify({
      quiver_plan: 1,
      title: "Tamarack E5 cabin noise, Hollow Fen loop",
      recordings: { cabin: { file: "cabin.csv" } },
      analyses: [{
        id: "cabin_level",
        command: "level",
        recording: "cabin",
        options: { weighting: "Z", "time-weighting": "fast", step: 0.1 },
      }],
      targets: [
        {
          id: "cabin_leq",
          type: "max",
          value: LEQ_LIMIT_DB,
          unit: "dB",
          of: { analysis: "cabin_level", quantity: "leq_db" },
        },
        {
          id: "rear_leq",
          type: "max",
          value: LEQ_LIMIT_DB,
          unit: "dB",
          of: { analysis: "cabin_level", quantity: "leq_db", channel: "rear_mic" },
        },
      ],
    }),
  );
  return `${dir}/plan.json`;
}

/** Writes the plan and recording under `dir` and runs it into `dir/out`; returns the run folder. */
export async function finishedRun(dir: string, rms: number): Promise<string> {
  await runInputs(dir, rms);
  const out = `${dir}/out`;
  const manifest = await runPlan(`${dir}/plan.json`, {
    outDir: out,
    commands: await planCommandTable(),
    progress: { start() {}, end() {} },
  });
  if (manifest.status !== "ok") throw new Error(`the test run failed: ${JSON.stringify(manifest)}`);
  return out;
}
