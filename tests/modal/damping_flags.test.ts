import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { expect, test } from "vitest";
import { DAMPING_FLAGS } from "../../lib/modal/damping_flags.ts";
import { runQuiver } from "../helpers/cli.ts";

// Every flag the damping table can carry is documented where the engineer reads (README's
// flag table and `damping --help`), and nothing else is: the list is the code's own type.
const README = readFileSync(fileURLToPath(new URL("../../README.md", import.meta.url)), "utf8");

test("README's damping flag table lists exactly the flags the code can set", () => {
  const start = README.indexOf("Every flag the `flags` column can carry");
  expect(start).toBeGreaterThan(0);
  const rows: string[] = [];
  for (const line of README.slice(start).split("\n").slice(2)) {
    if (line.trim() === "") {
      if (rows.length > 0) break;
      continue;
    }
    const name = /^\|\s*`([a-z_]+)`/.exec(line)?.[1];
    if (name !== undefined) rows.push(name);
  }
  expect([...rows].sort()).toEqual([...DAMPING_FLAGS].sort());
});

test("damping --help names every flag", () => {
  const help = runQuiver(["damping", "--help"]).stdout;
  for (const flag of DAMPING_FLAGS) expect(help, flag).toContain(flag);
});
