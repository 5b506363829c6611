import { maxOf } from "../../lib/extent.ts";
import { describe, expect, test } from "vitest";
import { trackOrders } from "../../lib/orders/order_tracking.ts";
import { recordingSource } from "../../lib/io/recording_stream.ts";
import { QuiverError } from "../../lib/errors.ts";
import { spectralEstimate } from "../../lib/dsp/spectral_core.ts";
import { autoSpectrum } from "../../lib/dsp/spectrum_kinds.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { iecA } from "../helpers/iec_weighting.ts";
import type { Table } from "../../lib/io/table.ts";
import {
  linearProfile,
  type OrderContent,
  quadraticProfile,
  resonanceShape,
  runUpRecording,
} from "../helpers/run_up.ts";

const RATE = 8192;
const col = (t: Table, name: string) => t.columns.find((c) => c.name === name)!.values;
const db = (a: number, b: number) => 20 * Math.log10(a / b);

// Our e-motor mount (invented): order 2 steady at 0.5 m/s² rms; order 6 crossing a
// 320 Hz mount resonance (ζ = 5 %), peaking at 60·320/6 = 3200 rpm with 2 m/s² rms.
const resonance = resonanceShape(320, 0.05);
const CONTENT: OrderContent[] = [
  { order: 2, rms: () => 0.5 },
  { order: 6, rms: (rpm) => 2 * resonance((6 * rpm) / 60) },
];

