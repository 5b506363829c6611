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

test("no Math.min/Math.max or String.fromCharCode/fromCodePoint over a spread array in lib/ and cli/", () => {
  // A spread puts every element on the call stack: a long record overflows it (the
  // orders crash on a 250 000-pulse encoder). lib/extent.ts has the loop versions;
  // lib/io/byte_text.ts decodes text from bytes or code units whole.
  const offenders: string[] = [];
  for (const file of [...sources(join(ROOT, "lib")), ...sources(join(ROOT, "cli"))]) {
    readFileSync(file, "utf8").split("\n").forEach((line, i) => {
      if (
        /(Math\.(min|max)|String\.from(CharCode|CodePoint))\(\s*\.\.\./.test(line) &&
        !/^\s*(\*|\/\/)/.test(line)
      ) {
        offenders.push(`${file.slice(ROOT.length)}:${i + 1}`);
      }
    });
  }
  expect(offenders).toEqual([]);
});
