/**
 * `deno run -A tests/bench/against_commit.ts [REV [COMMAND…] [--rounds N]]`: commands on the
 * bench's files (written by `deno task bench`), run alternately by this tree and by the tree
 * at REV, N rounds (default 3); prints the medians, peak RSS, the speed-up and the median of
 * the rounds' own ratios (a round's two runs share the machine's state of the moment).
 * COMMAND: `hammer` and `orders` (the default, with REV e2e4dcd, the last commit before hit
 * detection and angle resampling were reworked) on the long 4-channel WAV (327 s at
 * 51.2 kHz), `spectrum-csv` and `spectrum-wav` (the bench's two headline PSDs). REV is
 * checked out with `git worktree` under out/bench/ and removed afterwards. A measurement,
 * not a test: nothing here asserts.
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import os from "node:os";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { timed } from "./timed.ts";

const roundsAt = Deno.args.indexOf("--rounds");
const rounds = roundsAt >= 0 ? Number(Deno.args[roundsAt + 1]) : 3;
const [rev = "e2e4dcd", ...chosen] = Deno.args.filter((_, i) =>
  roundsAt < 0 || (i !== roundsAt && i !== roundsAt + 1)
);
const root = fileURLToPath(new URL("../../", import.meta.url));
const wav = `${root}out/bench/rig_2e24.wav`;
if (!existsSync(wav)) {
  console.error(`${wav} is missing: run deno task bench first`);
  Deno.exit(1);
}
const old = `${root}out/bench/tree-${rev}`;
const git = (...args: string[]) => {
  const r = spawnSync("git", ["-C", root, ...args], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`git ${args.join(" ")}: ${r.stderr}`);
};
git("worktree", "add", "--force", "--detach", old, rev);
const median = (v: number[]) => v.slice().sort((a, b) => a - b)[Math.floor(v.length / 2)];
const csv = `${root}out/bench/two_channels_2e21.csv`;
const all: Record<string, string[]> = {
  "spectrum-csv": ["spectrum", csv, "--block", "8192", "--window", "hann", "--overlap", "0.5"],
  "spectrum-wav": ["spectrum", wav, "--block", "8192"],
  hammer: ["hammer", wav, "--force", "ch2", "--outputs", "ch3"],
  orders: [
    ["orders", wav, "--tacho", "ch1", "--ppr", "2", "--channels", "ch3"],
    ["--orders", "2", "--rpm-step", "500"],
  ].flat(),
};
const names = chosen.length > 0 ? chosen : ["hammer", "orders"];
const commands = Object.fromEntries(names.map((n) => {
  if (all[n] === undefined) throw new Error(`unknown command ${n}: ${Object.keys(all).join(", ")}`);
  return [n, all[n]];
}));
try {
  console.log(`this tree against ${rev}, ${rounds} rounds; load ${os.loadavg().join(", ")}`);
  for (const [name, args] of Object.entries(commands)) {
    const times: Record<string, number[]> = { now: [], before: [] };
    const rss: Record<string, number[]> = { now: [], before: [] };
    for (let round = 0; round < rounds; round++) {
      for (const [label, tree] of [["before", old], ["now", root]] as const) {
        const r = timed(process.execPath, [
          "run",
          "-A",
          `${tree}/cli/main.ts`,
          ...args,
          "--out",
          `${root}out/bench/against_${label}_${name}.csv`,
        ], tree);
        times[label].push(r.seconds);
        rss[label].push(r.rssMb);
      }
    }
    const before = median(times.before), now = median(times.now);
    const ratios = times.before.map((b, i) => b / times.now[i]);
    console.log(
      `  ${name}: ${rev} ${before.toFixed(2)} s (peak ${median(rss.before).toFixed(0)} MB), ` +
        `now ${now.toFixed(2)} s (peak ${median(rss.now).toFixed(0)} MB); ${
          (before / now).toFixed(1)
        }× faster (rounds' ratios: median ${median(ratios).toFixed(2)}; ${
          ratios.map((r) => r.toFixed(2)).join(", ")
        })`,
    );
  }
} finally {
  git("worktree", "remove", "--force", old);
}
