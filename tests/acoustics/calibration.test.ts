import { describe, expect, test } from "vitest";
import { calibrateMicrophone } from "../../lib/acoustics/calibration.ts";
import { gaussianNoise } from "../helpers/random.ts";

// A calibrator's level L gives p = 20 µPa·10^(L/20) rms (ISO 1683 reference): 94 dB is
// 1.0024 Pa, 114 dB is 10.024 Pa (common practice: the two usual calibrator levels).
// Real calibrators sit near, not on, 1 kHz, and a line of the analysis rarely falls on
// the tone: the flat-top window's passband (within 0.0044 dB, Heinzel et al. 2002, HFT95)
// keeps the reading within 0.1 % wherever the tone falls between lines.
describe("microphone calibration", () => {
  const rate = 25600;
  const seconds = 6;
  // Block 2^16 → df = 0.390625 Hz; offsets of 0, ¼, ½ and ¾ of a line from 1000 Hz.
  for (const level of [94, 114]) {
    for (const fraction of [0, 0.25, 0.5, 0.75]) {
      const f = 1000 + fraction * (rate / 65536);
      test(`${level} dB at ${f.toFixed(4)} Hz: sensitivity within 0.1 %`, async () => {
        const p = 20e-6 * 10 ** (level / 20);
        const sensitivity = 12.5; // mV/Pa, our invented microphone
        const noise = gaussianNoise(17, rate * seconds);
        const volts = new Float64Array(rate * seconds).map((_, i) =>
          (sensitivity / 1000) * p * Math.SQRT2 * Math.sin(2 * Math.PI * f * i / rate) +
          1e-5 * noise[i]
        );
        const recording = {
          rate,
          startTime: 0,
          channels: [{ name: "mic", unit: "V", data: volts }],
        };
        const c = await calibrateMicrophone(recording, 0, { levelDb: level, frequencyHz: 1000 });
        expect(Math.abs(c.pressureRmsPa / p - 1)).toBeLessThan(1e-12);
        expect(Math.abs(c.sensitivityMvPerPa / sensitivity - 1)).toBeLessThan(0.001);
      });
    }
  }
});
