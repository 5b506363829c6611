import { mkdtemp, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

describe("an overlap that would make a one-sample hop", () => {
  test("is refused before any work, with the largest overlap allowed and the usual range", async () => {
    const dir = await mkdtemp("/tmp/quiver-overlap-");
    const rows = ["acc [m/s^2]"];
    for (let i = 0; i < 20000; i++) rows.push(String(Math.sin(i / 9)));
    await writeFile(`${dir}/r.csv`, rows.join("\n") + "\n");
    const r = runQuiver([
      "spectrum",
      "r.csv",
      "--rate",
      "1000",
      "--block",
      "4096",
      "--overlap",
      "0.99999999",
    ], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/moves each block by 1 sample\(s\); quiver needs at least 64/);
    // 0.75, a usual overlap, is fine (common practice for Hann, Welch 1967).
    const ok = runQuiver([
      "spectrum",
      "r.csv",
      "--rate",
      "1000",
      "--block",
      "4096",
      "--overlap",
      "0.75",
    ], dir);
    expect(ok.code, ok.stderr).toBe(0);
  });
});

describe("a CSV whose header is Latin-1, not UTF-8", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-latin1-");
    // Long enough for the chunked reader (which used to fail with an internal error).
    const header = new Uint8Array([
      ...new TextEncoder().encode("time_s,acc "),
      0xb5,
      ...new TextEncoder().encode(" [m/s^2]\n"),
    ]);
    const lines = [];
    for (let i = 0; i < 200_000; i++) {
      lines.push(`${(i / 1000).toFixed(3)},${Math.sin(i / 7).toFixed(5)}`);
    }
    const body = new TextEncoder().encode(lines.join("\n") + "\n");
    const bytes = new Uint8Array(header.length + body.length);
    bytes.set(header);
    bytes.set(body, header.length);
    await writeFile(`${dir}/latin1.csv`, bytes);
  });
  for (
    const [command, args] of [
      ["spectrum", []],
      ["bands", []],
      ["level", ["--reference", "1", "--weighting", "Z"]],
      ["frf", ["--input", "a", "--outputs", "b"]],
      ["hammer", ["--force", "a", "--outputs", "b"]],
      ["orders", ["--tacho", "a", "--ppr", "1", "--channels", "b"]],
    ] as const
  ) {
    test(`${command}: the same one message, exit 1`, () => {
      const r = runQuiver([command, "latin1.csv", ...args], dir);
      expect(r.code).toBe(1);
      expect(r.stderr.trim()).toBe(
        `quiver ${command}: latin1.csv: neither a WAV file nor UTF-8 text; quiver reads CSV and WAV recordings (save a CSV as UTF-8: a header in Latin-1 or Windows-1252, e.g. with µ or °, is not UTF-8)`,
      );
    });
  }
});
