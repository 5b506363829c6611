/**
 * Property-based tests (fast-check): random and mutated inputs give either a
 * result or the project's own error, never an uncaught exception or a hang;
 * and the spectral core keeps Parseval's theorem and linearity on random
 * signals. Seeds are fixed so that a failure reproduces.
 */
import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { parseCommandArgs } from "../cli/args.ts";
import * as spectrum from "../cli/spectrum.ts";
import * as orders from "../cli/orders.ts";
import { spectralEstimate } from "../lib/dsp/spectral_core.ts";
import { QuiverError } from "../lib/errors.ts";
import { parseCsvRecording } from "../lib/io/csv_reader.ts";
import { planSchema } from "../lib/plan/schema.ts";

const SEED = { seed: 20261201, numRuns: 300 };

/** Runs `f`, passing when it returns or throws one of the allowed error types. */
function resultOrOwnError(
  f: () => unknown,
  allowed: (new (...a: never[]) => Error)[] = [QuiverError],
): boolean {
  try {
    f();
    return true;
  } catch (error) {
    if (allowed.some((E) => error instanceof E)) return true;
    throw error;
  }
}

const validCsv = "time_s,a [V],b\n0,1,2\n0.001,1.5,2\n0.002,-1,3e-3\n0.003,0,0\n";

describe("the CSV reader", () => {
  test("random text: a recording or a QuiverError", () => {
    fc.assert(
      fc.property(
        fc.string({ maxLength: 300 }),
        (text) => resultOrOwnError(() => parseCsvRecording(text)),
      ),
      SEED,
    );
  });

  test("random table-like text: a recording or a QuiverError", () => {
    const cell = fc.oneof(
      fc.double({ noNaN: false }).map(String),
      fc.constantFrom("", "x", "NaN", "1,5", " 2 ", '"3"', "1e999"),
    );
    // Delimiter and line end are drawn by the property itself, so the run's seed fixes them.
    const table = fc.tuple(
      fc.constantFrom("time_s,a,b", "a;b", "time,x [m]"),
      fc.array(fc.array(cell, { minLength: 1, maxLength: 5 }), { maxLength: 20 }),
      fc.constantFrom(",", ";"),
      fc.constantFrom("\n", "\r\n"),
    )
      .map(([h, rows, delimiter, end]) =>
        [h, ...rows.map((cells) => cells.join(delimiter))].join(end)
      );
    fc.assert(
      fc.property(table, (text) => resultOrOwnError(() => parseCsvRecording(text, { rate: 100 }))),
      SEED,
    );
  });

  test("a valid file with one character changed: a recording or a QuiverError", () => {
    const mutation = fc.tuple(
      fc.nat({ max: validCsv.length - 1 }),
      fc.string({ minLength: 0, maxLength: 2 }),
    );
    fc.assert(
      fc.property(
        mutation,
        ([at, insert]) =>
          resultOrOwnError(() =>
            parseCsvRecording(validCsv.slice(0, at) + insert + validCsv.slice(at + 1))
          ),
      ),
      SEED,
    );
  });
});

describe("option parsing", () => {
  const token = fc.oneof(
    fc.constantFrom(
      "--block",
      "--overlap",
      "--window",
      "--kind",
      "--channels",
      "--resolution",
      "--tau",
      "--average",
      "--ppr",
      "--orders",
    ),
    fc.string({ maxLength: 8 }),
    fc.double().map(String),
  );
  for (const [name, m] of [["spectrum", spectrum], ["orders", orders]] as const) {
    test(`${name}: random argument lists give values or a QuiverError`, () => {
      fc.assert(
        fc.property(
          fc.array(token, { maxLength: 8 }),
          (argv) => resultOrOwnError(() => parseCommandArgs(argv, m.options, m.schema)),
        ),
        SEED,
      );
    });
  }
});

describe("plan validation", () => {
  const plan = {
    quiver_plan: 1,
    title: "t",
    recordings: { r: { file: "a.csv" } },
    analyses: [{ id: "s", command: "spectrum", recording: "r", options: { block: 256 } }],
  };
  test("random JSON values never crash the schema, and only a plan-shaped object passes", () => {
    fc.assert(
      fc.property(fc.jsonValue(), (value) => {
        const result = planSchema.safeParse(value);
        const planShaped = typeof value === "object" && value !== null && !Array.isArray(value) &&
          (value as Record<string, unknown>).quiver_plan === 1;
        return !result.success || planShaped;
      }),
      SEED,
    );
  });
  test("a valid plan with one key replaced by a random value is accepted or refused, never thrown", () => {
    const keys = ["quiver_plan", "title", "recordings", "analyses"] as const;
    fc.assert(
      fc.property(fc.constantFrom(...keys), fc.jsonValue(), (key, value) => {
        const result = planSchema.safeParse({ ...plan, [key]: value });
        // What may pass: only a value of the key's own type.
        const fits = {
          quiver_plan: value === 1,
          title: typeof value === "string",
          recordings: typeof value === "object" && value !== null && !Array.isArray(value),
          analyses: Array.isArray(value),
        }[key];
        return !result.success || fits;
      }),
      SEED,
    );
  });
});

describe("spectral core properties on random signals", () => {
  const signal = fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), {
    minLength: 64,
    maxLength: 600,
  })
    .map((v) => new Float64Array(v));

  test("Parseval: with a rectangular window the PSD integrates to the mean-removed variance", () => {
    // Parseval's theorem for the DFT (analytic); one segment of the whole signal.
    fc.assert(
      fc.property(signal, (x) => {
        const e = spectralEstimate([x], { rate: 1000, block: x.length, window: "rectangular" });
        const integral = e.auto[0].reduce((s, g) => s + g, 0) * e.df;
        const mean = x.reduce((s, v) => s + v, 0) / x.length;
        const variance = x.reduce((s, v) => s + (v - mean) ** 2, 0) / x.length;
        expect(Math.abs(integral - variance)).toBeLessThanOrEqual(
          1e-9 * (variance + 1e-300) + 1e-12,
        );
      }),
      { ...SEED, numRuns: 100 },
    );
  });

  test("linearity: the cross spectrum of a·x with y is a times that of x with y", () => {
    fc.assert(
      fc.property(signal, fc.double({ min: -10, max: 10, noNaN: true }), (x, a) => {
        const y = x.map((v, i) => v * 0.5 + Math.sin(i));
        const base = spectralEstimate([x, y], { rate: 100, block: 32, pairs: [[0, 1]] });
        const scaled = spectralEstimate([x.map((v) => a * v), y], {
          rate: 100,
          block: 32,
          pairs: [[0, 1]],
        });
        const scale = Math.max(
          ...base.cross[0].re.map(Math.abs),
          ...base.cross[0].im.map(Math.abs),
          1e-300,
        );
        base.cross[0].re.forEach((v, k) => {
          expect(Math.abs(scaled.cross[0].re[k] - a * v)).toBeLessThanOrEqual(
            1e-9 * Math.abs(a) * scale + 1e-300,
          );
        });
      }),
      { ...SEED, numRuns: 100 },
    );
  });
});
