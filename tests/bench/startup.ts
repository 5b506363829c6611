/**
 * The start-up floor as CPU time (user + sys, which a loaded machine disturbs less than wall
 * time): `quiver --version`, a spectrum of 1024 samples and `quiver info` of it.
 *
 * `deno run -A tests/bench/startup.ts [REV] [--rounds N]`: each command run alternately by this
 * tree and by the tree at REV (default HEAD~1), N rounds (default 21); prints the medians and
 * whether the two trees' result files are equal to the byte. REV is checked out with
 * `git worktree` under out/bench/ and removed afterwards. bench.ts prints this tree's medians
 * beside its start-up row (`cpuFloor`). A measurement, not a test: nothing here asserts.
 */
import { spawnSync } from "node:child_process";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import os from "node:os";
import process from "node:process";
import { fileURLToPath } from "node:url";

const median = (v: number[]) => v.slice().sort((a, b) => a - b)[Math.floor(v.length / 2)];

/** CPU seconds (user + sys) of one `deno run -A <main> args`. */
function cpuSeconds(main: string, args: readonly string[], cwd?: string): number {
  const r = spawnSync("/usr/bin/time", [
    "-f",
    "%U %S",
    process.execPath,
    "run",
    "-A",
    main,
    ...args,
  ], {
    encoding: "utf8",
    cwd,
  });
  if (r.status !== 0) throw new Error(`quiver ${args.join(" ")} failed: ${r.stderr}`);
  const [user, sys] = r.stderr.trim().split("\n").pop()!.split(" ").map(Number);
  return user + sys;
}

/** A CSV of `rows` samples of two channels at 1024 Hz. */
export function writeTinyCsv(path: string, rows: number): void {
  const lines = ["time_s,a [m/s^2],b [m/s^2]"];
  for (let i = 0; i < rows; i++) {
    const t = i / 1024;
    lines.push(`${t},${Math.sin(2 * Math.PI * 100 * t).toFixed(6)},${Math.cos(60 * t).toFixed(6)}`);
  }
  writeFileSync(path, lines.join("\n") + "\n");
}

/** The commands of the floor on `tiny`, writing into `out` (a path prefix). */
export function floorCommands(tiny: string, out: string): Record<string, string[]> {
  return {
    "--version": ["--version"],
    "spectrum (1024 samples)": ["spectrum", tiny, "--block", "256", "--out", `${out}.csv`],
    info: ["info", tiny],
  };
}

/** Median CPU seconds of each floor command, `runs` runs each, by the quiver at `main`. */
export function cpuFloor(main: string, tiny: string, out: string, runs = 5): string {
  return Object.entries(floorCommands(tiny, out)).map(([name, args]) =>
    `${name} ${median(Array.from({ length: runs }, () => cpuSeconds(main, args))).toFixed(2)} s`
  ).join(", ");
}

if (import.meta.main) {
  const roundsAt = Deno.args.indexOf("--rounds");
  const rounds = roundsAt >= 0 ? Number(Deno.args[roundsAt + 1]) : 21;
  const [rev = "HEAD~1"] = Deno.args.filter((_, i) =>
    roundsAt < 0 || (i !== roundsAt && i !== roundsAt + 1)
  );
  const root = fileURLToPath(new URL("../../", import.meta.url));
  const dir = `${root}out/bench`;
  mkdirSync(dir, { recursive: true });
  const tiny = `${dir}/startup_tiny.csv`;
  writeTinyCsv(tiny, 1024);
  const old = `${dir}/tree-startup`;
  const git = (...args: string[]) => {
    const r = spawnSync("git", ["-C", root, ...args], { encoding: "utf8" });
    if (r.status !== 0) throw new Error(`git ${args.join(" ")}: ${r.stderr}`);
  };
  git("worktree", "add", "--force", "--detach", old, rev);
  try {
    console.log(
      `start-up CPU (user + sys), this tree against ${rev}, ${rounds} rounds, alternating;`,
    );
    console.log(`load ${os.loadavg().map((l) => l.toFixed(2)).join(", ")}`);
    const trees = [["before", old], ["now", root]] as const;
    for (const name of Object.keys(floorCommands(tiny, ""))) {
      const cpu: Record<string, number[]> = { before: [], now: [] };
      for (let round = 0; round < rounds; round++) {
        for (const [label, tree] of round % 2 === 0 ? trees : [...trees].reverse()) {
          const args = floorCommands(tiny, `${dir}/startup_${label}`)[name];
          cpu[label].push(cpuSeconds(`${tree}/cli/main.ts`, args, tree));
        }
      }
      const b = median(cpu.before), n = median(cpu.now);
      console.log(
        `  ${name}: ${rev} ${b.toFixed(3)} s, now ${n.toFixed(3)} s (${(b / n).toFixed(2)}×)`,
      );
    }
    const same = [".csv", ".csv.meta.json"].every((ext) =>
      readFileSync(`${dir}/startup_before${ext}`).equals(readFileSync(`${dir}/startup_now${ext}`))
    );
    console.log(`  spectrum result and sidecar equal to the byte: ${same ? "yes" : "NO"}`);
  } finally {
    git("worktree", "remove", "--force", old);
  }
}
