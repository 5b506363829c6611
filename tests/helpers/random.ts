/** Seeded random numbers for tests (mulberry32 + Box-Muller): same seed, same data. */

/** A uniform generator on [0, 1) from a 32-bit seed. */
export function uniformGenerator(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A standard-normal generator from a 32-bit seed (Box–Muller, one value per call). */
export function gaussianGenerator(seed: number): () => number {
  const uniform = uniformGenerator(seed);
  return () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
}

/** `length` standard-normal samples from `seed`. */
export function gaussianNoise(seed: number, length: number): Float64Array {
  const uniform = uniformGenerator(seed);
  const out = new Float64Array(length);
  for (let i = 0; i < length; i += 2) {
    const r = Math.sqrt(-2 * Math.log(1 - uniform()));
    const phase = 2 * Math.PI * uniform();
    out[i] = r * Math.cos(phase);
    if (i + 1 < length) out[i + 1] = r * Math.sin(phase);
  }
  return out;
}
