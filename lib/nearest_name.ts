/**
 * The name someone probably meant: one rule for a misspelt option, channel,
 * response or column, so that every "did you mean" in quiver agrees.
 *
 * @module
 */

/**
 * The known name closest to `name` by edit distance (Levenshtein, ignoring
 * case), when it is close enough to be a slip (at most a third of the name's
 * length, and at least 1) and no other known name is as close: with `ch1` and
 * `ch2` known, `ch3` could be either, so neither is offered.
 *
 * @example
 * ```ts
 * import { nearestName } from "./nearest_name.ts";
 * if (nearestName("windwo", ["window", "overlap"]) !== "window") throw new Error();
 * if (nearestName("zzzz", ["window"]) !== undefined) throw new Error();
 * if (nearestName("ch3", ["ch1", "ch2"]) !== undefined) throw new Error(); // a tie: no guess
 * ```
 */
export function nearestName(name: string, known: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestDistance = Infinity;
  let tied = false;
  for (const candidate of known) {
    const d = editDistance(name.toLowerCase(), candidate.toLowerCase());
    if (d < bestDistance) {
      best = candidate;
      bestDistance = d;
      tied = false;
    } else if (d === bestDistance && candidate !== best) {
      tied = true;
    }
  }
  if (tied) return undefined;
  return bestDistance <= Math.max(1, Math.floor(name.length / 3)) ? best : undefined;
}

/**
 * ` (did you mean "X"?)` for the {@linkcode nearestName} of `name`, or `""`
 * when there is none: the piece every unknown-name message inserts after the
 * name it could not find.
 *
 * @example
 * ```ts
 * import { didYouMean } from "./nearest_name.ts";
 * if (didYouMean("frnt_left", ["front_left", "rear_left"]) !== ' (did you mean "front_left"?)') throw new Error();
 * if (didYouMean("seat", ["front_left"]) !== "") throw new Error();
 * ```
 */
export function didYouMean(name: string, known: readonly string[]): string {
  const near = nearestName(name, known);
  return near === undefined ? "" : ` (did you mean "${near}"?)`;
}

/** Levenshtein distance (insert, delete, substitute), one row of the table at a time. */
function editDistance(a: string, b: string): number {
  let previous = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const current = [i];
    for (let j = 1; j <= b.length; j++) {
      current[j] = Math.min(
        previous[j] + 1,
        current[j - 1] + 1,
        previous[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1),
      );
    }
    previous = current;
  }
  return previous[b.length];
}

/**
 * `; did you mean "X"?` for the {@linkcode nearestName} of `name`, or `""`:
 * the form of the plan's messages, where the suggestion follows a clause.
 *
 * @example
 * ```ts
 * import { didYouMeanClause } from "./nearest_name.ts";
 * if (didYouMeanClause("spectrun", ["spectrum", "frf"]) !== '; did you mean "spectrum"?') throw new Error();
 * if (didYouMeanClause("zzz", ["spectrum"]) !== "") throw new Error();
 * ```
 */
export function didYouMeanClause(name: string, known: readonly string[]): string {
  const near = nearestName(name, known);
  return near === undefined ? "" : `; did you mean "${near}"?`;
}
