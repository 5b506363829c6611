/**
 * The selection of modes from the whole stability chart, not from the last
 * order alone (rule ours): stable poles are clustered across the orders
 * (frequency within 1 % of the cluster's median, shape MAC ≥ 0.98 with its
 * latest member, one pole per order, the closest first); a cluster is a mode
 * when it holds a stable pole at 5 or more orders and at more than half of
 * the orders from its first stable pole to the highest order. The mode's
 * frequency and damping are the medians over the cluster, reported with
 * their spread and counts. Given `modesHz`, the cluster nearest each
 * frequency (within 2 %) is taken, or, failing one, the highest order's
 * nearest pole (flagged `unstable`).
 *
 * @module
 */
import { QuiverError } from "../errors.ts";
import type { Pole } from "./lscf.ts";
import { SELECTION_RULE } from "./selection_rule.ts";
import { type OrderPole, shapeMac, type StabilityTolerances } from "./stability_chart.ts";

/** Stable poles of several orders that are one mode. */
export interface Cluster {
  readonly members: OrderPole[];
  /** Median frequency of the members so far, Hz. */
  frequencyHz: number;
}

/** A pole chosen as a mode: a cluster's, or, named and unstable, the highest order's. */
export type Choice = { pole: Pole; cluster?: Cluster; named: boolean };

/**
 * The median (the mean of the middle two for an even count).
 *
 * @example
 * ```ts
 * import { median } from "./pole_clusters.ts";
 * if (median([3, 1, 2]) !== 2 || median([4, 1, 2, 3]) !== 2.5) throw new Error();
 * ```
 */
export function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 === 1 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/**
 * (largest − smallest)/median, %.
 *
 * @example
 * ```ts
 * import { spreadPercent } from "./pole_clusters.ts";
 * if (Math.abs(spreadPercent([99, 100, 101]) - 2) > 1e-12) throw new Error();
 * ```
 */
