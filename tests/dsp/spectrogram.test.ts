import { readFileSync } from "node:fs";
import { describe, expect, test } from "vitest";
import { spectrogram } from "../../lib/dsp/spectrogram.ts";
import { parseCsvRecording } from "../../lib/io/csv_reader.ts";
import { assertClose, maxAbs } from "../helpers/assert_close.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";
import { iecA } from "../helpers/iec_weighting.ts";

// Reference: fixtures/reference/spectrogram_reference.json, scipy.signal.spectrogram with
// window "hann", nperseg 256, noverlap 128, detrend "constant", scaling "density"
// (tests/reference/make_spectrogram_reference.py).
const ref = readJsonFixture<{ frequencies: number[]; times: number[]; psd: number[][] }>(
  "reference/spectrogram_reference.json",
);
const recording = parseCsvRecording(
  readFileSync(fixturePath("recordings/runup_mic_1ch.csv"), "utf8"),
);

describe("spectrogram against time", () => {
  test("each frame's PSD equals scipy.signal.spectrogram to 1e-6, at scipy's times", async () => {
    const table = await spectrogram(recording, { block: 256, overlap: 0.5 });
    const [time, frequency, psd] = table.columns.map((c) => c.values);
    const lines = ref.frequencies.length;
    expect(time.length).toBe(ref.times.length * lines);
    ref.times.forEach((t, j) => {
      assertClose(time[j * lines], t, { relative: 1e-12, absolute: 1e-12 }, `time of frame ${j}`);
      assertClose(frequency.subarray(j * lines, (j + 1) * lines), ref.frequencies, {
        relative: 1e-12,
        absolute: 0,
      }, "frequencies");
      const expected = ref.psd[j];
      assertClose(psd.subarray(j * lines, (j + 1) * lines), expected, {
        relative: 1e-6,
        absolute: 1e-10 * maxAbs(expected),
      }, `frame ${j}`);
    });
  });

  test("a frame of 3 segments sits at the centre of its segments and averages their PSDs", async () => {
    // A frame of segments k…k+2 spans from the first's start to the last's end: its centre is
    // midway between the first and last segments' centres (scipy's times of those segments),
    // and its PSD is the mean of theirs (Welch 1967: averaged periodograms).
    const perFrame = 3;
    const table = await spectrogram(recording, { block: 256, overlap: 0.5, frames: perFrame });
    const [time, , psd] = table.columns.map((c) => c.values);
    const lines = ref.frequencies.length;
    const frames = Math.floor(ref.times.length / perFrame);
    expect(time.length).toBe(frames * lines);
    for (let j = 0; j < frames; j++) {
      const first = ref.times[perFrame * j], last = ref.times[perFrame * j + perFrame - 1];
      assertClose(
        time[j * lines],
        (first + last) / 2,
        { relative: 1e-12, absolute: 1e-12 },
        `time of frame ${j}`,
      );
      const mean = ref.psd[perFrame * j].map((_, k) =>
        (ref.psd[perFrame * j][k] + ref.psd[perFrame * j + 1][k] + ref.psd[perFrame * j + 2][k]) / 3
      );
      assertClose(psd.subarray(j * lines, (j + 1) * lines), mean, {
        relative: 1e-6,
        absolute: 1e-10 * maxAbs(mean),
      }, `frame ${j}`);
    }
  });

  test("A-weighted and in dB: scipy's PSD plus A(f) re (20 µPa)²/Hz, line by line", async () => {
    // IEC 61672-1 A-weighting (typed formula, tests/helpers/iec_weighting.ts) and the
    // ISO 1683 reference of sound pressure, 20 µPa.
    const table = await spectrogram(recording, { block: 256, weighting: "A", db: true });
    const psd = table.columns[2].values;
    const lines = ref.frequencies.length;
    for (const j of [0, 10, 40]) {
      for (let k = 1; k < lines; k++) {
        const expected = 10 * Math.log10(ref.psd[j][k] / (20e-6) ** 2) + iecA(ref.frequencies[k]);
        // 0.001 dB: the standard's A1000 = −2.000 dB is rounded (the exact normalisation
        // differs by about 0.0003 dB); a wrong weighting or reference is off by far more.
        expect(Math.abs(psd[j * lines + k] - expected), `frame ${j}, line ${k}`).toBeLessThan(1e-3);
      }
    }
    expect(table.columns[2].unit).toBe("dB(A) re 20 µPa/√Hz");
  });

  test("a record with fewer segments than one frame is refused, not written empty", async () => {
    // 6144 samples hold (6144 − 4096)/2048 + 1 = 2 segments of 4096 at 50 % overlap.
    await expect(spectrogram(recording, { block: 4096, frames: 4 })).rejects.toThrow(
      /holds 2 segment\(s\) of 4096 samples, fewer than one frame of 4/,
    );
  });

  test("an output over the cell limit is refused with the count and how to coarsen", async () => {
    await expect(spectrogram(recording, { block: 256, maxCells: 1000 })).rejects.toThrow(
      /would hold \d+ cells .* coarsen it/,
    );
  });
});

describe("quiver spectrogram", () => {
  test("writes the library's table, with a time slice", async () => {
    const { runQuiver } = await import("../helpers/cli.ts");
    const r = runQuiver([
      "spectrogram",
      fixturePath("recordings/runup_mic_1ch.csv"),
      "--block",
      "256",
      "--start",
      "1",
      "--end",
      "3",
      "--format",
      "json",
    ]);
    expect(r.code, r.stderr).toBe(0);
    const json = JSON.parse(r.stdout);
    // Frames of the slice 1–3 s: (2048 − 256)/128 + 1 = 15, the first centred at 1.125 s.
    expect(json.metadata.frames).toBe(15);
    expect(json.columns[0].values[0]).toBe(1.125);
    expect(json.metadata.slice_s).toEqual({ start: 1, end: 3 });
  });
});
