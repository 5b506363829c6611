/**
 * Closed-form modal superposition for test structures (Ewins, Modal Testing,
 * 2nd ed., eq. 2.37, viscous damping): the receptance of point j is
 * H(ω) = Σᵣ Aᵣ / (ωᵣ² − ω² + 2iζᵣωᵣω), and its impulse response is
 * h(t) = Σᵣ (Aᵣ/ω_dᵣ)·e^(−ζᵣωᵣt)·sin(ω_dᵣt), ω_d = ω√(1 − ζ²).
 */

/** One mode as seen at one response point. */
export interface Mode {
  /** Undamped natural frequency in Hz. */
  frequencyHz: number;
  /** Viscous damping ratio ζ. */
  damping: number;
  /** Modal constant Aᵣ in (m/N)·(rad/s)². */
  residue: number;
}

/** The analytic receptance at frequency f (Hz). */
export function receptance(modes: readonly Mode[], f: number): { re: number; im: number } {
  const w = 2 * Math.PI * f;
  let re = 0;
  let im = 0;
  for (const m of modes) {
    const wr = 2 * Math.PI * m.frequencyHz;
    const dr = wr * wr - w * w;
    const di = 2 * m.damping * wr * w;
    const d2 = dr * dr + di * di;
    re += (m.residue * dr) / d2;
    im -= (m.residue * di) / d2;
  }
  return { re, im };
}

/**
 * Displacement response to a sampled force by impulse invariance: each mode
 * is the recursive filter whose impulse response is T·h(nT). For modes well
 * below the Nyquist frequency this matches the continuous structure closely
 * (the aliasing error falls as (f/fs)²).
 */
export function simulateReceptance(
  modes: readonly Mode[],
  force: Float64Array,
  rate: number,
): Float64Array {
  const T = 1 / rate;
  const y = new Float64Array(force.length);
  for (const m of modes) {
    const wr = 2 * Math.PI * m.frequencyHz;
    const sigma = m.damping * wr;
    const wd = wr * Math.sqrt(1 - m.damping * m.damping);
    const r = Math.exp(-sigma * T);
    const b1 = T * (m.residue / wd) * r * Math.sin(wd * T);
    const a1 = -2 * r * Math.cos(wd * T);
    const a2 = r * r;
    let y1 = 0;
    let y2 = 0;
    let x1 = 0;
    for (let n = 0; n < force.length; n++) {
      const v = b1 * x1 - a1 * y1 - a2 * y2;
      y2 = y1;
      y1 = v;
      x1 = force[n];
      y[n] += v;
    }
  }
  return y;
}
