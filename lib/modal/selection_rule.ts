/**
 * The fixed numbers of the modal fit's selection rule, in one place: the
 * clusters that become modes, the clear peaks a mode must explain, and the
 * highest model order.
 *
 * @module
 */

/**
 * The selection rule's fixed numbers (ours unless marked): a cluster is a
 * mode when it holds a stable pole at more than `mostOrders` of the orders
 * from its first stable pole to the highest order; a clear peak has at least
 * `peakProminenceDb` of prominence in the sum of |H|, is no lower than
 * `peakFloor` of the highest peak, and has mean coherence of at least
 * `peakCoherence` where coherence is known; a mode explains a peak within
 * `peakReach` of its frequency or `peakLines` lines, whichever is wider.
 */
export const SELECTION_RULE = {
  mostOrders: 0.5,
  peakProminenceDb: 6,
  peakFloor: 0.01,
  peakCoherence: 0.8,
  peakReach: 0.02,
  peakLines: 2,
  orderLimit: 128,
} as const;
