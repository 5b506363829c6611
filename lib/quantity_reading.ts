/**
 * Reading a target quantity (one number) from an analysis's result: the
 * reader type each analysis's descriptor gives for its quantities, and the
 * two rules every reader shares (one channel, a finite value).
 *
 * @module
 */
import type { ResultTable } from "./io/result_file.ts";

/** What a single-value target names besides its quantity. */
export interface QuantityOf {
  /** The channel to read; needed when the result has several. */
  readonly channel?: string;
  /** The mode (1-based), for quantities of one mode. */
  readonly mode?: number;
  /** The order, for quantities of one order of a run-up (tones against rpm). */
  readonly order?: number;
  /** The frequency, Hz, for quantities of the tone nearest it. */
  readonly frequencyHz?: number;
}

/** A quantity's value, and what it was judged on when that is not plain (the mode used). */
export interface QuantityValue {
  readonly value: number;
  readonly basis?: string;
}

/**
 * Reads one quantity from a result; throws an Error saying why it cannot
 * (the target is then reported as not checked, with that reason).
 */
export type QuantityReader = (
  result: ResultTable,
  of: QuantityOf,
) => QuantityValue | Promise<QuantityValue>;

/**
 * A result value as a number, refusing what JSON holds for a value that is
 * missing or was not finite (`null`, from NaN or ±∞): such a target cannot be
 * checked, and reading it as 0 would give a verdict on nothing.
 *
 * @example
 * ```ts
 * import { finiteValue } from "./quantity_reading.ts";
 * if (finiteValue(3, "x") !== 3) throw new Error();
 * let said = "";
 * try { finiteValue(null, "the level"); } catch (e) { said = (e as Error).message; }
 * if (!said.startsWith("the level is missing in the result")) throw new Error(said);
 * ```
 */
export function finiteValue(value: unknown, what: string): number {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new Error(
      `${what} is ${
        value === null || value === undefined ? "missing" : String(value)
      } in the result (not a finite number: a dead channel or a failed estimate?)`,
    );
  }
  return value;
}

/**
 * The one channel a single-value target reads: `wanted` when given, else
 * the result's only channel. A result of several channels without a wanted
 * one is refused, naming them: taking the first would be a silent choice.
 *
 * @example
 * ```ts
 * import { oneChannel } from "./quantity_reading.ts";
 * if (oneChannel(["a", "a"], undefined, "mode") !== "a") throw new Error();
 * let said = "";
 * try { oneChannel(["a", "b"], undefined, "mode"); } catch (e) { said = (e as Error).message; }
 * if (said !== 'the result has 2 channels ("a", "b"): name one in of.channel') throw new Error(said);
 * ```
 */
export function oneChannel(
  channels: readonly string[],
  wanted: string | undefined,
  what: string,
): string | undefined {
  const distinct = [...new Set(channels)];
  if (wanted !== undefined) {
    if (!distinct.includes(wanted)) {
      throw new Error(
        `no ${what} for channel "${wanted}"; the result has ${
          distinct.length === 0 ? "none" : distinct.map((c) => `"${c}"`).join(", ")
        }`,
      );
    }
    return wanted;
  }
  if (distinct.length > 1) {
    throw new Error(
      `the result has ${distinct.length} channels (${
        distinct.map((c) => `"${c}"`).join(", ")
      }): name one in of.channel`,
    );
  }
  return distinct[0];
}
