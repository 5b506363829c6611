import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

const RATE = 4096;

/** Times as C's %.7g writes them (7 significant digits, trailing zeros dropped). */
function g7(t: number): string {
  return String(Number(t.toPrecision(7)));
}

/** A 12 s recording at 4096 Hz with its time column written %.7g; `skip` drops one row. */
function csv(skip = -1): string {
  const rows = ["time_s,a"];
  for (let i = 0; i < 12 * RATE; i++) {
    if (i !== skip) rows.push(`${g7(i / RATE)},${Math.sin(i / 10).toFixed(4)}`);
  }
  return rows.join("\n") + "\n";
}

describe("a time column that loses digits after 10 s (%.7g)", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-time-digits-");
    await writeFile(`${dir}/g7.csv`, csv());
    // One row missing at 11 s: a real gap, twice the step, far beyond any rounding.
    await writeFile(`${dir}/gap.csv`, csv(11 * RATE));
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  test("is called too few digits, not a gap; --rate reads it", () => {
    // From 10 s, 7 significant digits leave 5 decimals: times are rounded to 1e-5 s and
    // steps of 1/4096 = 244.140625 µs read 240 or 250 µs, 2.4 % off (arithmetic).
    const r = runQuiver(["spectrum", `${dir}/g7.csv`, "--out", `${dir}/s.csv`]);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stderr).toContain(
      "the time column has too few digits for this rate (written with 7 significant digits, a time near 10 s is known to 0.00001 s for a sample interval of 0.0002441 s, rate 4096 Hz",
    );
    expect(r.stderr).toMatch(/; give --rate HZ to ignore it$/m);
    expect(r.stderr).not.toContain("gap, jump or jitter");
    const given = runQuiver([
      "spectrum",
      `${dir}/g7.csv`,
      "--rate",
      String(RATE),
      "--out",
      `${dir}/s.csv`,
    ]);
    expect(given.code, given.stderr).toBe(0);
  });

  test("with --rate, a real gap in the same column is still a gap, named by its line", () => {
    // Row 45056 (11 s) is missing: the row of 45057 sits on line 45058 (header on line 1).
    const r = runQuiver([
      "spectrum",
      `${dir}/gap.csv`,
      "--rate",
      String(RATE),
      "--out",
      `${dir}/s.csv`,
    ]);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stderr).toMatch(
      /gap\.csv:45058:1: time step of .* a gap, jump or jitter in the time column/,
    );
  });
});
