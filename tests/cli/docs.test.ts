import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, test } from "vitest";
import { COMMAND_NAMES } from "../../cli/main.ts";
import { runQuiver } from "../helpers/cli.ts";

const README = readFileSync(fileURLToPath(new URL("../../README.md", import.meta.url)), "utf8");

describe("README agrees with the command line", () => {
  test("the command table is one table with a row per command, in order", () => {
    // A blank line inside a Markdown table ends it; deno fmt then folds the rest into a
    // paragraph. The rows must be consecutive lines.
    const start = README.indexOf("| command ");
    expect(start).toBeGreaterThan(0);
    const lines = README.slice(start).split("\n");
    const rows = [];
    for (const line of lines.slice(2)) {
      if (!line.startsWith("|")) break;
      rows.push(/^\|\s*`([a-z-]+)`/.exec(line)?.[1]); // hand-arm has a hyphen
    }
    expect(rows).toEqual([...COMMAND_NAMES]);
  });

  test("every --help that points to README points to a section that exists", () => {
    for (const name of COMMAND_NAMES) {
      const help = runQuiver([name, "--help"]).stdout;
      expect(help, name).not.toMatch(/DEVELOPERS\.md/);
      for (const [, section] of help.matchAll(/README\.md,\s+"([^"]+)"/g)) {
        expect(README, `${name} --help points to "${section}"`).toContain(section);
      }
    }
  });

  test("the plan keys in README are the schema's keys", () => {
    for (
      const key of [
        "quiver_plan",
        "recordings.NAME.setup",
        "analyses[].input",
        "comparisons[].simulation.column",
        "targets[].of.quantity",
        "require_targets",
        "report.file",
      ]
    ) {
      expect(README).toContain(`\`${key}\``);
    }
  });
});

describe("the textbook's words for spectra", () => {
  test('no "autopower" in README, any --help, or the spectrum metadata; kind power still works', () => {
    // Bendat & Piersol, Random Data, 4th ed.: "autospectrum" / power spectrum. The option
    // values psd, rms and peak are textbook terms and stay; "power" keeps working.
    expect(README).not.toMatch(/auto-?power/i);
    for (const name of COMMAND_NAMES) {
      expect(runQuiver([name, "--help"]).stdout, name).not.toMatch(/auto-?power/i);
    }
    const dir = mkdtempSync("/tmp/quiver-words-");
    const rows = ["time_s,acc [m/s^2]"];
    for (let i = 0; i < 2048; i++) rows.push(`${i / 1024},${Math.sin(i / 5)}`);
    writeFileSync(`${dir}/r.csv`, rows.join("\n") + "\n");
    const r = runQuiver([
      "spectrum",
      `${dir}/r.csv`,
      "--kind",
      "power",
      "--block",
      "256",
      "--out",
      `${dir}/p.json`,
    ]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).not.toMatch(/auto-?power/i);
    expect(readFileSync(`${dir}/p.json`, "utf8")).not.toMatch(/auto-?power/i);
  });
});
