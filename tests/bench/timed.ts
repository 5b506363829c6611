/**
 * One command under GNU time (`/usr/bin/time -f "%e %M %U %S"`), for the bench scripts: wall
 * time, peak RSS, CPU time, exit status and the command's own stderr.
 */
import { spawnSync } from "node:child_process";

/** What one timed run gave. */
export interface TimedRun {
  seconds: number;
  rssMb: number;
  /** CPU time, user + sys (s), of all the command's threads. */
  cpuSeconds: number;
  status: number | null;
  /** The command's stderr, without GNU time's last line. */
  stderr: string;
}

/** Runs `command args` under GNU time, in `cwd` when given. */
export function timedRun(command: string, args: readonly string[], cwd?: string): TimedRun {
  const r = spawnSync("/usr/bin/time", ["-f", "%e %M %U %S", command, ...args], {
    encoding: "utf8",
    cwd,
  });
  const lines = r.stderr.trim().split("\n");
  const [seconds, kb, user, sys] = lines.pop()!.split(" ").map(Number);
  return {
    seconds,
    rssMb: kb / 1024,
    cpuSeconds: user + sys,
    status: r.status,
    stderr: lines.join("\n"),
  };
}

/** {@linkcode timedRun} that throws when the command fails. */
export function timed(command: string, args: readonly string[], cwd?: string): TimedRun {
  const run = timedRun(command, args, cwd);
  if (run.status !== 0) throw new Error(`${command} ${args.join(" ")} failed: ${run.stderr}`);
  return run;
}