export function spreadPercent(values: readonly number[]): number {
  let lo = Infinity, hi = -Infinity;
  for (const v of values) {
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  return (100 * (hi - lo)) / median(values);
}

/**
 * The clusters of the stable poles of every order; each pole's `cluster` is
 * set to its cluster's index (−1 for none).
 *
 * @example
 * ```ts
 * import { clusterStablePoles } from "./pole_clusters.ts";
 * const pole = (order: number, hz: number) => ({ order, pole: { frequencyHz: hz, dampingRatio: 0.02, lambda: { re: 0, im: 0 } },
 *   shape: [{ re: 1, im: 0 }], stable: true, cluster: -1, mode: 0 });
 * const orders = [[pole(4, 50), pole(4, 80)], [pole(6, 50.1)], [pole(8, 49.9), pole(8, 80.2)]];
 * const clusters = clusterStablePoles(orders, { frequency: 0.01, damping: 0.05, mac: 0.98 });
 * if (clusters.length !== 2 || clusters[0].members.length !== 3 || clusters[1].members.length !== 2) throw new Error();
 * ```
 */
export function clusterStablePoles(
  orders: readonly (readonly OrderPole[])[],
  tolerances: StabilityTolerances,
): Cluster[] {
  const { frequency: tolF, mac: tolMac } = tolerances;
  // Clusters of stable poles across the orders: a stable pole joins the
  // cluster whose median frequency is within the frequency tolerance and
  // whose latest shape it matches (MAC), at most one pole per cluster and
  // order, the closest first.
  const clusters: Cluster[] = [];
  for (const current of orders) {
    const candidates: { p: OrderPole; c: number; d: number }[] = [];
    for (const p of current) {
      if (!p.stable) continue;
      clusters.forEach((cluster, c) => {
        const df = Math.abs(cluster.frequencyHz / p.pole.frequencyHz - 1);
        const last = cluster.members[cluster.members.length - 1];
        const mac = shapeMac(p.shape, last.shape);
        if (df <= tolF && mac >= tolMac) {
          candidates.push({ p, c, d: df / tolF + (1 - mac) / (1 - tolMac) });
        }
      });
    }
    candidates.sort((a, b) => a.d - b.d);
    const taken = new Set<number>();
    for (const { p, c } of candidates) {
      if (p.cluster >= 0 || taken.has(c)) continue;
      p.cluster = c;
      taken.add(c);
    }
    for (const p of current) {
      if (!p.stable) continue;
      if (p.cluster < 0) {
        p.cluster = clusters.length;
        clusters.push({ members: [p], frequencyHz: p.pole.frequencyHz });
      } else if (clusters[p.cluster].members.at(-1)?.order !== p.order) {
        const cluster = clusters[p.cluster];
        cluster.members.push(p);
        cluster.frequencyHz = median(cluster.members.map((m) => m.pole.frequencyHz));
      }
    }
  }
  return clusters;
}

/**
 * A cluster's counts and spreads: the orders at which it held a stable pole,
 * the orders from its first one to `maxOrder`, and the spreads of its
 * frequencies and damping ratios (%).
 *
 * @example
 * ```ts
 * import { clusterStats } from "./pole_clusters.ts";
 * const member = (order: number, hz: number) => ({ order, pole: { frequencyHz: hz, dampingRatio: 0.02, lambda: { re: 0, im: 0 } },
 *   shape: [], stable: true, cluster: 0, mode: 0 });
 * const s = clusterStats({ members: [member(8, 49.5), member(10, 50), member(12, 50.5)], frequencyHz: 50 }, 16);
 * if (s.stableOrders !== 3 || s.ordersSpanned !== 5 || Math.abs(s.frequencySpreadPercent - 2) > 1e-12) throw new Error();
 * ```
 */
export function clusterStats(c: Cluster, maxOrder: number): {
  stableOrders: number;
  ordersSpanned: number;
  frequencySpreadPercent: number;
  dampingSpreadPercent: number;
} {
  const first = c.members[0].order;
  return {
    stableOrders: c.members.length,
    ordersSpanned: (maxOrder - first) / 2 + 1,
    frequencySpreadPercent: spreadPercent(c.members.map((m) => m.pole.frequencyHz)),
    dampingSpreadPercent: spreadPercent(c.members.map((m) => m.pole.dampingRatio)),
  };
}

/**
 * The cluster's pole: median frequency and median damping of its members.
 *
 * @example
 * ```ts
 * import { clusterPole } from "./pole_clusters.ts";
 * const member = (hz: number, zeta: number) => ({ order: 4, pole: { frequencyHz: hz, dampingRatio: zeta, lambda: { re: 0, im: 0 } },
 *   shape: [], stable: true, cluster: 0, mode: 0 });
 * const p = clusterPole({ members: [member(49, 0.02), member(50, 0.03), member(52, 0.01)], frequencyHz: 50 });
 * if (p.frequencyHz !== 50 || p.dampingRatio !== 0.02) throw new Error();
 * ```
 */
export function clusterPole(c: Cluster): Pole {
  const hz = median(c.members.map((m) => m.pole.frequencyHz));
  const zeta = median(c.members.map((m) => m.pole.dampingRatio));
  const wn = 2 * Math.PI * hz;
  return {
    frequencyHz: hz,
    dampingRatio: zeta,
    lambda: { re: -zeta * wn, im: wn * Math.sqrt(1 - zeta * zeta) },
  };
}

/**
 * The poles chosen as modes (unsorted): with `modesHz`, the cluster nearest
 * each (within twice the frequency tolerance), else the highest order's
 * nearest pole; without, every cluster that passes the rule (at least
 * `stableOrders` stable poles, at more than {@linkcode SELECTION_RULE}'s
 * `mostOrders` of the orders it spans), one of each pair of twins.
 *
 * @throws {QuiverError} when a named mode finds no pole at the highest order.
 *
 * @example
 * ```ts
 * import { chooseModes } from "./pole_clusters.ts";
 * const member = (order: number) => ({ order, pole: { frequencyHz: 50, dampingRatio: 0.02, lambda: { re: -6.28, im: 314 } },
 *   shape: [{ re: 1, im: 0 }], stable: true, cluster: 0, mode: 0 });
 * const members = [4, 6, 8, 10, 12].map(member);
 * const chosen = chooseModes({ orders: [members], clusters: [{ members, frequencyHz: 50 }], maxOrder: 12, stableOrders: 5,
 *   tolerances: { frequency: 0.01, damping: 0.05, mac: 0.98 } });
 * if (chosen.length !== 1 || chosen[0].named || chosen[0].pole.frequencyHz !== 50) throw new Error();
 * ```
 */
export function chooseModes(
  { orders, clusters, maxOrder, stableOrders, tolerances, modesHz }: {
    readonly orders: readonly (readonly OrderPole[])[];
    readonly clusters: readonly Cluster[];
    readonly maxOrder: number;
    readonly stableOrders: number;
    readonly tolerances: StabilityTolerances;
    readonly modesHz?: readonly number[];
  },
): Choice[] {
  const { frequency: tolF, mac: tolMac } = tolerances;
  const stats = (c: Cluster) => clusterStats(c, maxOrder);
  let chosen: Choice[];
  if (modesHz !== undefined) {
    const last = orders[orders.length - 1];
    chosen = modesHz.map((hz): Choice => {
      // The cluster nearest the frequency asked for, else the highest order's pole.
      let bestCluster: Cluster | undefined;
      for (const c of clusters) {
        if (
          Math.abs(c.frequencyHz / hz - 1) <= 2 * tolF &&
          (bestCluster === undefined ||
            Math.abs(c.frequencyHz - hz) < Math.abs(bestCluster.frequencyHz - hz))
        ) bestCluster = c;
      }
      if (bestCluster !== undefined) {
        return { pole: clusterPole(bestCluster), cluster: bestCluster, named: true };
      }
      let best: OrderPole | undefined;
      for (const p of last) {
        if (
          best === undefined ||
          Math.abs(p.pole.frequencyHz - hz) < Math.abs(best.pole.frequencyHz - hz)
        ) best = p;
      }
      if (best === undefined) {
        throw new QuiverError(`no pole at order ${maxOrder} to match ${hz} Hz`);
      }
      return { pole: best.pole, named: true };
    });
  } else {
    const selected = clusters.filter((c) => {
      const s = stats(c);
      return s.stableOrders >= stableOrders &&
        s.stableOrders > SELECTION_RULE.mostOrders * s.ordersSpanned;
    }).sort((a, b) => b.members.length - a.members.length);
    // Two clusters of one mode (same frequency within tolerance, same shape): keep the steadier.
    const kept: Cluster[] = [];
    for (const c of selected) {
      const twin = kept.find((k) =>
        Math.abs(k.frequencyHz / c.frequencyHz - 1) <= tolF &&
        shapeMac(k.members.at(-1)!.shape, c.members.at(-1)!.shape) >= tolMac
      );
      if (twin === undefined) kept.push(c);
    }
    chosen = kept.map((c) => ({ pole: clusterPole(c), cluster: c, named: false }));
  }
  return chosen;
}
