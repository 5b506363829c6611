/**
 * `deno run -A tests/bench/worker_paths.ts [ROUNDS]`: quiver's worker path
 * (the channels' transforms shared with a worker) on against off, for the
 * command it serves, in alternating
 * processes (spectrum_driver.ts) on the bench's files (written by
 * `deno task bench`): a pair shares the machine's state of the moment, so
 * the median of the pairs' ratios is the figure. The rule it serves: a
 * worker stays where it gives at least 1.3× on the machine at hand.
 * A measurement, not a test: nothing here asserts.
 */
import os from "node:os";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { DIR, median } from "./bench_files.ts";
import { timed } from "./timed.ts";

const DRIVER = fileURLToPath(new URL("./spectrum_driver.ts", import.meta.url));
const rounds = Number(Deno.args[0] ?? 5);
const run = (input: string, spectral: string) =>
  timed(process.execPath, ["run", "-A", DRIVER, input, `${DIR}/paths_out.csv`, spectral]).seconds;

/** [label, input]: the worker off (one thread) against on (two). */
const cases: [string, string][] = [
  ["spectral worker, CSV → PSD 2 × 2^21", `${DIR}/two_channels_2e21.csv`],
  ["spectral worker, WAV → PSD 4 × 2^24", `${DIR}/rig_2e24.wav`],
  ["spectral worker, WAV → PSD 4 × 2^20", `${DIR}/rig_2e20.wav`],
];
console.log(
  `${os.cpus().length} × ${os.cpus()[0]?.model}; load ${
    os.loadavg().map((l) => l.toFixed(2)).join(" ")
  }; ${rounds} pairs each`,
);
for (const [label, input] of cases) {
  const pairs: number[] = [], offs: number[] = [], ons: number[] = [];
  for (let i = 0; i < rounds; i++) {
    const a = run(input, "1"), b = run(input, "2");
    offs.push(a);
    ons.push(b);
    pairs.push(a / b);
  }
  console.log(
    `  ${label}: off ${median(offs).toFixed(2)} s, on ${median(ons).toFixed(2)} s; speed-up ${
      median(pairs).toFixed(2)
    }× (pairs ${pairs.map((p) => p.toFixed(2)).join(", ")})`,
  );
}
console.log(`  load after: ${os.loadavg().map((l) => l.toFixed(2)).join(" ")}`);
