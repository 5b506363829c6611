/**
 * The MDF 4 rows of `deno task bench`: MDF 4 → PSD against CSV → PSD for the
 * same samples (a logger's int16 codes with a linear conversion, DZ blocks:
 * fixtures/demo/mdf4_logger.ts; the CSV holds the same physical values), run
 * alternately, medians reported; and peak RSS of a long MDF 4 file against a
 * short one. Benchmarks, not tests: nothing here asserts.
 */
import { existsSync } from "node:fs";
import { writeFile } from "node:fs/promises";
import { maxOf } from "../../lib/extent.ts";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { loggerMdf4 } from "../../fixtures/demo/mdf4_logger.ts";
import { BLOCK, DIR, median, seeded } from "./bench_files.ts";
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

async function writePair(stem: string, samples: number, csvToo: boolean): Promise<void> {
  if (existsSync(`${stem}.mf4`) && (!csvToo || existsSync(`${stem}.csv`))) return;
  const c = channels(samples);
  await writeFile(`${stem}.mf4`, loggerMdf4("bench", RATE, c));
  if (!csvToo) return;
  const rows = ["time_s,wheel_hub_z [m/s^2],seat_rail_z [m/s^2]"];
  for (let i = 0; i < samples; i++) {
    rows.push(`${i / RATE},${c[0].data[i].toPrecision(17)},${c[1].data[i].toPrecision(17)}`);
  }
  await writeFile(`${stem}.csv`, rows.join("\n") + "\n");
}

/** Runs the MDF 4 rows with `quiver` (one timed command line run). */
export async function benchMdf4(quiver: (args: string[]) => TimedRun, runs: number): Promise<void> {
  const stem = `${DIR}/mdf4_two_channels_2e21`;
  await writePair(stem, 2 ** 21, true);
  const psd = (
    file: string,
  ) => ["spectrum", file, "--block", String(BLOCK), "--out", `${DIR}/mdf4_psd.csv`];
  const mdf: TimedRun[] = [], csv: TimedRun[] = [];
  for (let i = 0; i < runs; i++) {
    mdf.push(quiver(psd(`${stem}.mf4`)));
    csv.push(quiver(psd(`${stem}.csv`)));
  }
  const m = median(mdf.map((r) => r.seconds)), c = median(csv.map((r) => r.seconds));
  console.log(
    `\nMDF 4 → PSD against CSV → PSD, the same 2 channels × 2^21 samples (median of ${runs}, alternating):`,
  );
  console.log(
    `  MDF 4 ${m.toFixed(2)} s, ${median(mdf.map((r) => r.rssMb)).toFixed(0)} MB; CSV ${
      c.toFixed(2)
    } s, ${median(csv.map((r) => r.rssMb)).toFixed(0)} MB; CSV/MDF 4 time ratio ${
      (c / m).toFixed(1)
    }`,
  );
  // Ingest alone, in this process: the file opened and both channels read (best of 3 each).
  const ingest = async (file: string) => {
    let best = Infinity;
    for (let i = 0; i < 3; i++) {
      const t0 = performance.now();
      const stream = await openRecordingStream(file);
      await stream.read([0, 1], () => {});
      best = Math.min(best, (performance.now() - t0) / 1000);
    }
    return best;
  };
  const [im, ic] = [await ingest(`${stem}.mf4`), await ingest(`${stem}.csv`)];
  console.log(
    `  ingest alone (open and read, best of 3): MDF 4 ${im.toFixed(2)} s, CSV ${
      ic.toFixed(2)
    } s; ratio ${(ic / im).toFixed(1)}`,
  );
  const small = `${DIR}/mdf4_two_channels_2e19`, large = `${DIR}/mdf4_two_channels_2e24`;
  await writePair(small, 2 ** 19, false);
  await writePair(large, 2 ** 24, false);
  const rss = [small, large].map((s) => maxOf([0, 1].map(() => quiver(psd(`${s}.mf4`)).rssMb)));
  console.log(
    `  peak RSS, MDF 4 → PSD: 2^19 samples ${rss[0].toFixed(0)} MB → 2^24 samples ${
      rss[1].toFixed(0)
    } MB; ratio ${(rss[1] / rss[0]).toFixed(2)} (target ≤ 1.5)`,
  );
}
