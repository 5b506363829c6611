/**
 * The Slurm submission script that `run --slurm-script` prints is safe to
 * run whatever the paths hold: it is run here with bash against a stub
 * `sbatch` (which runs each `--wrap` command as sbatch does, through
 * `sh -c`) and a stub `deno` that records its arguments. A path built to
 * break out of quoting must arrive as one argument and run nothing.
 * OWASP, OS Command Injection Defense Cheat Sheet: quote every argument, and
 * refuse what cannot be quoted (a newline would end a comment line).
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { chmod, mkdir, mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { join } from "node:path";
import process from "node:process";
import { afterAll, describe, expect, test } from "vitest";
import { slurmScript } from "../../lib/plan/slurm.ts";
import { runQuiver, SUBPROCESS_TIMEOUT_MS } from "../helpers/cli.ts";

const folders: string[] = [];
afterAll(async () => {
  for (const f of folders) await rm(f, { recursive: true, force: true });
});

async function stubs(): Promise<{ dir: string; bin: string; log: string }> {
  const dir = await mkdtemp("/tmp/quiver-slurm-script-");
  folders.push(dir);
  const bin = join(dir, "bin");
  await mkdir(bin);
  const log = join(dir, "calls.log");
  // Each argument on its own line between markers, so one argument stays one record.
  await writeFile(
    join(bin, "sbatch"),
    `#!/bin/sh
printf 'sbatch\\n' >> "${log}"
for a in "$@"; do printf '<%s>\\n' "$a" >> "${log}"; done
for a in "$@"; do case "$a" in --wrap=*) sh -c "\${a#--wrap=}";; esac; done
echo 4242
`,
  );
  await writeFile(
    join(bin, "deno"),
    `#!/bin/sh
printf 'deno\\n' >> "${log}"
for a in "$@"; do printf '<%s>\\n' "$a" >> "${log}"; done
`,
  );
  await chmod(join(bin, "sbatch"), 0o755);
  await chmod(join(bin, "deno"), 0o755);
  return { dir, bin, log };
}

/** The argument lists the stubs recorded, in call order. */
function calls(log: string): { program: string; args: string[] }[] {
  const out: { program: string; args: string[] }[] = [];
  for (const line of log.split("\n")) {
    if (line === "sbatch" || line === "deno") out.push({ program: line, args: [] });
    else if (line.startsWith("<") && line.endsWith(">")) {
      out[out.length - 1].args.push(line.slice(1, -1));
    }
  }
  return out;
}

describe("run --slurm-script", () => {
  test("hostile paths reach sbatch and quiver as one argument each and run nothing", async () => {
    const { dir, bin, log } = await stubs();
    const canary = join(dir, "pwned");
    // Quotes, command substitution, a semicolon, spaces and a percent sign.
    const nasty = `p'; touch ${canary}; echo '$(touch ${canary}) \`touch ${canary}\` 50%a`;
    const plan = join(dir, `${nasty}.json`);
    const outDir = join(dir, `out ${nasty}`);
    const script = slurmScript({
      shards: 3,
      plan,
      outDir,
      deno: join(bin, "deno"),
      main: "/q/cli/main.ts",
    });
    const file = join(dir, "submit.sh");
    await writeFile(file, script);
    const result = spawnSync("bash", [file], {
      encoding: "utf8",
      env: { ...process.env, PATH: `${bin}:${process.env.PATH}` },
      timeout: SUBPROCESS_TIMEOUT_MS,
    });
    expect(result.status, result.stderr).toBe(0);
    expect(existsSync(canary), "an injected command ran").toBe(false);
    const recorded = calls(await readFile(log, "utf8"));
    // sbatch (shards), deno (the shard command), sbatch (merge), deno (the merge command).
    expect(recorded.map((c) => c.program)).toEqual(["sbatch", "deno", "sbatch", "deno"]);
    expect(recorded[1].args).toEqual([
      "run",
      "-A",
      "/q/cli/main.ts",
      "run",
      plan,
      "--shard",
      "auto",
      "--jobs",
      "1",
      "--out-dir",
      outDir,
    ]);
    expect(recorded[3].args).toEqual(["run", "-A", "/q/cli/main.ts", "merge", outDir]);
    // sbatch(1): "%%" is a literal percent sign in --output; "%a" the array index.
    expect(recorded[0].args).toContain(
      `--output=${outDir.replaceAll("%", "%%")}/slurm-shard-%a.log`,
    );
    expect(recorded[2].args).toContain("--dependency=afterany:4242");
    expect(existsSync(outDir), "the script makes the output folder").toBe(true);
  });

  test("a newline in a path is refused: it would end the comment it is shown on", () => {
    for (const field of ["plan", "outDir", "partition"] as const) {
      const options = {
        shards: 2,
        plan: "/p/plan.json",
        outDir: "/p/out",
        deno: "/usr/bin/deno",
        main: "/q/cli/main.ts",
        [field]: "/p/x\ntouch /tmp/pwned #",
      };
      expect(() => slurmScript(options), field).toThrow(/control character \(U\+000A\)/);
    }
  });

  test("on the command line: a plan that does not exist prints no script (exit 2)", async () => {
    const { dir } = await stubs();
    const r = runQuiver(["run", join(dir, "missing.json"), "--slurm-script", "2"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/cannot read the plan/);
  });

  test("on the command line: an output folder with a newline is refused (exit 2)", async () => {
    const { dir } = await stubs();
    const plan = join(dir, "plan.json");
    await writeFile(
      plan,
      JSON.stringify({
        quiver_plan: 1,
        title: "t",
        recordings: { r: { file: "r.csv" } },
        analyses: [{ id: "s", command: "spectrum", recording: "r", options: {} }],
      }),
    );
    const r = runQuiver(["run", plan, "--slurm-script", "2", "--out-dir", `${dir}/o\nrm -rf ~`]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(/control character/);
  });
});
