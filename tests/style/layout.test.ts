/**
 * The source tree keeps the redesign's rules: one concept per file (no
 * source file over 600 lines), and DEVELOPERS.md's "Layout (as built)" names
 * every module of lib/ and cli/ and no module that is gone.
 */
import { readdirSync, readFileSync, statSync } from "node:fs";
import { basename, join } from "node:path";
import { fileURLToPath } from "node:url";
import { expect, test } from "vitest";

const ROOT = fileURLToPath(new URL("../../", import.meta.url));

function files(dir: string, ext: RegExp): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (name === "vendor" || name === "node_modules") return [];
    return statSync(path).isDirectory() ? files(path, ext) : ext.test(name) ? [path] : [];
  });
}

const MODULES = /\.(ts|js)$/;
const rel = (path: string) => path.slice(ROOT.length);

test("no source file is over 600 lines (lib/, cli/, tests/, fixtures/demo/)", () => {
  const long = ["lib", "cli", "tests", "fixtures/demo"]
    .flatMap((dir) => files(join(ROOT, dir), /\.ts$/))
    .map((path) => ({
      path: rel(path),
      lines: (readFileSync(path, "utf8").match(/\n/g) ?? []).length,
    }))
    .filter((f) => f.lines > 600);
  expect(long).toEqual([]);
});

test("DEVELOPERS.md's layout names every module of lib/ and cli/, and no missing one", () => {
  const text = readFileSync(join(ROOT, "DEVELOPERS.md"), "utf8");
  const block = /## Layout \(as built\)\n\n```\n([\s\S]*?)```/.exec(text)?.[1];
  expect(block).toBeDefined();
  const named = new Set(block!.match(/[\w-]+\.(?:ts|js)\b/g) ?? []);
  const modules = ["lib", "cli"].flatMap((dir) => files(join(ROOT, dir), MODULES));
  expect(modules.filter((path) => !named.has(basename(path))).map(rel)).toEqual([]);
  // Every name in the layout is a file somewhere in the project (fft.js is the npm package).
  const everywhere = new Set(
    ["lib", "cli", "tests", "fixtures"].flatMap((dir) => files(join(ROOT, dir), MODULES))
      .map((path) => basename(path)).concat("mod.ts", "fft.js"),
  );
  expect([...named].filter((name) => !everywhere.has(name))).toEqual([]);
});
