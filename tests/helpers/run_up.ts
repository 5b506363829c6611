/** Synthesised run-ups of our own: known shaft angle, tacho pulses and order content. */
import type { Recording } from "../../lib/io/recording.ts";
import { gaussianNoise } from "./random.ts";

/** A speed profile: rpm and the exact shaft angle (revolutions) against time. */
export interface Profile {
  rpm(t: number): number;
  angle(t: number): number;
}

/** rpm rising (or falling) linearly from r0 to r1 over T seconds. */
export function linearProfile(r0: number, r1: number, T: number): Profile {
  return {
    rpm: (t) => r0 + ((r1 - r0) * t) / T,
    angle: (t) => (r0 * t + ((r1 - r0) * t * t) / (2 * T)) / 60, // ∫ rpm/60 dt, analytic
  };
}

/** rpm rising with the square of time: r0 + (r1 − r0)(t/T)². */
export function quadraticProfile(r0: number, r1: number, T: number): Profile {
  return {
    rpm: (t) => r0 + (r1 - r0) * (t / T) ** 2,
    angle: (t) => (r0 * t + ((r1 - r0) * t ** 3) / (3 * T * T)) / 60,
  };
}

/** One order's content: RMS amplitude as a function of rpm. */
export interface OrderContent {
  order: number;
  rms(rpm: number): number;
}

/** |H|/|H|max of a single resonance at fr Hz with damping ζ, for exciting frequency f. */
export function resonanceShape(fr: number, zeta: number): (f: number) => number {
  const peak = 1 / (2 * zeta * Math.sqrt(1 - zeta * zeta));
  return (f) => {
    const r = f / fr;
    return 1 / Math.hypot(1 - r * r, 2 * zeta * r) / peak;
  };
}

/** A TTL tacho (0/5 V) with `ppr` pulses per revolution, optionally one pulse missing. */
export function ttlTacho(
  profile: Profile,
  rate: number,
  seconds: number,
  ppr: number,
  missing?: number,
): Float64Array {
  return new Float64Array(Math.round(rate * seconds)).map((_, i) => {
    const pulses = profile.angle(i / rate) * ppr;
    const high = pulses - Math.floor(pulses) < 0.5;
    return high && Math.floor(pulses) !== missing ? 5 : 0;
  });
}

/** A response channel: the orders' sinusoids on the exact shaft angle, plus noise of `noise` RMS. */
export function orderResponse(
  profile: Profile,
  rate: number,
  seconds: number,
  content: readonly OrderContent[],
  noise = 0,
  seed = 1,
): Float64Array {
  const n = Math.round(rate * seconds);
  const w = gaussianNoise(seed, n);
  return new Float64Array(n).map((_, i) => {
    const t = i / rate;
    const theta = profile.angle(t);
    const rpm = profile.rpm(t);
    let x = noise * w[i];
    for (const c of content) {
      x += c.rms(rpm) * Math.SQRT2 * Math.sin(2 * Math.PI * c.order * theta + c.order);
    }
    return x;
  });
}

/** A run-up recording with a TTL tacho and one response channel. */
export function runUpRecording(
  profile: Profile,
  rate: number,
  seconds: number,
  ppr: number,
  content: readonly OrderContent[],
  options: { missing?: number; noise?: number } = {},
): Recording {
  return {
    rate,
    startTime: 0,
    channels: [
      { name: "tacho", unit: "V", data: ttlTacho(profile, rate, seconds, ppr, options.missing) },
      {
        name: "mount_acc",
        unit: "m/s^2",
        data: orderResponse(profile, rate, seconds, content, options.noise ?? 0),
      },
    ],
  };
}

/**
 * An inductive (variable-reluctance) pickup: each tooth passing the sensor is a Gaussian bump of
 * flux in shaft angle, Φ ∝ exp(−(θ − θₖ)²/2w²), and the voltage is dΦ/dt = dΦ/dθ · ω (Faraday's
 * law), so a positive lobe then a negative lobe whose amplitude grows with speed, crossing zero at
 * the tooth's centre θₖ = k/ppr (common practice: that zero crossing is the pickup's timing point).
 * `peakAt600` is the lobes' peak voltage at 600 rpm; `width` is w in revolutions; `noise` the RMS
 * of added white noise. Teeth whose index is in `absent` (k counted from 0) give nothing.
 */
export function inductiveTacho(
  profile: Profile,
  rate: number,
  seconds: number,
  ppr: number,
  options: {
    peakAt600: number;
    width: number;
    noise?: number;
    seed?: number;
    absent?: (k: number) => boolean;
  },
): Float64Array {
  const n = Math.round(rate * seconds);
  const w = gaussianNoise(options.seed ?? 3, n);
  const width = options.width;
  return new Float64Array(n).map((_, i) => {
    const t = i / rate;
    const theta = profile.angle(t);
    let v = 0;
    // The teeth within 6 widths of the angle (the rest add less than e^-18).
    const first = Math.ceil((theta - 6 * width) * ppr),
      last = Math.floor((theta + 6 * width) * ppr);
    for (let k = first; k <= last; k++) {
      if (options.absent?.(k)) continue;
      const x = (theta - k / ppr) / width;
      // −x·e^(−x²/2) peaks at e^(−1/2) (x = −1): scaled to 1 there.
      v += -x * Math.exp(0.5 - x * x / 2);
    }
    return options.peakAt600 * (profile.rpm(t) / 600) * v + (options.noise ?? 0) * w[i];
  });
}
