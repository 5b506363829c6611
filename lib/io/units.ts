/**
 * Units of the channels quiver reads, and their conversion to the SI base
 * unit that forms, level references and dB are defined on.
 *
 * Recognised (each converted to the first unit of its row on reading):
 *
 * | quantity     | base    | also read as                                  |
 * |--------------|---------|-----------------------------------------------|
 * | acceleration | `m/s^2` | `m/s²`, `m/s2`, `mm/s^2`, `g` (9.80665 m/s²)  |
 * | velocity     | `m/s`   | `mm/s`, `um/s`, `µm/s`                        |
 * | displacement | `m`     | `mm`, `um`, `µm`, `nm`                        |
 * | force        | `N`     | `kN`, `mN`                                    |
 * | pressure     | `Pa`    | `kPa`, `mPa`                                  |
 * | voltage      | `V`     | `mV`, `uV`, `µV`                              |
 *
 * The standard acceleration of gravity g = 9.80665 m/s² is the value of
 * ISO 80000-3:2019 (item 3-9.1, from the 3rd CGPM, 1901). Prefixes are the
 * SI ones (SI Brochure, 9th ed., Table 7). Any other unit is kept as it is.
 *
 * @module
 */

/**
 * Standard acceleration of gravity, m/s² (ISO 80000-3:2019).
 *
 * @example
 * ```ts
 * import { STANDARD_GRAVITY } from "./units.ts";
 * if (STANDARD_GRAVITY !== 9.80665) throw new Error();
 * ```
 */
export const STANDARD_GRAVITY = 9.80665;

/** A unit's SI base unit and the factor from the unit to it. */
export interface BaseUnit {
  /** The SI unit, e.g. `m/s^2`. */
  readonly unit: string;
  /** Multiply a value in the original unit by this to get the base unit. */
  readonly factor: number;
}

const MICRO = ["u", "µ", "μ"]; // ASCII u, micro sign U+00B5, Greek mu U+03BC

function table(): Map<string, BaseUnit> {
  const map = new Map<string, BaseUnit>();
  const add = (names: readonly string[], unit: string, factor: number) => {
    for (const name of names) map.set(name, { unit, factor });
  };
  add(["m/s^2", "m/s²", "m/s2", "m s^-2"], "m/s^2", 1);
  add(["mm/s^2", "mm/s²"], "m/s^2", 1e-3);
  add(["g"], "m/s^2", STANDARD_GRAVITY);
  add(["m/s"], "m/s", 1);
  add(["mm/s"], "m/s", 1e-3);
  add(MICRO.map((u) => `${u}m/s`), "m/s", 1e-6);
  add(["m"], "m", 1);
  add(["mm"], "m", 1e-3);
  add(MICRO.map((u) => `${u}m`), "m", 1e-6);
  add(["nm"], "m", 1e-9);
  add(["N"], "N", 1);
  add(["kN"], "N", 1e3);
  add(["mN"], "N", 1e-3);
  add(["Pa"], "Pa", 1);
  add(["kPa"], "Pa", 1e3);
  add(["mPa"], "Pa", 1e-3);
  add(["V"], "V", 1);
  add(["mV"], "V", 1e-3);
  add(MICRO.map((u) => `${u}V`), "V", 1e-6);
  return map;
}

const UNITS = table();

/**
 * The SI base unit of `unit` and the factor to it, or undefined for a unit
 * quiver does not convert (kept as it is).
 *
 * @example
 * ```ts
 * import { baseUnit } from "./units.ts";
 * const g = baseUnit("g");
 * if (g?.unit !== "m/s^2" || g.factor !== 9.80665) throw new Error();
 * if (baseUnit("µm")?.factor !== 1e-6 || baseUnit("rpm") !== undefined) throw new Error();
 * ```
 */
export function baseUnit(unit: string): BaseUnit | undefined {
  return UNITS.get(unit.trim());
}

/**
 * Whether two units measure the same quantity (they convert to one base unit).
 *
 * @example
 * ```ts
 * import { sameQuantity } from "./units.ts";
 * if (!sameQuantity("g", "m/s^2") || sameQuantity("g", "m/s")) throw new Error();
 * ```
 */
export function sameQuantity(a: string, b: string): boolean {
  const x = baseUnit(a), y = baseUnit(b);
  return x !== undefined && y !== undefined && x.unit === y.unit;
}
