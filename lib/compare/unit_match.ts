/**
 * Puts a simulation curve in the test curve's unit before they are compared,
 * or refuses when the two are different quantities.
 *
 * - Units of one quantity with other prefixes (`mm/N` against `m/N`) are
 *   scaled to the SI base unit (io/units.ts).
 * - Motion in the numerator, displacement (m), velocity (m/s) and
 *   acceleration (m/s^2) over one denominator (an FRF such as `m/N`, or an
 *   amplitude spectrum in `m/s^2`), converts by jω: each step from
 *   displacement to acceleration multiplies by jω (Ewins, Modal Testing, 2nd
 *   ed., 1.3), as `frf --form` does. Where the conversion divides by jω the
 *   0 Hz line is left out.
 * - Anything else with both units stated and different is refused, naming
 *   both: laying a receptance beside a pressure gives a meaningless dB
 *   difference.
 *
 * A curve with no unit is taken as stated by the other (nothing to check).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import { baseUnit } from "../io/units.ts";
import type { Curve } from "./curve_input.ts";

// A Map: unit text comes from files, and "constructor" must not find Object's prototype.
const MOTION_ORDER: ReadonlyMap<string, number> = new Map([["m", 0], ["m/s", 1], ["m/s^2", 2]]);

interface UnitParts {
  /** Base unit of the numerator and the factor to it. */
  readonly numerator: string;
  readonly numeratorFactor: number;
  /** Base unit of the denominator ("" for none) and the factor to it. */
  readonly denominator: string;
  readonly denominatorFactor: number;
}

function base(unit: string): { unit: string; factor: number } {
  return baseUnit(unit) ?? { unit: unit.trim(), factor: 1 };
}

/** Splits `(num)/den`, `num/den` or a plain unit into base-unit parts. */
function unitParts(unit: string): UnitParts {
  const u = unit.trim();
  const whole = baseUnit(u);
  if (whole !== undefined) {
    return {
      numerator: whole.unit,
      numeratorFactor: whole.factor,
      denominator: "",
      denominatorFactor: 1,
    };
  }
  const bracketed = /^\((.+)\)\/([^/()]+)$/.exec(u);
  const plain = /^([^/()]+)\/([^/()]+)$/.exec(u);
  const m = bracketed ?? plain;
  if (m === null) {
    return { numerator: u, numeratorFactor: 1, denominator: "", denominatorFactor: 1 };
  }
  const n = base(m[1]), d = base(m[2]);
  return {
    numerator: n.unit,
    numeratorFactor: n.factor,
    denominator: d.unit,
    denominatorFactor: d.factor,
  };
}

function unitText(p: UnitParts): string {
  if (p.denominator === "") return p.numerator;
  const n = /^[A-Za-z]+$/.test(p.numerator) ? p.numerator : `(${p.numerator})`;
  return `${n}/${p.denominator}`;
}

/** A curve scaled by a real factor and multiplied by (jω)^power, in the given unit. */
function converted(curve: Curve, factor: number, power: number, unit: string): Curve {
  if (factor === 1 && power === 0) return { ...curve, unit };
  const keep = power < 0 ? Array.from(curve.frequencies, (f) => f > 0) : undefined;
  const pick = (v: Float64Array) => keep === undefined ? v : v.filter((_, k) => keep[k]);
  const f = pick(curve.frequencies);
  const gain = f.map((fk) => factor * (2 * Math.PI * fk) ** power);
  const magnitude = pick(curve.magnitude).map((m, k) => m * Math.abs(gain[k]));
  if (curve.re === undefined || curve.im === undefined) {
    return { ...curve, frequencies: f, magnitude, unit };
  }
  // (jω)^p = ω^p · j^p: rotate by p quarter turns.
  const turns = ((power % 4) + 4) % 4;
  const re0 = pick(curve.re), im0 = pick(curve.im);
  const re = new Float64Array(f.length), im = new Float64Array(f.length);
  for (let k = 0; k < f.length; k++) {
    let r = re0[k] * gain[k], i = im0[k] * gain[k];
    for (let t = 0; t < turns; t++) [r, i] = [-i, r];
    re[k] = r;
    im[k] = i;
  }
  return { ...curve, frequencies: f, magnitude, re, im, unit };
}

/**
 * The test and simulation curves in one unit: the test's, in SI base units.
 *
 * @throws {QuiverError} when both units are stated and name different
 * quantities that no conversion relates.
 *
 * @example
 * ```ts
 * import { matchUnits } from "./unit_match.ts";
 * const f = new Float64Array([1, 2]);
 * const c = (unit: string, re: number[], im: number[]) => ({
 *   frequencies: f, re: new Float64Array(re), im: new Float64Array(im),
 *   magnitude: new Float64Array(re.map((r, k) => Math.hypot(r, im[k]))),
 *   quantity: "amplitude" as const, unit, column: "x",
 * });
 * // A receptance of 1 m/N as accelerance: −ω² (m/s^2)/N.
 * const { simulation } = matchUnits(c("(m/s^2)/N", [1, 1], [0, 0]), c("m/N", [1, 1], [0, 0]));
 * if (simulation.unit !== "(m/s^2)/N" || Math.abs(simulation.re![0] + (2 * Math.PI) ** 2) > 1e-9) throw new Error();
 * ```
 */
export function matchUnits(test: Curve, simulation: Curve): {
  test: Curve;
  simulation: Curve;
  conversion?: string;
} {
  if (test.unit.trim() === "" || simulation.unit.trim() === "") return { test, simulation };
  const isDb = (u: string) => /^dB/.test(u.trim());
  if (isDb(test.unit) || isDb(simulation.unit)) {
    // Levels: the same weighting and reference, or refuse when both are stated.
    const t = test.unit.trim(), s = simulation.unit.trim();
    if (isDb(t) && isDb(s) && (t === s || !t.includes(" re ") || !s.includes(" re "))) {
      return { test, simulation };
    }
    return refuse(test, simulation);
  }
  const t = unitParts(test.unit), s = unitParts(simulation.unit);
  const testInBase = converted(
    test,
    t.numeratorFactor / t.denominatorFactor,
    0,
    unitText(t),
  );
  if (t.denominator !== s.denominator) return refuse(test, simulation);
  const factor = s.numeratorFactor / s.denominatorFactor;
  if (t.numerator === s.numerator) {
    return { test: testInBase, simulation: converted(simulation, factor, 0, unitText(t)) };
  }
  const pt = MOTION_ORDER.get(t.numerator), ps = MOTION_ORDER.get(s.numerator);
  if (pt === undefined || ps === undefined || test.quantity === "power") {
    return refuse(test, simulation);
  }
  return {
    test: testInBase,
    simulation: converted(simulation, factor, pt - ps, unitText(t)),
    conversion: `simulation converted from [${simulation.unit}] to [${unitText(t)}] by (jω)^${
      pt - ps
    }`,
  };
}

function refuse(test: Curve, simulation: Curve): never {
  throw new QuiverError(
    `the test curve is in [${test.unit}] and the simulation in [${simulation.unit}]: different quantities, which no conversion relates; compare like with like`,
  );
}
