/**
 * Levels in decibels against the trade's reference values: 20 µPa for sound
 * pressure (ISO 1683), 1e-6 m/s² for acceleration and 1e-9 m/s for velocity
 * (ISO 1683); 1e-12 m for displacement and 1e-6 N for force (ISO 1683);
 * anything else needs a reference from the user. Channels arrive in SI base
 * units (io/units.ts), so a channel recorded in g or mm/s finds its reference.
 *
 * @module
 */
import { QuiverError } from "../errors.ts";

const REFERENCES: Readonly<Record<string, number>> = {
  Pa: 20e-6,
  "m/s^2": 1e-6,
  "m/s": 1e-9,
  m: 1e-12,
  N: 1e-6, // ISO 1683:2015, force level re 1 µN (from memory)
};

/**
 * The ISO 1683 reference of a unit (20 µPa for Pa, 1 µm/s^2 for m/s^2, …),
 * or undefined when it has none.
 *
 * @example
 * ```ts
 * import { standardReference } from "./levels.ts";
 * if (standardReference("Pa") !== 20e-6 || standardReference("V") !== undefined) throw new Error();
 * ```
 */
export function standardReference(unit: string): number | undefined {
  return Object.hasOwn(REFERENCES, unit) ? REFERENCES[unit] : undefined;
}

/**
 * The reference value for a unit, or `override` when given.
 *
 * @throws {QuiverError} (usage) for a unit without a standard reference and no override.
 *
 * @example
 * ```ts
 * import { levelReference } from "./levels.ts";
 * if (levelReference("Pa") !== 20e-6 || levelReference("V", 1) !== 1) throw new Error();
 * ```
 */
export function levelReference(unit: string, override?: number): number {
  if (override !== undefined) {
    if (!(override > 0) || !Number.isFinite(override)) {
      throw new RangeError(`the reference must be a positive number, got ${override}`);
    }
    return override;
  }
  const reference = standardReference(unit);
  if (reference === undefined) {
    throw new QuiverError(
      `no standard level reference for unit [${unit}]; give one (e.g. --reference 1)`,
      {},
      "usage",
    );
  }
  return reference;
}

/**
 * 10·log10(meanSquare / reference²).
 *
 * @example
 * ```ts
 * import { levelDb } from "./levels.ts";
 * if (Math.abs(levelDb(1, 20e-6) - 93.9794) > 1e-4) throw new Error(); // 1 Pa rms
 * ```
 */
export function levelDb(meanSquare: number, reference: number): number {
  return 10 * Math.log10(meanSquare / (reference * reference));
}

/** SI prefixes for references below 1, by power of a thousand. */
const PREFIXES: Readonly<Record<number, string>> = { [-1]: "m", [-2]: "µ", [-3]: "n", [-4]: "p" };

/**
 * A reference value with its unit as an engineer writes it: an SI prefix on
 * the unit's first symbol for the units with standard references (20 µPa,
 * 1 µm/s^2, 1 nm/s, 1 pm, 1 µN), the plain number otherwise (1 V).
 *
 * @example
 * ```ts
 * import { formatReference } from "./levels.ts";
 * if (formatReference(2e-5, "Pa") !== "20 µPa" || formatReference(1e-6, "m/s^2") !== "1 µm/s^2") throw new Error();
 * if (formatReference(2e-5, "Pa/√Hz") !== "20 µPa/√Hz" || formatReference(1, "V") !== "1 V") throw new Error();
 * ```
 */
export function formatReference(reference: number, unit: string): string {
  const base = Object.keys(REFERENCES).sort((a, b) => b.length - a.length)
    .find((u) => unit === u || unit.startsWith(`${u}/`));
  const thousands = Math.floor(Math.log10(reference) / 3 + 1e-9);
  const prefix = PREFIXES[thousands];
  if (base === undefined || prefix === undefined) {
    return `${Number(reference.toPrecision(6))} ${unit}`;
  }
  const mantissa = Number((reference / 1000 ** thousands).toPrecision(6));
  return `${mantissa} ${prefix}${unit}`;
}

/** The label of a level unit, e.g. `dB(A) re 20 µPa`. *
 * @example
 * ```ts
 * import { levelUnit } from "./levels.ts";
 * if (levelUnit("A", 2e-5, "Pa") !== "dB(A) re 20 µPa" || levelUnit("Z", 1, "V") !== "dB re 1 V") throw new Error();
 * ```
 */
export function levelUnit(weighting: string, reference: number, unit: string): string {
  return `dB${weighting === "Z" ? "" : `(${weighting})`} re ${formatReference(reference, unit)}`;
}