describe("order tracking of a run-up", () => {
  for (
    const [name, profile] of [
      ["linear", linearProfile(900, 4800, 20)],
      ["quadratic", quadraticProfile(900, 4800, 20)],
    ] as const
  ) {
    test(`${name} 900→4800 rpm in 20 s, 2-pulse TTL tacho: order cuts within 0.5 dB and 1 dB`, async () => {
      const rec = runUpRecording(profile, RATE, 20, 2, CONTENT, { noise: 0.05 });
      const { cuts, rpm } = await trackOrders(rec, {
        tacho: "tacho",
        ppr: 2,
        channels: ["mount_acc"],
        orders: [2, 6],
        rpmMin: 1000,
        rpmMax: 4700,
        rpmStep: 100,
      });
      // rpm profile within 0.5 % of the analytic one.
      const times = col(rpm, "time_s");
      const r = col(rpm, "rpm");
      times.forEach((t, i) => {
        if (t > 0.5 && t < 19.5) expect(Math.abs(r[i] / profile.rpm(t) - 1)).toBeLessThan(0.005);
      });
      const steps = col(cuts, "rpm");
      const o2 = col(cuts, "mount_acc_order2");
      const o6 = col(cuts, "mount_acc_order6");
      steps.forEach((s, i) => {
        expect(Math.abs(db(o2[i], 0.5)), `order 2 at ${s} rpm`).toBeLessThan(0.5);
        expect(Math.abs(db(o6[i], CONTENT[1].rms(s))), `order 6 at ${s} rpm`).toBeLessThan(1);
      });
      // The resonance is crossed by order 6 at 3200 rpm.
      expect(steps[o6.indexOf(maxOf(o6))]).toBe(3200);
      // Overall level: both orders and the noise, as RMS.
      const overall = col(cuts, "mount_acc_overall");
      const at3200 = steps.indexOf(3200);
      expect(Math.abs(db(overall[at3200], Math.sqrt(0.25 + 4 + 0.0025)))).toBeLessThan(0.5);
    });
  }

  test("a run-down reads the same", async () => {
    const rec = runUpRecording(linearProfile(4800, 900, 20), RATE, 20, 2, CONTENT);
    const { cuts } = await trackOrders(rec, {
      tacho: "tacho",
      ppr: 2,
      channels: ["mount_acc"],
      orders: [2, 6],
      rpmStep: 200,
    });
    const steps = col(cuts, "rpm");
    col(cuts, "mount_acc_order6").forEach((v, i) => {
      expect(Math.abs(db(v, CONTENT[1].rms(steps[i])))).toBeLessThan(1);
    });
  });

  test("order resolution is 1/revolutions: orders 4 and 4.25 are told apart", async () => {
    const rec = runUpRecording(linearProfile(1500, 3000, 10), RATE, 10, 1, [
      { order: 4, rms: () => 1 },
      { order: 4.25, rms: () => 0.3 },
    ]);
    const { cuts } = await trackOrders(rec, {
      tacho: "tacho",
      ppr: 1,
      channels: ["mount_acc"],
      orders: [4, 4.25],
      revolutions: 16,
      rpmStep: 250,
    });
    expect(cuts.metadata.order_resolution).toBe(1 / 16);
    for (const v of col(cuts, "mount_acc_order4")) expect(Math.abs(db(v, 1))).toBeLessThan(0.5);
    for (const v of col(cuts, "mount_acc_order4.25")) {
      expect(Math.abs(db(v, 0.3))).toBeLessThan(0.5);
    }
  });

  test("a high order above the resampled Nyquist does not fold into low orders", async () => {
    // With 64 samples per revolution the resampled Nyquist is order 32; order 90 would
    // alias to |90 − 64| = 26 without the band-limited resampling (sampling theorem).
    const rec = runUpRecording(linearProfile(1000, 1500, 10), RATE, 10, 1, [
      { order: 3, rms: () => 1 },
      { order: 90, rms: () => 1 },
    ]);
    const { cuts } = await trackOrders(rec, {
      tacho: "tacho",
      ppr: 1,
      channels: ["mount_acc"],
      orders: [3, 26],
      samplesPerRev: 64,
      rpmStep: 100,
    });
    for (const v of col(cuts, "mount_acc_order3")) expect(Math.abs(db(v, 1))).toBeLessThan(0.5);
    for (const v of col(cuts, "mount_acc_order26")) expect(db(v, 1)).toBeLessThan(-40);
  });

  test("the time-domain method reads a slow sweep", async () => {
    const rec = runUpRecording(linearProfile(1000, 1600, 30), RATE, 30, 2, [{
      order: 2,
      rms: () => 0.5,
    }]);
    const { cuts, map } = await trackOrders(rec, {
      tacho: "tacho",
      ppr: 2,
      channels: ["mount_acc"],
      orders: [2],
      method: "time",
      rpmStep: 100,
    });
    for (const v of col(cuts, "mount_acc_order2")) expect(Math.abs(db(v, 0.5))).toBeLessThan(0.5);
    expect(map.columns[1].name).toBe("frequency_hz");
  });

  test("a steady order of 1.0 RMS on a line reads 1.0 in the cut, the map and spectrum --kind rms", async () => {
    // Analytic: a sinusoid of RMS A on a line of a Hann-windowed block has a power spectrum line of A²
    // per line (scipy.signal.welch(scaling="spectrum") convention); the map is documented
    // as RMS per line, like `spectrum --kind rms`. Order 3 with 16 revolutions per block
    // is on line 48 exactly (angle method).
    const rec = runUpRecording(linearProfile(1500, 2500, 10), RATE, 10, 1, [
      { order: 3, rms: () => 1 },
    ]);
    for (const amplitude of ["rms", "peak"] as const) {
      const { cuts, map } = await trackOrders(rec, {
        tacho: "tacho",
        ppr: 1,
        channels: ["mount_acc"],
        orders: [3],
        revolutions: 16,
        rpmStep: 250,
        amplitude,
      });
      const expected = amplitude === "peak" ? Math.SQRT2 : 1; // a sinusoid's peak is √2·RMS
      for (const v of col(cuts, "mount_acc_order3")) {
        assertClose(v, expected, { relative: 0.01, absolute: 0 }, `${amplitude} cut`);
      }
      const order = col(map, "order");
      const values = col(map, "mount_acc");
      let seen = 0;
      order.forEach((k, i) => {
        if (Math.abs(k - 3) < 1e-9) {
          seen++;
          assertClose(values[i], expected, { relative: 0.01, absolute: 0 }, `${amplitude} map`);
        }
      });
      expect(seen).toBe(col(cuts, "rpm").length);
      // The overall is RMS whatever the amplitude option: 1.0 for this single order.
      for (const v of col(cuts, "mount_acc_overall")) {
        assertClose(v, 1, { relative: 0.01, absolute: 0 }, "overall");
      }
    }
    // spectrum --kind rms on a 1.0 RMS tone on line 64 of a 4096 block, Hann window.
    const tone = new Float64Array(8 * 4096).map((_, i) =>
      Math.SQRT2 * Math.sin(2 * Math.PI * 64 * i / 4096)
    );
    const estimate = spectralEstimate([tone], { rate: 4096, block: 4096, window: "hann" });
    assertClose(autoSpectrum(estimate, 0, "rms")[64], 1, { relative: 1e-9, absolute: 0 }, "rms");
  });

  for (const method of ["angle", "time"] as const) {
    test(`${method} method: a recording read as a stream (spooled) gives the same numbers as in memory`, async () => {
      const rec = runUpRecording(linearProfile(900, 4800, 20), RATE, 20, 2, CONTENT, {
        noise: 0.05,
      });
      const options = {
        tacho: "tacho",
        ppr: 2,
        channels: ["mount_acc"],
        orders: [2, 6],
        rpmStep: 100,
        method,
        weighting: "A" as const,
      };
      const inMemory = await trackOrders(rec, options);
      const streamed = await trackOrders(recordingSource(rec), options);
      expect(streamed.warnings).toEqual(inMemory.warnings);
      for (const part of ["cuts", "rpm", "map"] as const) {
        streamed[part].columns.forEach((c, i) => {
          expect(Array.from(c.values), `${part} ${c.name}`).toEqual(
            Array.from(inMemory[part].columns[i].values),
          );
        });
      }
    });
  }

  test("a requested range beyond the recorded speeds is refused", async () => {
    const rec = runUpRecording(linearProfile(900, 4800, 20), RATE, 20, 2, CONTENT);
    await expect(
      trackOrders(rec, {
        tacho: "tacho",
        ppr: 2,
        channels: ["mount_acc"],
        rpmMin: 500,
        rpmMax: 5000,
      }),
    ).rejects.toThrow(QuiverError);
  });
});

