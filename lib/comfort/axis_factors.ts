/**
 * The weighting and multiplying factor k that ISO 2631-1:1997 assigns to
 * each translational axis for a location and a purpose, for the vector sum
 * a_v = √Σ(k·a_w)². Health (clause 7.2) covers seated persons only;
 * comfort (8.2) and perception (9) also standing and recumbent ones, and
 * comfort the backrest and the feet. Axes are the body's (ISO 2631-1
 * Figure 1): for a recumbent person x (back to chest) is the vertical.
 *
 * @module
 */
import type { VibrationWeighting } from "./vibration_weighting.ts";

/** Where the vibration enters the body. */
export const LOCATIONS = ["seat", "backrest", "feet", "standing", "recumbent"] as const;
/** One of {@linkcode LOCATIONS}. */
export type Location = typeof LOCATIONS[number];

/** What the assessment is for. */
export const PURPOSES = ["comfort", "health", "perception"] as const;
/** One of {@linkcode PURPOSES}. */
export type Purpose = typeof PURPOSES[number];

/** The three translational axes. */
export const AXES = ["x", "y", "z"] as const;
/** One of {@linkcode AXES}. */
export type Axis = typeof AXES[number];

/** One axis's weighting and factor. */
export interface AxisFactor {
  readonly weighting: VibrationWeighting;
  readonly k: number;
}

type AxisSet = Readonly<Record<Axis, AxisFactor>>;

const set = (x: AxisFactor, y: AxisFactor, z: AxisFactor): AxisSet => ({ x, y, z });
const wd1 = { weighting: "wd", k: 1 } as const;
const wk1 = { weighting: "wk", k: 1 } as const;

// from memory: ISO 2631-1:1997 clauses 7.2.3 (health), 8.2.2 and 8.2.3 (comfort), 9.2 (perception).
const FACTORS: Readonly<Record<Purpose, Partial<Record<Location, AxisSet>>>> = {
  health: {
    seat: set({ weighting: "wd", k: 1.4 }, { weighting: "wd", k: 1.4 }, wk1),
  },
  comfort: {
    seat: set(wd1, wd1, wk1),
    backrest: set({ weighting: "wc", k: 0.8 }, { weighting: "wd", k: 0.5 }, {
      weighting: "wd",
      k: 0.4,
    }),
    feet: set({ weighting: "wk", k: 0.25 }, { weighting: "wk", k: 0.25 }, {
      weighting: "wk",
      k: 0.4,
    }),
    standing: set(wd1, wd1, wk1),
    recumbent: set(wk1, wd1, wd1),
  },
  perception: {
    seat: set(wd1, wd1, wk1),
    standing: set(wd1, wd1, wk1),
    recumbent: set(wk1, wd1, wd1),
  },
};

/**
 * The weighting and k of each axis for `location` and `purpose`.
 *
 * @throws {RangeError} for a pair ISO 2631-1 gives no factors for, naming those it does.
 *
 * @example
 * ```ts
 * import { axisFactors } from "./axis_factors.ts";
 * const h = axisFactors("seat", "health");
 * if (h.x.k !== 1.4 || h.x.weighting !== "wd" || h.z.weighting !== "wk" || h.z.k !== 1) throw new Error();
 * let said = "";
 * try { axisFactors("feet", "health"); } catch (e) { said = (e as Error).message; }
 * if (!said.includes("health: seat")) throw new Error(said);
 * ```
 */
export function axisFactors(location: Location, purpose: Purpose): AxisSet {
  const found = FACTORS[purpose][location];
  if (found === undefined) {
    throw new RangeError(
      `ISO 2631-1 gives no axis factors for ${purpose} at location ${location}; ` +
        `${purpose}: ${Object.keys(FACTORS[purpose]).join(", ")}`,
    );
  }
  return found;
}
