/**
 * The pieces every result's metadata schema shares (each analysis keeps its
 * own schema beside it, e.g. lib/dsp/spectrum_metadata.ts): where a result
 * came from, its warnings, a channel's name and unit, and a number that was
 * not finite (written `null` in JSON).
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";

/**
 * A number, or `null` where it was not finite (JSON writes NaN and ±∞ as null).
 *
 * @example
 * ```ts
 * import { finiteOrNull } from "./result_common.ts";
 * if (!finiteOrNull.safeParse(null).success || finiteOrNull.safeParse("1").success) throw new Error();
 * ```
 */
export const finiteOrNull = z.number().nullable();

/**
 * What every result may carry: where it came from and what went wrong on the way.
 *
 * @example
 * ```ts
 * import { z } from "npm:zod@4.6.7";
 * import { COMMON_FIELDS } from "./result_common.ts";
 * if (!z.looseObject(COMMON_FIELDS).safeParse({ source: "a.csv", warnings: [] }).success) throw new Error();
 * ```
 */
export const COMMON_FIELDS = {
  source: z.string().optional(),
  warnings: z.array(z.string()).optional(),
};

/**
 * A channel as a result names it: its name and unit (other keys kept).
 *
 * @example
 * ```ts
 * import { channelSchema } from "./result_common.ts";
 * if (!channelSchema.safeParse({ name: "mic", unit: "Pa", role: "response" }).success) throw new Error();
 * ```
 */
export const channelSchema = z.looseObject({ name: z.string(), unit: z.string() });

/**
 * A result's metadata as a producer writes it: the schema's type with every
 * array and object read-only, so a producer may hand over what it holds
 * (a `readonly number[]` option) without a copy. Nested objects list only
 * their known keys, so that a producer's own interfaces (which have no
 * index signature) fit them. Readers get the schema's own type
 * (lib/io/result_metadata.ts).
 */
export type Written<T> = { readonly [K in keyof T]: WrittenField<T[K]> };

/** A field of {@linkcode Written}: read-only, nested objects without index signature. */
export type WrittenField<T> = T extends readonly (infer E)[] ? readonly WrittenField<E>[]
  : T extends object
    ? { readonly [K in keyof T as string extends K ? never : K]: WrittenField<T[K]> }
  : T;
