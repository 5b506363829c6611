/**
 * Zwicker's method (ISO 532-1:2017, stationary) against its steps written a
 * second time in Python: fixtures/reference/zwicker_reference.json, from
 * tests/reference/make_zwicker_reference.py. The level ranges, weightings,
 * threshold, a0, diffuse-field differences, band-width corrections and band
 * limits are typed there separately (from memory, as here); the slope table
 * is copied from lib/quality/zwicker_tables.ts, so this pins what quiver
 * computes with it and does not say whether it is the standard's.
 */
import { describe, test } from "vitest";
import { assertClose } from "../helpers/assert_close.ts";
import { readJsonFixture } from "../helpers/fixtures.ts";
import { coreLoudness, specificLoudness } from "../../lib/quality/zwicker_core.ts";

interface ZwickerCase {
  name: string;
  field: "free" | "diffuse";
  /** Band levels, dB; null for a silent band. */
  levels: (number | null)[];
  core: number[];
  total: number;
  /** Area of the upper slopes by range of the slope table (the last: below the last range). */
  slopeAreaByRange: number[];
}

const reference = readJsonFixture<{ cases: ZwickerCase[] }>("reference/zwicker_reference.json");

describe("the stationary method equals its second writing", () => {
  test.each(reference.cases.map((c) => [c.name, c] as const))("%s", (_, c) => {
    // Both are sums of exact areas of the same piecewise-linear N′(z): equal to rounding.
    const levels = Float64Array.from(c.levels, (l) => l ?? -Infinity);
    const core = coreLoudness(levels, c.field);
    assertClose(core, c.core, { relative: 1e-12, absolute: 1e-14 }, "core loudness");
    assertClose(specificLoudness(core), c.total, { relative: 1e-12, absolute: 1e-14 }, "N");
  });

  test("a lone 1 kHz band at 60 dB: 1.60 sone from its core, 2.74 from its upper slope", () => {
    // The diagnosis of README's 4.34 sone (tests/reference/make_zwicker_reference.py prints it
    // term by term): critical band 9 (7.9 … 9.2 Bark) holds N′ = 1.227 sone/Bark over 1.3 Bark;
    // the rest is the upper slope, read from the slope table's last column in the ranges below
    // 1.5 sone/Bark.
    const c = reference.cases.find((r) => r.name === "1 kHz band at 60 dB")!;
    assertClose(c.core[8] * 1.3, 1.5951, { relative: 0, absolute: 1e-4 }, "core area");
    const slope = c.slopeAreaByRange.reduce((a, b) => a + b, 0);
    assertClose(slope, 2.7406, { relative: 0, absolute: 1e-4 }, "slope area");
    assertClose(c.total, 4.3356, { relative: 0, absolute: 1e-4 }, "N");
  });
});
