/**
 * The A-weighting of IEC 61672-1:2013 Annex E, typed here from the standard
 * so that tests do not take their expected values from quiver's own code:
 *
 *   A(f) = 20·lg[ f4²·f⁴ / ((f² + f1²)·√(f² + f2²)·√(f² + f3²)·(f² + f4²)) ] − A1000
 *
 * with f1 = 20.598997 Hz, f2 = 107.65265 Hz, f3 = 737.86223 Hz,
 * f4 = 12194.217 Hz (Annex E, E.4.1 and E.4.2) and A1000 = −2.000 dB, the
 * value of the bracket at 1 kHz (E.2). Values from memory of the standard;
 * they reproduce its Table 3 to 0.05 dB (tests/acoustics/weighting.test.ts).
 */
const F1 = 20.598997, F2 = 107.65265, F3 = 737.86223, F4 = 12194.217;
const A1000 = -2.0;

/** IEC 61672-1 A-weighting in dB at frequency f (Hz). */
export function iecA(f: number): number {
  const f2 = f * f;
  const ratio = (F4 * F4 * f2 * f2) /
    ((f2 + F1 * F1) * Math.sqrt(f2 + F2 * F2) * Math.sqrt(f2 + F3 * F3) * (f2 + F4 * F4));
  return 20 * Math.log10(ratio) - A1000;
}
