/**
 * The stability chart of a modal fit: the poles of every model order 2, 4,
 * … with their shapes, each judged against the order before.
 *
 * Stability (the usual stabilisation-diagram criteria, common practice;
 * tolerances are options): a pole of order n is compared with the nearest
 * pole (in frequency) of order n − 2 and is stable when its frequency
 * changed by ≤ 1 %, its damping by ≤ 5 % and its shape's MAC is ≥ 0.98.
 *
 * @module
 */
import { type Complex, fitResidues, type FrfSet, lscfPoles, type Pole } from "./lscf.ts";
import { macValue } from "./mac.ts";

/** One pole of the stability analysis. */
export interface StabilityPole {
  readonly order: number;
  readonly frequencyHz: number;
  readonly dampingRatio: number;
  /** Each change against the nearest pole of the order before (see the module notes). */
  readonly stableFrequency: boolean;
  readonly stableDamping: boolean;
  readonly stableShape: boolean;
  /** The mode (1-based) whose cluster holds this pole; 0 for none. */
  readonly mode: number;
}

/** A pole of one order with its shape, as the selection sees it. */
export interface OrderPole {
  readonly order: number;
  readonly pole: Pole;
  readonly shape: readonly Complex[];
  readonly stable: boolean;
  /** Index of its cluster; −1 for none. */
  cluster: number;
  /** The reported mode (1-based) its cluster became; 0 for none. */
  mode: number;
}

/** The tolerances of a stable pole (see the module notes). */
export interface StabilityTolerances {
  /** Relative frequency change. */
  readonly frequency: number;
  /** Relative damping change. */
  readonly damping: number;
  /** Smallest MAC with the shape of the order before. */
  readonly mac: number;
}

/**
 * Mode `r`'s shape: its residue at each degree of freedom.
 *
 * @example
 * ```ts
 * import { shapeOf } from "./stability_chart.ts";
 * const s = shapeOf([[{ re: 1, im: 0 }, { re: 2, im: 0 }], [{ re: 3, im: 0 }, { re: 4, im: 0 }]], 1);
 * if (s[0].re !== 2 || s[1].re !== 4) throw new Error();
 * ```
 */
export const shapeOf = (residues: readonly (readonly Complex[])[], r: number): Complex[] =>
  residues.map((row) => row[r]);

/**
 * The MAC of two shapes.
 *
 * @example
 * ```ts
 * import { shapeMac } from "./stability_chart.ts";
 * const a = [{ re: 1, im: 0 }, { re: -0.5, im: 0 }];
 * if (Math.abs(shapeMac(a, a.map((c) => ({ re: 2 * c.re, im: 2 * c.im }))) - 1) > 1e-12) throw new Error();
 * ```
 */
export const shapeMac = (a: readonly Complex[], b: readonly Complex[]): number =>
  macValue(vector(a), vector(b));

function vector(shape: readonly Complex[]) {
  return { re: Float64Array.from(shape, (c) => c.re), im: Float64Array.from(shape, (c) => c.im) };
}

/**
 * The poles of orders 2, 4, … `maxOrder`, each with its shape and whether it
 * is stable against the order before; `stability` lists every pole with its
 * three checks, `orders` the poles order by order.
 *
 * @example
 * ```ts
 * import { stabilityChart } from "./stability_chart.ts";
 * // One mode at 50 Hz (ζ 2 %), seen at one point as receptance.
 * const f = new Float64Array(300).map((_, i) => 30 + i * 0.15), w0 = 2 * Math.PI * 50;
 * const re = new Float64Array(300), im = new Float64Array(300);
 * f.forEach((hz, i) => { const w = 2 * Math.PI * hz, a = w0 * w0 - w * w, b = 0.04 * w0 * w, d = a * a + b * b; re[i] = a / d; im[i] = -b / d; });
 * const { orders } = stabilityChart({ frequencies: f, responses: [{ re, im }] }, 8, { frequency: 0.01, damping: 0.05, mac: 0.98 });
 * if (orders.length !== 4 || !orders[3].some((p) => p.stable && Math.abs(p.pole.frequencyHz - 50) < 0.01)) throw new Error();
 * ```
 */
export function stabilityChart(
  set: FrfSet,
  maxOrder: number,
  tolerances: StabilityTolerances,
): {
  stability: { entry: OrderPole; flags: [boolean, boolean, boolean] }[];
  orders: OrderPole[][];
} {
  const { frequency: tolF, damping: tolZ, mac: tolMac } = tolerances;
  // Stability over the orders: each pole against the nearest pole (in
  // frequency) of the order before, as the stability chart shows it. A pole
  // doubled at some order may fail here; the clusters below ride over that.
  const stability: { entry: OrderPole; flags: [boolean, boolean, boolean] }[] = [];
  const orders: OrderPole[][] = [];
  let previous: OrderPole[] = [];
  for (let order = 2; order <= maxOrder; order += 2) {
    const poles = lscfPoles(set, order);
    const residues = poles.length > 0 ? fitResidues(set, poles).residues : [];
    const current = poles.map((pole, r): OrderPole => {
      const shape = shapeOf(residues, r);
      let nearest: OrderPole | undefined;
      for (const p of previous) {
        if (
          nearest === undefined ||
          Math.abs(p.pole.frequencyHz - pole.frequencyHz) <
            Math.abs(nearest.pole.frequencyHz - pole.frequencyHz)
        ) nearest = p;
      }
      const flags: [boolean, boolean, boolean] = nearest === undefined ? [false, false, false] : [
        Math.abs(nearest.pole.frequencyHz / pole.frequencyHz - 1) <= tolF,
        Math.abs(nearest.pole.dampingRatio / pole.dampingRatio - 1) <= tolZ,
        shapeMac(shape, nearest.shape) >= tolMac,
      ];
      const entry: OrderPole = {
        order,
        pole,
        shape,
        stable: flags[0] && flags[1] && flags[2],
        cluster: -1,
        mode: 0,
      };
      stability.push({ entry, flags });
      return entry;
    });
    orders.push(current);
    previous = current;
  }
  return { stability, orders };
}
