/** Paths to the committed fixtures, independent of the working directory. */
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";

/** Absolute path of a file below fixtures/. */
export function fixturePath(relative: string): string {
  return fileURLToPath(new URL(`../../fixtures/${relative}`, import.meta.url));
}

/** Parses a JSON fixture. */
export function readJsonFixture<T>(relative: string): T {
  return JSON.parse(readFileSync(fixturePath(relative), "utf8")) as T;
}
