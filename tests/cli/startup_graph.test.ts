/**
 * What start-up loads, read from Deno's own module graph (`deno info --json`),
 * not timed: `quiver --version` (cli/main.ts) loads no zod, no command, no
 * metadata schema and no report; `quiver spectrum` and `quiver info` load
 * their own command and the reading path, and no other analysis, no plan
 * runner and no report. Deno reads at start-up every module a static import
 * or an `import("literal")` reaches, whether or not the import runs
 * (lib/lazy_import.ts), so both kinds of edge are followed here; type-only
 * edges are not (deno run does not load them).
 */
import { spawnSync } from "node:child_process";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { describe, expect, test } from "vitest";

const ROOT = new URL("../../", import.meta.url).href;

interface InfoModule {
  specifier: string;
  dependencies?: { code?: { specifier: string } }[];
}

/** The modules Deno reads at start-up for `entry`, as paths under the checkout or specifiers. */
function startupModules(entry: string): string[] {
  const r = spawnSync(
    process.execPath,
    ["info", "--json", fileURLToPath(new URL(entry, ROOT))],
    { encoding: "utf8", maxBuffer: 64 * 1024 * 1024, timeout: 120_000 },
  );
  if (r.error !== undefined) throw r.error;
  expect(r.status, r.stderr).toBe(0);
  const info = JSON.parse(r.stdout) as { roots: string[]; modules: InfoModule[] };
  const bySpecifier = new Map(info.modules.map((m) => [m.specifier, m]));
  const seen = new Set<string>();
  const todo = [...info.roots];
  while (todo.length > 0) {
    const s = todo.pop()!;
    if (seen.has(s)) continue;
    seen.add(s);
    for (const d of bySpecifier.get(s)?.dependencies ?? []) {
      if (d.code !== undefined) todo.push(d.code.specifier);
    }
  }
  return [...seen].map((s) => s.startsWith(ROOT) ? s.slice(ROOT.length) : s).sort();
}

const zod = (m: string) => /^npm:\/?zod@/.test(m);
const report = (m: string) => m.startsWith("lib/report/");
// Result schemas; segment_metadata.ts is no schema but the writer of the segmenting keys.
const schema = (m: string) => m.endsWith("_metadata.ts") && m !== "lib/dsp/segment_metadata.ts";
const planOrHistory = (m: string) => m.startsWith("lib/plan/") || m.startsWith("lib/history/");
// The folders of the analyses other than spectrum (lib/dsp) and the reading path (lib/io).
const otherAnalysis = (m: string) =>
  /^lib\/(frf|modal|acoustics|orders|compare|paths|quality|comfort)\//.test(m) &&
  m !== "lib/orders/rpm_steps.ts"; // a constant the option checks share, no order tracking

describe("start-up loads only what the command needs (Deno's module graph)", () => {
  test("quiver --version: no zod, no command module, no schema, no report", () => {
    const modules = startupModules("cli/main.ts");
    // The graph was read: the table of analyses and its descriptors are in it.
    expect(modules).toContain("lib/analyses.ts");
    expect(modules).toContain("lib/dsp/spectrum_descriptor.ts");
    expect(modules.filter(zod)).toEqual([]);
    expect(modules.filter(report)).toEqual([]);
    expect(modules.filter(schema)).toEqual([]);
    expect(modules.filter(planOrHistory)).toEqual([]);
    const commands = modules.filter((m) => m.startsWith("cli/"));
    expect(commands).toEqual([
      "cli/commands.ts",
      "cli/exit_codes.ts",
      "cli/main.ts",
      "cli/terminal.ts",
    ]);
    // Descriptors name their analyses' code, but none of it is read.
    expect(modules.filter((m) => /^lib\/\w+\//.test(m) && !m.endsWith("_descriptor.ts")))
      .toEqual([]);
  }, 150_000);

  for (const command of ["cli/spectrum.ts", "cli/info.ts"]) {
    test(`${command}: no other analysis, no plan runner, no report, no result schema`, () => {
      const modules = startupModules(command);
      expect(modules).toContain("lib/io/recording_stream.ts");
      expect(modules.filter(otherAnalysis)).toEqual([]);
      expect(modules.filter(report)).toEqual([]);
      expect(modules.filter(schema)).toEqual([]);
      expect(modules.filter(planOrHistory)).toEqual([]);
      expect(modules.filter((m) => m.startsWith("cli/") && m.endsWith("_descriptor.ts")))
        .toEqual([]);
      // zod stays: the options are read through the option tables' zod schemas.
    }, 150_000);
  }
});
