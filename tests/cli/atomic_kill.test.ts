import { spawn } from "node:child_process";
import { mkdtemp, readdir, readFile, writeFile } from "node:fs/promises";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { beforeAll, describe, expect, test } from "vitest";
import { encodeWav } from "../../lib/io/wav.ts";
import { runQuiver } from "../helpers/cli.ts";
import { gaussianNoise } from "../helpers/random.ts";

const MAIN = fileURLToPath(new URL("../../cli/main.ts", import.meta.url));

/** Starts quiver, kills it with SIGKILL after `ms`, and resolves when it is gone. */
function killAfter(args: string[], ms: number): Promise<void> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ["run", "-A", MAIN, ...args], { stdio: "ignore" });
    const timer = setTimeout(() => child.kill("SIGKILL"), ms);
    child.on("exit", () => {
      clearTimeout(timer);
      resolve();
    });
  });
}

describe("a killed run never leaves half a file", () => {
  let dir: string;
  let complete: string;
  const args =
    () => ["spectrum", `${dir}/long.wav`, "--block", "131072", "--out", `${dir}/result.csv`];
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-kill-");
    const channels = Array.from({ length: 8 }, (_, c) => ({
      name: `ch${c + 1}`,
      unit: "FS",
      data: gaussianNoise(c + 1, 1 << 20).map((v) => 0.1 * v),
    }));
    await writeFile(
      `${dir}/long.wav`,
      encodeWav({ rate: 51200, startTime: 0, channels }, "float32"),
    );
    const r = runQuiver(args());
    expect(r.code).toBe(0);
    complete = await readFile(`${dir}/result.csv`, "utf8");
    expect(complete.length).toBeGreaterThan(5_000_000);
  });

  test("the output is the old file or the whole new one, whenever the process dies", async () => {
    const old = "frequency_hz,ch1\n0,1\n";
    const outcomes = new Set<string>();
    for (const ms of [150, 400, 700, 1000, 1300, 1600, 2000, 2600]) {
      await writeFile(`${dir}/result.csv`, old);
      await killAfter(args(), ms);
      const now = await readFile(`${dir}/result.csv`, "utf8");
      expect(
        now === old || now === complete,
        `after a kill at ${ms} ms the file is neither old nor complete`,
      ).toBe(true);
      outcomes.add(now === old ? "old" : "new");
    }
    // Temporary files may be left by a kill; they never carry a result's name.
    const allowed = ["result.csv", "result.csv.meta.json", "long.wav"];
    for (const name of await readdir(dir)) {
      expect(allowed.includes(name) || name.startsWith(".result.csv."), name).toBe(true);
    }
    expect(outcomes.has("old")).toBe(true);
  });
});
