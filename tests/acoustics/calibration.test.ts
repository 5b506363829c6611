import { describe, expect, test } from "vitest";
import { calibrateMicrophone } from "../../lib/acoustics/calibration.ts";
import { gaussianNoise } from "../helpers/random.ts";
import { assertClose } from "../helpers/assert_close.ts";

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

describe("calibration from the steady part of the tone", () => {
  const rate = 48000;
  // IEC 60942: a sound calibrator's nominal level, here 94 dB re 20 µPa (1.0024 Pa rms) at
  // 1 kHz; the microphone is 50 mV/Pa (our invented one).
  const p = 20e-6 * 10 ** (94 / 20);
  const volts = (seconds: number, gain: (t: number) => number) => {
    const noise = gaussianNoise(41, rate * seconds);
    return new Float64Array(rate * seconds).map((_, i) =>
      gain(i / rate) * 0.05 * p * Math.SQRT2 * Math.sin(2 * Math.PI * 1000 * i / rate) +
      1e-5 * noise[i]
    );
  };
  const mic = (data: Float64Array) => ({
    rate,
    startTime: 0,
    channels: [{ name: "mic", unit: "V", data }],
  });

  test("a 0.5 s dropout is left out with a warning naming it; 50.0 mV/Pa within 0.1 %", async () => {
    const data = volts(10, (t) => (t >= 4.2 && t < 4.7 ? 0 : 1));
    // The naive reading, the rms of the whole record, is 2.5 % low in power (0.5 s of 10 s):
    // √0.95 − 1 = −2.5 %. Computed here, independent of the calibration code.
    let sum = 0;
    for (const v of data) sum += v * v;
    const naive = 1000 * Math.sqrt(sum / data.length) / p;
    expect(Math.abs(naive / 50 - 1)).toBeGreaterThan(0.02);
    const c = await calibrateMicrophone(mic(data), 0);
    assertClose(c.sensitivityMvPerPa, 50, { relative: 0.001, absolute: 0 });
    expect(c.excluded).toHaveLength(1);
    assertClose([c.excluded[0].startS, c.excluded[0].endS], [4.2, 4.7], {
      relative: 0,
      absolute: 1e-9,
    });
    expect(c.warnings.join()).toMatch(
      /not steady .* over 4\.2–4\.7 s \(-\d+ dB\): left out with one frame either side/,
    );
    // 10 s less the 0.5 s and one 0.1 s frame either side.
    assertClose(c.steadySeconds, 9.3, { relative: 0, absolute: 1e-9 });
  });

  test("a dropout that begins and ends inside frames: those frames are left out too", async () => {
    // 4.295 to 4.705 s: the frames 4.2–4.3 and 4.7–4.8 hold 5 ms of silence each, −0.22 dB,
    // within the 0.3 dB tolerance: only the margin of one frame either side keeps them out.
    const data = volts(10, (t) => (t >= 4.295 && t < 4.705 ? 0 : 1));
    const c = await calibrateMicrophone(mic(data), 0);
    assertClose(c.sensitivityMvPerPa, 50, { relative: 0.001, absolute: 0 });
    expect(c.warnings.join()).toMatch(/4\.3–4\.7 s/);
    assertClose(c.steadySeconds, 9.4, { relative: 0, absolute: 1e-9 });
  });

  test("a DC offset settling after switch-on is not unsteadiness: no warning", async () => {
    // 50 mV decaying with τ = 0.5 s (an AC-coupled input settling; common practice) under a
    // 71 mV-amplitude tone: in mean square the first frames would read up to 3.5 dB high.
    const tone = volts(6, () => 1);
    const data = tone.map((v, i) => v + 0.05 * Math.exp(-i / rate / 0.5));
    const c = await calibrateMicrophone(mic(data), 0);
    expect(c.warnings).toEqual([]);
    assertClose(c.sensitivityMvPerPa, 50, { relative: 0.001, absolute: 0 });
  });

  test("a level step halfway is refused: the tone has no one level", async () => {
    // 94 dB for 5 s, then 1 dB more (a calibrator not seated, then pushed home).
    const data = volts(10, (t) => (t < 5 ? 1 : 10 ** (1 / 20)));
    await expect(calibrateMicrophone(mic(data), 0)).rejects.toThrow(
      // The median of 50 frames at each level lies halfway: every frame is 0.5 dB off it.
      /not steady: 100 % of its 0\.1 s frames .* span -0\.5 to \+0\.5 dB about the median/,
    );
  });

  test("a level step in the last second is left out with a warning", async () => {
    const data = volts(10, (t) => (t < 9 ? 1 : 10 ** (-6 / 20)));
    const c = await calibrateMicrophone(mic(data), 0);
    assertClose(c.sensitivityMvPerPa, 50, { relative: 0.001, absolute: 0 });
    expect(c.warnings.join()).toMatch(/9–10 s \(-6 dB\)/);
  });
});
