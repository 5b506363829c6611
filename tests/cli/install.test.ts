/**
 * The installed command: README's `deno install` line, run as written into a
 * temporary DENO_INSTALL_ROOT, then `quiver` run from another folder on
 * relative paths. And `deno task quiver` run from outside the checkout.
 */
import { spawnSync } from "node:child_process";
import { copyFileSync, existsSync, readFileSync, realpathSync } from "node:fs";
import { mkdir, mkdtemp, rm } from "node:fs/promises";
import { delimiter, dirname, join } from "node:path";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { SUBPROCESS_TIMEOUT_MS } from "../helpers/cli.ts";
import { fixturePath } from "../helpers/fixtures.ts";

const CHECKOUT = fileURLToPath(new URL("../../", import.meta.url));
const README = readFileSync(join(CHECKOUT, "README.md"), "utf8");

/** The `deno install` line of README's "Install" section, as written there. */
function installLine(): string {
  const section = README.slice(README.indexOf("\n## Install\n"));
  expect(section.length).toBeLessThan(README.length);
  const block = /```sh\n([\s\S]*?)```/.exec(section)?.[1] ?? "";
  const line = block.split("\n").find((l) => l.startsWith("deno install"));
  expect(line, "README's Install section has a deno install line").toBeDefined();
  return line as string;
}

let root = "";
let data = "";
// The installed script calls `deno` by name: the deno running the tests comes first on PATH.
// INIT_CWD is what deno task sets from a user's shell, the folder the task is run from. It is
// given here because npx, which runs this suite in CI, sets it to the checkout, deno task keeps
// an INIT_CWD already set (README says so), and a child's env does not drop an inherited one.
const env = (cwd: string) => ({
  ...process.env,
  NO_COLOR: "1",
  DENO_INSTALL_ROOT: root,
  INIT_CWD: cwd,
  PATH: `${dirname(process.execPath)}${delimiter}${process.env.PATH ?? ""}`,
});

function run(command: string, args: readonly string[], cwd: string) {
  const r = spawnSync(command, args, {
    cwd,
    env: env(cwd),
    encoding: "utf8",
    timeout: SUBPROCESS_TIMEOUT_MS,
  });
  if (r.error !== undefined) throw r.error;
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(async () => {
  root = realpathSync(await mkdtemp("/tmp/quiver-install-root-"));
  data = realpathSync(await mkdtemp("/tmp/quiver-install-data-"));
  await mkdir(join(data, "tests"));
  copyFileSync(fixturePath("recordings/bench_shaker_2ch.csv"), join(data, "tests", "road.csv"));
  const [deno, ...args] = installLine().split(/\s+/);
  expect(deno).toBe("deno");
  const r = run(process.execPath, args, CHECKOUT);
  if (r.code !== 0) throw new Error(`deno install failed: ${r.stderr}`);
});

// The install's copy of node_modules is large: the two folders made above go again.
afterAll(async () => {
  for (const dir of [root, data]) {
    if (dir.startsWith("/tmp/quiver-install-")) await rm(dir, { recursive: true });
  }
});

describe("the installed command", () => {
  test("README's line installs `quiver` into DENO_INSTALL_ROOT/bin", () => {
    expect(installLine()).toBe("deno install -g -A -f -n quiver --config deno.json cli/main.ts");
    expect(existsSync(join(root, "bin", "quiver"))).toBe(true);
  });

  test("runs from another folder with paths relative to it", () => {
    const quiver = join(root, "bin", "quiver");
    const info = run(quiver, ["info", "tests/road.csv"], data);
    expect(info.stderr).toBe("");
    expect(info.code).toBe(0);
    const lines = info.stdout.split("\n");
    expect(lines[0]).toBe(`file: ${join(data, "tests", "road.csv")}`);
    // make_welch_reference.py: 4096 samples at 1024 Hz.
    expect(lines).toContain("sample rate: 1024 Hz (from the time column)");

    const out = run(
      quiver,
      ["spectrum", "road.csv", "--block", "256", "--out", "road_psd.csv"],
      join(data, "tests"),
    );
    expect(out.code).toBe(0);
    expect(existsSync(join(data, "tests", "road_psd.csv"))).toBe(true);
    expect(existsSync(join(data, "tests", "road_psd.csv.meta.json"))).toBe(true);
    expect(readFileSync(join(data, "tests", "road_psd.csv"), "utf8").split("\n")[0]).toBe(
      "frequency_hz,drive_force [N^2/Hz],mount_acc [(m/s^2)^2/Hz]",
    );
  });

  test("a file that is not there is named by the absolute path tried", () => {
    const r = run(join(root, "bin", "quiver"), ["spectrum", "nope.csv"], data);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      `quiver spectrum: ${join(data, "nope.csv")}: cannot read: no such file\n`,
    );
  });
});

describe("deno task quiver", () => {
  test("run from outside the checkout works in the folder it was run from", () => {
    const r = run(
      process.execPath,
      ["task", "--quiet", "--config", join(CHECKOUT, "deno.json"), "quiver", "info", "road.csv"],
      join(data, "tests"),
    );
    expect(r.code).toBe(0);
    expect(r.stdout.split("\n")[0]).toBe(`file: ${join(data, "tests", "road.csv")}`);
    const missing = run(
      process.execPath,
      ["task", "--quiet", "--config", join(CHECKOUT, "deno.json"), "quiver", "info", "nope.csv"],
      data,
    );
    expect(missing.code).toBe(2);
    expect(missing.stderr).toBe(
      `quiver info: ${join(data, "nope.csv")}: cannot read: no such file\n`,
    );
  });
});
