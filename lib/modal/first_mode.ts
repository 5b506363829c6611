/**
 * The one rule for first-mode targets, which the `damping` command's own
 * target and a plan's targets both use: the lowest candidate that is a mode
 * (numbered, never flagged `noise`), with the candidates below it that were
 * passed over, said in words.
 *
 * @module
 */
import { formatNumber } from "../format_number.ts";
import { USABLE_COHERENCE } from "./damping_flags.ts";

/** A candidate a first-mode target passed over. */
export interface SkippedCandidate {
  /** Its channel. */
  readonly channel: string;
  /** Its frequency, Hz. */
  readonly frequencyHz: number;
  /** Its flags. */
  readonly flags: readonly string[];
}

/** The result of a first-mode frequency target check. */
export interface FrequencyTarget {
  /** Minimum frequency asked for, Hz. */
  readonly minimumHz: number;
  /** The lowest mode found, Hz, or null when none. */
  readonly firstModeHz: number | null;
  /** Its channel. */
  readonly channel: string | null;
  /** Its mode number in that channel. */
  readonly mode: number | null;
  /** Candidates below it that are not modes (flagged `noise`), passed over. */
  readonly skipped: readonly SkippedCandidate[];
  /** Whether the first mode meets the minimum. */
  readonly pass: boolean;
  /** First mode − minimum, Hz. */
  readonly marginHz: number | null;
  /** The margin as a percentage of the minimum. */
  readonly marginPercent: number | null;
  /** Which mode was judged and what was passed over, in words. */
  readonly basis: string;
}

/**
 * What a target may be judged on, and the one rule for a first mode: the
 * lowest candidate (of `channel`, when given) that is a mode, i.e. not
 * flagged `noise` and numbered; with the candidates below it that were
 * passed over. Damping's own target and a plan's targets both use it.
 *
 * @example
 * ```ts
 * import { firstMode } from "./first_mode.ts";
 * const modes = [
 *   { channel: "a", mode: null, frequencyHz: 0.9, flags: ["noise", "low_coherence"] },
 *   { channel: "a", mode: 1, frequencyHz: 35.2, flags: [] },
 * ];
 * const { used, skipped } = firstMode(modes);
 * if (used?.frequencyHz !== 35.2 || skipped.length !== 1) throw new Error();
 * ```
 */
export function firstMode<
  M extends {
    readonly channel: string;
    readonly mode: number | null;
    readonly frequencyHz: number | null;
    readonly flags: readonly string[];
  },
>(modes: readonly M[], channel?: string): { used: M | undefined; skipped: M[] } {
  const mine = modes.filter((m) => channel === undefined || m.channel === channel)
    // A candidate whose frequency is missing sorts last.
    .sort((a, b) => (a.frequencyHz ?? Infinity) - (b.frequencyHz ?? Infinity));
  const used = mine.find(isMode);
  const skipped = mine.filter((m) =>
    !isMode(m) && (used === undefined || (m.frequencyHz ?? Infinity) < (used.frequencyHz ?? 0))
  );
  return { used, skipped };
}

/**
 * Whether a candidate is a mode a target may be judged on: numbered and not
 * flagged `noise`.
 *
 * @example
 * ```ts
 * import { isMode } from "./first_mode.ts";
 * if (isMode({ mode: null, flags: ["noise"] }) || !isMode({ mode: 2, flags: ["resolution_bias"] })) throw new Error();
 * ```
 */
export function isMode(m: { readonly mode: number | null; readonly flags: readonly string[] }) {
  return m.mode !== null && !m.flags.includes("noise");
}

/**
 * The candidates passed over, in words: "skipped 3 candidates below it flagged
 * noise (a 0.9, 2.8, 4 Hz)", or "" for none.
 *
 * @example
 * ```ts
 * import { describeSkipped } from "./first_mode.ts";
 * const text = describeSkipped([{ channel: "a", frequencyHz: 0.9, flags: ["noise"] }]);
 * if (!text.includes("0.9 Hz") || !text.includes("noise")) throw new Error();
 * ```
 */
export function describeSkipped(
  skipped: readonly {
    readonly channel: string;
    readonly frequencyHz: number | null;
    readonly flags: readonly string[];
  }[],
): string {
  if (skipped.length === 0) return "";
  const list = skipped.map((m) =>
    `${m.channel} ${m.frequencyHz === null ? "?" : formatNumber(m.frequencyHz, 4)} Hz`
  ).join(", ");
  return `skipped ${skipped.length} candidate(s) below it flagged noise ` +
    `(coherence below ${USABLE_COHERENCE} around them): ${list}`;
}

/**
 * The first-mode frequency target of the `damping` command: the mode
 * {@linkcode firstMode} picks over every channel, judged against the minimum.
 *
 * @example
 * ```ts
 * import { frequencyTarget } from "./first_mode.ts";
 * const modes = [
 *   { channel: "a", mode: null, frequencyHz: 0.9, flags: ["noise"] },
 *   { channel: "a", mode: 1, frequencyHz: 35.2, flags: [] },
 * ];
 * const t = frequencyTarget(modes, 30);
 * if (!t.pass || t.firstModeHz !== 35.2 || t.skipped.length !== 1) throw new Error();
 * ```
 */
export function frequencyTarget(
  modes: readonly {
    readonly channel: string;
    readonly mode: number | null;
    readonly frequencyHz: number;
    readonly flags: readonly string[];
  }[],
  limit: number,
): FrequencyTarget {
  const { used, skipped } = firstMode(modes);
  const skippedText = describeSkipped(skipped);
  return {
    minimumHz: limit,
    firstModeHz: used?.frequencyHz ?? null,
    channel: used?.channel ?? null,
    mode: used?.mode ?? null,
    skipped: skipped.map((m) => ({
      channel: m.channel,
      frequencyHz: m.frequencyHz,
      flags: m.flags,
    })),
    pass: used !== undefined && used.frequencyHz >= limit,
    marginHz: used === undefined ? null : used.frequencyHz - limit,
    marginPercent: used === undefined ? null : (100 * (used.frequencyHz - limit)) / limit,
    basis:
      (used === undefined
        ? "no mode found"
        : `mode ${used.mode} of ${used.channel} at ${formatNumber(used.frequencyHz, 5)} Hz`) +
      (skippedText === "" ? "" : `; ${skippedText}`),
  };
}
