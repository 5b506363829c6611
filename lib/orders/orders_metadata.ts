/**
 * The metadata of the results of `orders` (lib/orders/order_tracking.ts):
 * the order cuts and the order map. The schemas the producer is type-checked
 * against and readers (targets, the report) parse with
 * (lib/io/result_metadata.ts); keys a reader does not use pass through
 * unchecked.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { COMMON_FIELDS, type Written } from "../io/result_common.ts";

/**
 * The schema of the order cuts' metadata.
 *
 * @example
 * ```ts
 * import { ORDERS_METADATA } from "./orders_metadata.ts";
 * const m = { analysis: "orders", amplitude: "rms", method: "angle", weighting: "Z", db: false };
 * if (!ORDERS_METADATA.safeParse(m).success || ORDERS_METADATA.safeParse({ ...m, method: "fft" }).success) throw new Error();
 * ```
 */
export const ORDERS_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("orders"),
  amplitude: z.enum(["rms", "peak"]),
  method: z.enum(["angle", "time"]),
  weighting: z.string(),
  db: z.boolean(),
});

/** The order cuts' metadata as `trackOrders` writes it. */
export type OrdersMetadata = Written<z.input<typeof ORDERS_METADATA>>;

/**
 * The schema of the order map's metadata (readers ask only which analysis it is).
 *
 * @example
 * ```ts
 * import { ORDER_MAP_METADATA } from "./orders_metadata.ts";
 * if (!ORDER_MAP_METADATA.safeParse({ analysis: "order map" }).success) throw new Error();
 * ```
 */
export const ORDER_MAP_METADATA = z.looseObject({
  ...COMMON_FIELDS,
  analysis: z.literal("order map"),
});

/** The order map's metadata as `trackOrders` writes it. */
export type OrderMapMetadata = Written<z.input<typeof ORDER_MAP_METADATA>>;
