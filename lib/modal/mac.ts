/**
 * Mode-shape correlation: the modal assurance criterion and the pairing of
 * test modes with simulation modes.
 *
 * MAC (Allemang & Brown, 1982), complex-aware:
 * MAC(a, b) = |aᴴb|² / ((aᴴa)(bᴴb)), 1 for shapes alike up to a complex
 * scale factor (any sign, any normalisation), 0 for orthogonal ones.
 *
 * Pairing: each test mode with at most one simulation mode and each
 * simulation mode with at most one test mode, maximising the sum of MAC
 * over the pairs (the assignment problem, solved by the Hungarian method:
 * Kuhn 1955, Munkres 1957). A greedy "best column per row" can give two test
 * modes the same simulation mode or a worse total; the assignment cannot.
 *
 * @module
 */

/** A complex vector as two arrays of equal length. */
export interface ComplexVector {
  /** Real parts. */
  readonly re: Float64Array;
  /** Imaginary parts (zeros for a real shape). */
  readonly im: Float64Array;
}

/**
 * The MAC of two shapes over the same degrees of freedom.
 *
 * @throws {RangeError} for vectors of different lengths or a shape of zero norm.
 *
 * @example
 * ```ts
 * import { macValue } from "./mac.ts";
 * const v = (...x: number[]) => ({ re: new Float64Array(x), im: new Float64Array(x.length) });
 * // (1·1 + 2·0 + 3·(−1))² / ((1 + 4 + 9)(1 + 0 + 1)) = 4/28
 * if (Math.abs(macValue(v(1, 2, 3), v(1, 0, -1)) - 4 / 28) > 1e-15) throw new Error();
 * ```
 */
export function macValue(a: ComplexVector, b: ComplexVector): number {
  const n = a.re.length;
  if (b.re.length !== n || a.im.length !== n || b.im.length !== n) {
    throw new RangeError(`shapes of ${n} and ${b.re.length} degrees of freedom cannot be compared`);
  }
  // aᴴb = Σ conj(a)·b
  let crossRe = 0, crossIm = 0, aa = 0, bb = 0;
  for (let k = 0; k < n; k++) {
    crossRe += a.re[k] * b.re[k] + a.im[k] * b.im[k];
    crossIm += a.re[k] * b.im[k] - a.im[k] * b.re[k];
    aa += a.re[k] * a.re[k] + a.im[k] * a.im[k];
    bb += b.re[k] * b.re[k] + b.im[k] * b.im[k];
  }
  if (!(aa > 0) || !(bb > 0)) throw new RangeError("a shape of zero norm has no MAC");
  return (crossRe * crossRe + crossIm * crossIm) / (aa * bb);
}

/**
 * The MAC of every pair: `mac[i][j]` for shape i of the first set and j of the second.
 *
 * @example
 * ```ts
 * import { macMatrix } from "./mac.ts";
 * const v = (...x: number[]) => ({ re: new Float64Array(x), im: new Float64Array(x.length) });
 * const m = macMatrix([v(1, 0), v(0, 1)], [v(0, -3), v(2, 0)]);
 * if (m[0][1] !== 1 || m[0][0] !== 0 || m[1][0] !== 1) throw new Error();
 * ```
 */
export function macMatrix(
  first: readonly ComplexVector[],
  second: readonly ComplexVector[],
): Float64Array[] {
  return first.map((a) => Float64Array.from(second, (b) => macValue(a, b)));
}

/**
 * The one-to-one pairing of rows with columns that maximises the summed
 * score (Hungarian method, O(n³)); `min(rows, columns)` pairs, as
 * `[row, column]` in row order.
 *
 * @throws {RangeError} for an empty or ragged matrix, or a score that is not finite.
 *
 * @example
 * ```ts
 * import { bestPairing } from "./mac.ts";
 * // Greedy would pair row 0 with column 0 (0.9) and leave row 1 with 0.1; the best total is 1.65.
 * const pairs = bestPairing([[0.9, 0.8], [0.85, 0.1]]);
 * if (JSON.stringify(pairs) !== "[[0,1],[1,0]]") throw new Error();
 * ```
 */
export function bestPairing(score: readonly ArrayLike<number>[]): [number, number][] {
  const rows = score.length;
  const columns = score[0]?.length ?? 0;
  if (rows === 0 || columns === 0) throw new RangeError("pairing needs a non-empty matrix");
  if (score.some((r) => r.length !== columns)) throw new RangeError("the matrix is ragged");
  // Square cost matrix (pad with zero score), minimise cost = max − score.
  const n = Math.max(rows, columns);
  let top = -Infinity;
  for (const r of score) {
    for (let j = 0; j < columns; j++) {
      if (!Number.isFinite(r[j])) throw new RangeError(`a score is ${r[j]}`);
      top = Math.max(top, r[j]);
    }
  }
  const cost = (i: number, j: number) => (i < rows && j < columns ? top - score[i][j] : top);
  // Shortest augmenting paths with potentials (1-based arrays, column 0 a sentinel).
  const u = new Float64Array(n + 1), v = new Float64Array(n + 1);
  const match = new Int32Array(n + 1); // match[j] = row matched to column j
  const way = new Int32Array(n + 1);
  for (let i = 1; i <= n; i++) {
    match[0] = i;
    let j0 = 0;
    const minv = new Float64Array(n + 1).fill(Infinity);
    const used = new Uint8Array(n + 1);
    do {
      used[j0] = 1;
      const i0 = match[j0];
      let delta = Infinity, j1 = 0;
      for (let j = 1; j <= n; j++) {
        if (used[j]) continue;
        const reduced = cost(i0 - 1, j - 1) - u[i0] - v[j];
        if (reduced < minv[j]) {
          minv[j] = reduced;
          way[j] = j0;
        }
        if (minv[j] < delta) {
          delta = minv[j];
          j1 = j;
        }
      }
      for (let j = 0; j <= n; j++) {
        if (used[j]) {
          u[match[j]] += delta;
          v[j] -= delta;
        } else {
          minv[j] -= delta;
        }
      }
      j0 = j1;
    } while (match[j0] !== 0);
    do {
      const j1 = way[j0];
      match[j0] = match[j1];
      j0 = j1;
    } while (j0 !== 0);
  }
  const pairs: [number, number][] = [];
  for (let j = 1; j <= n; j++) {
    const i = match[j] - 1;
    if (i < rows && j - 1 < columns) pairs.push([i, j - 1]);
  }
  return pairs.sort((a, b) => a[0] - b[0]);
}
