/**
 * quiver's version, recorded in every manifest.
 *
 * @example
 * ```ts
 * import { QUIVER_VERSION } from "./version.ts";
 * if (!/^\d+\.\d+\.\d+$/.test(QUIVER_VERSION)) throw new Error();
 * ```
 */
export const QUIVER_VERSION = "0.1.0";
