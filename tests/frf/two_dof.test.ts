import { maxOf } from "../../lib/extent.ts";
import { beforeAll, describe, expect, test } from "vitest";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import type { Recording } from "../../lib/io/recording.ts";
import type { Table } from "../../lib/io/table.ts";
import { gaussianNoise } from "../helpers/random.ts";
import { type Mode, receptance, simulateReceptance } from "../helpers/modal.ts";

// Our own 2-DOF test structure, seen at one response point (invented for the test).
const MODES: Mode[] = [
  { frequencyHz: 42.5, damping: 0.02, residue: 4.0 },
  { frequencyHz: 117.3, damping: 0.015, residue: -2.5 },
];
const RATE = 4096;
const BLOCK = 16384; // df = 0.25 Hz: 7 lines in the first mode's half-power band
const LENGTH = 40 * BLOCK;

const force = gaussianNoise(2024, LENGTH).map((v) => 50 * v);
const displacement = simulateReceptance(MODES, force, RATE);

function recording(measuredForce: Float64Array, response: Float64Array): Recording {
  return {
    rate: RATE,
    startTime: 0,
    channels: [
      { name: "force", unit: "N", data: measuredForce },
      { name: "tip", unit: "m", data: response },
    ],
  };
}

function magnitudeErrorsDb(
  table: Table,
  band: [number, number],
  keep: (k: number) => boolean = () => true,
): number[] {
  const f = table.columns[0].values;
  const mag = table.columns.find((c) => c.name === "tip_mag")!.values;
  const errors: number[] = [];
  for (let k = 0; k < f.length; k++) {
    if (f[k] < band[0] || f[k] > band[1] || !keep(k)) continue;
    const h = receptance(MODES, f[k]);
    errors.push(20 * Math.log10(mag[k] / Math.hypot(h.re, h.im)));
  }
  return errors;
}

const mean = (v: number[]) => v.reduce((s, x) => s + x, 0) / v.length;

describe("FRF of a simulated 2-DOF structure", () => {
  test("H1 follows the analytic FRF within 0.5 dB where coherence is high", async () => {
    // Analytic receptance by modal superposition (Ewins, Modal Testing, eq. 2.37).
    // A little output noise (2 % of the RMS) lowers coherence at the antiresonance.
    const noise = gaussianNoise(6, LENGTH);
    const rms = Math.sqrt(displacement.reduce((s, v) => s + v * v, 0) / LENGTH);
    const measured = displacement.map((v, i) => v + 0.02 * rms * noise[i]);
    const { table } = await frequencyResponse(recording(force, measured), {
      input: "force",
      outputs: ["tip"],
      block: BLOCK,
    });
    const coherence = table.columns.find((c) => c.name === "tip_coherence")!.values;
    const errors = magnitudeErrorsDb(table, [10, 250], (k) => coherence[k] > 0.95);
    expect(errors.length).toBeGreaterThan(400); // of 961 lines in the band
    expect(maxOf(errors.map(Math.abs))).toBeLessThan(0.5);
    // Both peaks sit on the right line (within one line of the analytic peak).
    const f = table.columns[0].values;
    const mag = table.columns.find((c) => c.name === "tip_mag")!.values;
    for (const mode of MODES) {
      let best = 0;
      for (let k = 0; k < f.length; k++) {
        if (Math.abs(f[k] - mode.frequencyHz) < 5 && mag[k] > mag[best]) best = k;
      }
      expect(Math.abs(f[best] - mode.frequencyHz)).toBeLessThanOrEqual(0.25);
    }
  });

  // The noise tests compare with the noise-free H1 of the same force, so that
  // only the noise differs; lines where the true FRF is near zero are left out
  // (there |H| of any estimate is dominated by its random error).
  let cleanMag: Float64Array;
  beforeAll(async () => {
    const clean = (await frequencyResponse(recording(force, displacement), {
      input: "force",
      outputs: ["tip"],
      block: BLOCK,
    })).table;
    cleanMag = clean.columns.find((c) => c.name === "tip_mag")!.values;
  });
  const ratiosDb = (table: Table, keep: (k: number) => boolean) => {
    const f = table.columns[0].values;
    const mag = table.columns.find((c) => c.name === "tip_mag")!.values;
    const out: number[] = [];
    for (let k = 0; k < f.length; k++) {
      if (f[k] >= 20 && f[k] <= 250 && keep(k)) out.push(20 * Math.log10(mag[k] / cleanMag[k]));
    }
    return out;
  };

  test("with noise on the output, H1 stays unbiased and H2 reads high", async () => {
    // Bendat & Piersol, Random Data, sec. 9.1.3: output noise biases H2 by (1 + Gnn/Gvv), not H1.
    const noise = gaussianNoise(7, LENGTH);
    const scale = 0.3 * Math.sqrt(displacement.reduce((s, v) => s + v * v, 0) / LENGTH);
    const rec = recording(force, displacement.map((v, i) => v + scale * noise[i]));
    const h1 =
      (await frequencyResponse(rec, { input: "force", outputs: ["tip"], block: BLOCK })).table;
    const h2 = (await frequencyResponse(rec, {
      input: "force",
      outputs: ["tip"],
      block: BLOCK,
      estimator: "h2",
    })).table;
    const coherence = h1.columns.find((c) => c.name === "tip_coherence")!.values;
    const moderate = (k: number) => coherence[k] > 0.4 && coherence[k] < 0.8;
    const e1 = ratiosDb(h1, moderate);
    const e2 = ratiosDb(h2, moderate);
    expect(e1.length).toBeGreaterThan(50);
    expect(Math.abs(mean(e1))).toBeLessThan(0.3);
    // With 0.4 < γ² < 0.8, H2's bias 10·log10(1/γ²) lies between 1 and 4 dB.
    expect(mean(e2)).toBeGreaterThan(1);
    expect(mean(e2)).toBeLessThan(4);
  });

  test("with noise on the input, H2 stays unbiased and H1 reads low", async () => {
    // Bendat & Piersol, Random Data, sec. 9.1.3: input noise biases H1 by Gxx/(Gxx + Gmm), not H2.
    const noise = gaussianNoise(8, LENGTH);
    const rec = recording(force.map((v, i) => v + 35 * noise[i]), displacement); // Gmm/Gxx = 0.49
    const all = () => true;
    const e1 = ratiosDb(
      (await frequencyResponse(rec, { input: "force", outputs: ["tip"], block: BLOCK })).table,
      all,
    );
    const e2 = ratiosDb(
      (await frequencyResponse(rec, {
        input: "force",
        outputs: ["tip"],
        block: BLOCK,
        estimator: "h2",
      })).table,
      all,
    );
    // Expected H1 bias: 20·log10(1/(1 + 0.49)) = −3.46 dB on every line (|H1| = |H|·Gxx/(Gxx+Gmm)).
    expect(mean(e1)).toBeGreaterThan(-3.46 - 0.3);
    expect(mean(e1)).toBeLessThan(-3.46 + 0.3);
    expect(Math.abs(mean(e2))).toBeLessThan(0.3);
  });
});
