import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { expect, test } from "vitest";

const ROOT = fileURLToPath(new URL("../../", import.meta.url));

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    return statSync(path).isDirectory() ? sources(path) : path.endsWith(".ts") ? [path] : [];
  });
}

test("lib/, cli/ and mod.ts import packages by npm: or node: specifiers, never bare names", () => {
  // A script outside the project imports mod.ts without quiver's deno.json (tests/api/): a bare
  // name such as "fflate" resolves only through the import map and breaks there, in a dynamic
  // import() only when that code path first runs.
  const offenders: string[] = [];
  const files = [
    ...sources(join(ROOT, "lib")),
    ...sources(join(ROOT, "cli")),
    join(ROOT, "mod.ts"),
  ];
  for (const file of files) {
    readFileSync(file, "utf8").split("\n").forEach((line, i) => {
      if (/^\s*(\*|\/\/)/.test(line)) return;
      for (const m of line.matchAll(/(?:\bfrom\s+|\bimport\s*\(\s*|^\s*import\s+)"([^"]+)"/g)) {
        if (!/^(npm:|node:|\.{1,2}\/|data:)/.test(m[1])) {
          offenders.push(`${file.slice(ROOT.length)}:${i + 1} ${m[1]}`);
        }
      }
    });
  }
  expect(offenders).toEqual([]);
});
