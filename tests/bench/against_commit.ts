/**
 * `deno run -A tests/bench/against_commit.ts [REV]`: `hammer` and `orders` on the bench's
 * long 4-channel WAV (327 s at 51.2 kHz, written by `deno task bench`), run alternately by
 * this tree and by the tree at REV (default e2e4dcd, the last commit before hit detection
 * and angle resampling were reworked), three rounds; prints the medians, peak RSS and the
 * speed-up. REV is checked out with `git worktree` under out/bench/ and removed afterwards.
 * A measurement, not a test: nothing here asserts.
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { timed } from "./timed.ts";

const rev = Deno.args[0] ?? "e2e4dcd";
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
const commands: Record<string, string[]> = {
  hammer: ["hammer", wav, "--force", "ch2", "--outputs", "ch3"],
  orders: [
    ["orders", wav, "--tacho", "ch1", "--ppr", "2", "--channels", "ch3"],
    ["--orders", "2", "--rpm-step", "500"],
  ].flat(),
};
try {
  console.log(`this tree against ${rev}, ${wav}`);
  for (const [name, args] of Object.entries(commands)) {
    const times: Record<string, number[]> = { now: [], before: [] };
    const rss: Record<string, number[]> = { now: [], before: [] };
    for (let round = 0; round < 3; round++) {
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
    console.log(
      `  ${name}: ${rev} ${before.toFixed(2)} s (peak ${median(rss.before).toFixed(0)} MB), ` +
        `now ${now.toFixed(2)} s (peak ${median(rss.now).toFixed(0)} MB); ${
          (before / now).toFixed(1)
        }× faster (aim ≥ 3)`,
    );
  }
} finally {
  git("worktree", "remove", "--force", old);
}
