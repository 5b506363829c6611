/**
 * The MDF 4 memory row of `deno task bench`: peak RSS of MDF 4 → PSD for a
 * long file against a short one (a logger's int16 codes with a linear
 * conversion, DZ blocks: fixtures/demo/mdf4_logger.ts). Its speed against CSV
 * for the same samples is in against_csv.ts. Benchmarks, not tests: nothing
 * here asserts.
 */
import { existsSync } from "node:fs";
import { writeFile } from "node:fs/promises";
import { maxOf } from "../../lib/extent.ts";
import { loggerMdf4 } from "../../fixtures/demo/mdf4_logger.ts";
import { BLOCK, DIR, seeded } from "./bench_files.ts";
import type { TimedRun } from "./timed.ts";

const RATE = 51200;

/** Two channels of noise as a logger stores them: codes of 1/32767 of a 1 m/s² range. */
function channels(samples: number) {
  const r = seeded(samples + 7);
  return ["wheel_hub_z", "seat_rail_z"].map((name) => {
    const data = new Float64Array(samples);
    for (let i = 0; i < samples; i++) data[i] = Math.round(r() * 32767) / 32767;
    return { name, unit: "m/s^2", data, range: 1 };
  });
}

async function writeMdf4(stem: string, samples: number): Promise<void> {
  if (existsSync(`${stem}.mf4`)) return;
  await writeFile(`${stem}.mf4`, loggerMdf4("bench", RATE, channels(samples)));
}

/** Runs the MDF 4 memory rows with `quiver` (one timed command line run). */
export async function benchMdf4(quiver: (args: string[]) => TimedRun): Promise<void> {
  const psd = (
    file: string,
  ) => ["spectrum", file, "--block", String(BLOCK), "--out", `${DIR}/mdf4_psd.csv`];
  const small = `${DIR}/mdf4_two_channels_2e19`, large = `${DIR}/mdf4_two_channels_2e24`;
  await writeMdf4(small, 2 ** 19);
  await writeMdf4(large, 2 ** 24);
  const rss = [small, large].map((s) => maxOf([0, 1].map(() => quiver(psd(`${s}.mf4`)).rssMb)));
  console.log(
    `\nMDF 4 → PSD, peak RSS: 2^19 samples ${rss[0].toFixed(0)} MB → 2^24 samples ${
      rss[1].toFixed(0)
    } MB; ratio ${(rss[1] / rss[0]).toFixed(2)} (target ≤ 1.5)`,
  );
}
