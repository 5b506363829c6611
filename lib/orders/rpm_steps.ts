/**
 * The most rpm steps quiver makes, in a file of its own so that the option
 * checks every recording command runs (cli/option_limits.ts) do not load the
 * order tracking code with it.
 *
 * @module
 */

/**
 * The most rpm steps quiver makes: 20 000 (1 rpm steps over 0–20 000 rpm).
 * Each step is one spectrum of the map and one row of the cuts.
 *
 * @example
 * ```ts
 * import { MAX_RPM_STEPS } from "./rpm_steps.ts";
 * if (MAX_RPM_STEPS !== 20_000) throw new Error();
 * ```
 */
export const MAX_RPM_STEPS = 20_000;