describe("A-weighted order cuts in dB", () => {
  test("order 2 of a cabin microphone at 0.1 Pa rms reads 20·lg(0.1/20 µPa) + A(2·rpm/60) within 0.3 dB", async () => {
    // Analytic: a constant 0.1 Pa rms order, weighted at its own frequency by the
    // IEC 61672-1 A-weighting (formula typed into tests/helpers/iec_weighting.ts), in dB re
    // 20 µPa (ISO 1683).
    const rec = runUpRecording(linearProfile(900, 4800, 20), RATE, 20, 2, [
      { order: 2, rms: () => 0.1 },
    ]);
    const mic = { ...rec.channels[1], name: "cabin_mic", unit: "Pa" };
    const { cuts } = await trackOrders({ ...rec, channels: [rec.channels[0], mic] }, {
      tacho: "tacho",
      ppr: 2,
      channels: ["cabin_mic"],
      orders: [2],
      rpmMin: 1000,
      rpmMax: 4700,
      rpmStep: 100,
      weighting: "A",
      db: true,
    });
    const steps = col(cuts, "rpm");
    const o2 = col(cuts, "cabin_mic_order2");
    expect(cuts.columns[1].unit).toBe("dB(A) re 20 µPa");
    steps.forEach((r, i) => {
      const expected = 20 * Math.log10(0.1 / 20e-6) + iecA((2 * r) / 60);
      expect(Math.abs(o2[i] - expected), `${r} rpm`).toBeLessThan(0.3);
    });
    // The weighted overall of a single order is that order's weighted level (energy sum).
    const overall = col(cuts, "cabin_mic_overall");
    steps.forEach((r, i) => {
      const expected = 20 * Math.log10(0.1 / 20e-6) + iecA((2 * r) / 60);
      expect(Math.abs(overall[i] - expected), `overall at ${r} rpm`).toBeLessThan(0.3);
    });
  });
});
