import { describe, expect, test } from "vitest";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { ChannelStatistics, channelWarnings } from "../../lib/io/signal_checks.ts";
import { openRecordingStream, readChecked } from "../../lib/io/recording_stream.ts";
import { encodeWav } from "../../lib/io/wav.ts";
import { averagedSpectrum } from "../../lib/dsp/averaged_spectrum.ts";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import { gaussianNoise, uniformGenerator } from "../helpers/random.ts";

const channel = (data: Float64Array) => ({ name: "acc", unit: "m/s^2", data });

describe("signal-level warnings", () => {
  test("a constant channel", () => {
    expect(channelWarnings(channel(new Float64Array(500)))[0]).toMatch(/constant/);
  });

  test("clipping: flat tops at the extremes, with the true count of samples at the rails", () => {
    // An overdriven sine: a converter holding ±2 for every sample beyond (3·sin clipped at 2).
    const x = new Float64Array(20000).map((_, i) =>
      Math.max(-2, Math.min(2, 3 * Math.sin(2 * Math.PI * i / 200)))
    );
    // The count, from the signal's definition: samples where |3·sin| ≥ 2.
    let atRails = 0;
    for (let i = 0; i < 20000; i++) {
      if (Math.abs(3 * Math.sin(2 * Math.PI * i / 200)) >= 2) atRails++;
    }
    const warning = channelWarnings(channel(x)).join();
    expect(warning).toMatch(/clipped/);
    expect(warning).toContain(`${atRails} samples`);
    expect(channelWarnings(channel(gaussianNoise(3, 20000))).join()).not.toMatch(/clipped/);
  });

  test("a clean TTL tacho is a two-level signal, not clipping", () => {
    // 0/5 V, 40 % duty, 25 samples per pulse (common practice: TTL tachometer output).
    const tacho = new Float64Array(50000).map((_, i) => (i % 25 < 10 ? 5 : 0));
    expect(channelWarnings({ name: "tacho", unit: "V", data: tacho }).join()).not.toMatch(
      /clipped/,
    );
  });

  test("a force channel resting on an exact-zero baseline is not clipping", () => {
    // Half-sine hits of 1 ms at 8192 Hz every 0.5 s, zero in between.
    const force = new Float64Array(8192 * 5).map((_, i) => {
      const t = (i % 4096) / 8192;
      return t < 0.001 ? 200 * Math.sin(Math.PI * t / 0.001) : 0;
    });
    expect(channelWarnings({ name: "hammer", unit: "N", data: force }).join()).not.toMatch(
      /clipped/,
    );
  });

  test("a clipped noise-like accelerometer is found: flat runs that cut the waveform", () => {
    // Road vibration, noise-like, overdriving a ±1 input: flat runs entered continuously.
    // Band-limited as a sampled signal is (sampled at 8× its content by a moving mean of 8:
    // common practice samples at 2.56× the top frequency or more); white noise has no
    // continuous waveform to cut.
    const raw = gaussianNoise(9, 40007);
    const x = new Float64Array(40000).map((_, i) => {
      let sum = 0;
      for (let k = 0; k < 8; k++) sum += raw[i + k];
      return Math.max(-1, Math.min(1, 0.8 * sum / Math.sqrt(8)));
    });
    expect(channelWarnings(channel(x)).join()).toMatch(/clipped/);
  });

  test("a DC offset large against the signal", () => {
    const x = gaussianNoise(4, 5000).map((v) => 10 + 0.5 * v);
    expect(channelWarnings(channel(x)).join()).toMatch(/DC offset of 10/);
  });

  test("the warnings travel with a spectrum's metadata", async () => {
    const rec = { rate: 1000, startTime: 0, channels: [channel(new Float64Array(4096).fill(1))] };
    expect(((await averagedSpectrum(rec, { block: 512 })).metadata.warnings as string[]).join())
      .toMatch(
        /constant/,
      );
  });

  test("an FRF band with low coherence is warned about", async () => {
    // The response is mostly uncorrelated noise: γ² = S/(S + N) ≈ 2e-4 (Bendat & Piersol eq. 9.57).
    const x = gaussianNoise(5, 32768);
    const noise = gaussianNoise(7, x.length);
    const response = x.map((v, i) => 0.01 * v + noise[i]);
    const rec = {
      rate: 1000,
      startTime: 0,
      channels: [{ name: "force", unit: "N", data: x }, {
        name: "acc",
        unit: "m/s^2",
        data: response,
      }],
    };
    const { warnings } = await frequencyResponse(rec, {
      input: "force",
      outputs: ["acc"],
      block: 256,
    });
    expect(warnings.join()).toMatch(/coherence of "acc" is below 0\.5/);
    // The band's ends to 4 significant figures, not df = 1000/256 = 3.90625 Hz in full.
    expect(warnings).toContain(
      'coherence of "acc" is below 0.5 in 1 band(s) (3.906–500 Hz): the FRF is not to be trusted there',
    );
  });
});

describe("numbers in the warnings are rounded and carry the channel's unit", () => {
  test("a DC offset: mean and standard deviation in the channel's unit", () => {
    // 10 plus a sine of RMS 0.1 over 20 whole periods: mean 10, standard deviation 0.1
    // (analytic: the mean of sin² over whole periods is 1/2). Two alternating levels would read
    // as a pulse train, which gets no offset warning.
    const x = new Float64Array(1000).map((_, i) =>
      10 + 0.1 * Math.SQRT2 * Math.sin((2 * Math.PI * i) / 50)
    );
    expect(channelWarnings(channel(x))).toEqual([
      'channel "acc" has a DC offset of 10 m/s^2, over 3 times its standard deviation (0.1 m/s^2)',
    ]);
  });

  test("clipping: the rails to 4 significant figures", () => {
    // A sine of amplitude 1 held at ±2/3 (an overdriven input); 2/3 prints as 0.6667.
    const x = new Float64Array(20000).map((_, i) =>
      Math.max(-2 / 3, Math.min(2 / 3, Math.sin(2 * Math.PI * i / 200)))
    );
    expect(channelWarnings(channel(x)).join()).toContain(
      "sit at its extremes (-0.6667, 0.6667 m/s^2)",
    );
  });
});

/** The warnings of every channel of a file, read through the one reading path. */
async function fileWarnings(name: string, bytes: Uint8Array | string): Promise<string[]> {
  const dir = mkdtempSync(join(tmpdir(), "quiver-checks-"));
  try {
    const path = join(dir, name);
    writeFileSync(path, bytes);
    const stream = await openRecordingStream(path);
    return await readChecked(stream, stream.channels.map((_, i) => i), () => {});
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Runs of 3 or more equal samples at the record's maximum, entered and left continuously. */
function flatRunsAtMaximum(x: Float64Array): number {
  let max = -Infinity;
  for (const v of x) if (v > max) max = v;
  let runs = 0;
  for (let i = 0; i < x.length;) {
    let j = i;
    while (j < x.length && x[j] === x[i]) j++;
    if (x[i] === max && j - i >= 3) runs++;
    i = j;
  }
  return runs;
}

describe("clipping judged against the converter and the signal's own crest", () => {
  const rate = 48000;
  // A 100 Hz tone 60 dB below full scale: amplitude 10^(−60/20) = 0.001 FS, about 33 LSB of a
  // 16-bit converter (1 LSB = 2^−15 FS; AES17 defines dBFS from a full-scale sine).
  const tone = new Float64Array(rate).map((_, i) => 0.001 * Math.sin(2 * Math.PI * 100 * i / rate));
  const toneWav = (x: Float64Array) =>
    encodeWav({ rate, startTime: 0, channels: [{ name: "ch1", unit: "FS", data: x }] }, "pcm16");

  test("a 16-bit tone at −60 dBFS is not clipped, though its quantised crests are flat", async () => {
    // The naive rule's trap: rounding to 1 LSB leaves flat runs at the crests (analytic: within
    // ½ LSB of a 33-LSB crest for ±acos(1 − 0.5/33)/(2π·100) s, about 28 samples).
    const quantised = tone.map((v) => Math.round(v * 32768) / 32768);
    expect(flatRunsAtMaximum(quantised)).toBeGreaterThanOrEqual(50);
    const fromWav = await fileWarnings("quiet.wav", toneWav(tone));
    expect(fromWav.join()).not.toMatch(/clipped/);
    // The same samples without the converter's rails: the step is learned from the data.
    expect(channelWarnings({ name: "mic", unit: "FS", data: quantised }).join()).not.toMatch(
      /clipped/,
    );
  });

  test("the same tone amplified 2000 times and cut at the 16-bit rails is clipped", async () => {
    const top = 1 - 2 ** -15; // the highest 16-bit code (common practice: two's complement)
    const cut = tone.map((v) => Math.max(-1, Math.min(top, 2000 * v)));
    const warnings = (await fileWarnings("loud.wav", toneWav(cut))).join();
    expect(warnings).toMatch(/clipped at the converter's full scale/);
    expect(warnings).toMatch(/looks clipped/);
  });

  test("a tone cut at the rails only twice a second is still clipped at full scale", async () => {
    // A quiet tone that touches full scale in two bursts of 5 samples: too few for the 0.1 % of
    // the shape rule, but a converter's rail is never a clean signal's crest twice in a row.
    const x = tone.slice();
    for (const at of [12000, 36000]) x.fill(1 - 2 ** -15, at, at + 5);
    expect((await fileWarnings("burst.wav", toneWav(x))).join()).toMatch(
      /full scale .*10 samples .* 2 run\(s\) of 2 or more/,
    );
  });

  test("a tone cut below any full scale in a float CSV is clipped", async () => {
    // 2 V amplitude cut at ±1.5 V by an overdriven stage before the converter.
    const x = new Float64Array(4800).map((_, i) =>
      Math.max(-1.5, Math.min(1.5, 2 * Math.sin(2 * Math.PI * 100 * i / rate)))
    );
    let csv = "time_s,mic [V]\n";
    x.forEach((v, i) => (csv += `${i / rate},${v}\n`));
    const warnings = (await fileWarnings("cut.csv", csv)).join();
    expect(warnings).toMatch(/looks clipped/);
    expect(warnings).not.toMatch(/converter's full scale/);
  });

  test("the same tone written with 3 decimals (a 1 mV step) and 30 mV amplitude is not", () => {
    // The CSV's last digit is its quantisation: crests 30 steps high, flat runs of ~28 samples.
    const x = tone.map((v) => Number((30 * v).toFixed(3)));
    expect(flatRunsAtMaximum(x)).toBeGreaterThanOrEqual(50);
    expect(channelWarnings({ name: "mic", unit: "V", data: x }).join()).not.toMatch(/clipped/);
  });

  test("narrow-pulse tachos (1.6 % duty) are neither clipped, flat nor offset", () => {
    // 0/5 V pulses of 8 samples every 500, with 2-sample edges; active high and active low
    // (common practice: an optical or inductive tacho gives short pulses once a revolution).
    const pulse = (k: number) =>
      k < 2 ? 5 * (k + 1) / 3 : k < 8 ? 5 : k < 10 ? 5 * (10 - k) / 3 : 0;
    const high = new Float64Array(50000).map((_, i) => pulse(i % 500));
    const low = high.map((v) => 5 - v);
    for (const data of [high, low]) {
      const warnings = channelWarnings({ name: "tacho", unit: "V", data }).join();
      expect(warnings).not.toMatch(/clipped|flat|constant|DC offset/);
    }
  });
});

describe("a CSV column's converter range from the set-up", () => {
  test("full_scale_volts on a CSV column in volts: a cut at ±that range is clipping at full scale", async () => {
    // A ±10 V logger input (common practice for data-acquisition modules) overdriven by a
    // 12 V tone for its first two cycles, then 5 V.
    const rate = 10000;
    const x = new Float64Array(rate).map((_, i) => {
      const v = (i < 200 ? 12 : 5) * Math.sin(2 * Math.PI * 100 * i / rate);
      return Math.max(-10, Math.min(10, v));
    });
    let csv = "time_s,acc [V]\n";
    x.forEach((v, i) => (csv += `${i / rate},${v}\n`));
    const dir = mkdtempSync(join(tmpdir(), "quiver-checks-"));
    try {
      writeFileSync(join(dir, "r.csv"), csv);
      const setup = (entry: object, channel = "acc") => {
        writeFileSync(join(dir, "s.json"), JSON.stringify({ channels: { [channel]: entry } }));
        return join(dir, "s.json");
      };
      const warningsWith = async (entry: object) => {
        const stream = await openRecordingStream(join(dir, "r.csv"), { setup: setup(entry) });
        return (await readChecked(stream, [0], () => {})).join();
      };
      // In volts: the rails are ±10 V. With a sensitivity of 100 mV/(m/s^2): ±100 m/s^2.
      expect(await warningsWith({ full_scale_volts: 10 })).toMatch(
        /clipped at the converter's full scale \(-10, 10 V\)/,
      );
      expect(
        await warningsWith({ full_scale_volts: 10, unit: "m/s^2", sensitivity_mv_per_unit: 100 }),
      ).toMatch(/full scale \(-100, 100 m\/s\^2\)/);
      // A range the signal never reaches: nothing at full scale, while the shape rule still
      // finds the cut (4 runs of about 19 samples where |12·sin| > 10: 0.74 % of the record).
      const wide = await warningsWith({ full_scale_volts: 20 });
      expect(wide).not.toMatch(/converter's full scale/);
      expect(wide).toMatch(/looks clipped/);
      // A range on a column that is not in volts means nothing: refused.
      writeFileSync(join(dir, "n.csv"), "time_s,f [N]\n0,1\n0.001,2\n");
      await expect(
        openRecordingStream(join(dir, "n.csv"), { setup: setup({ full_scale_volts: 10 }, "f") }),
      ).rejects.toThrow(/full_scale_volts is the input range of a column in volts/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe("the statistics' fast paths change nothing", () => {
  // A chunk of one sample starts from the full per-sample body (the fast path for a new value
  // needs a sample before it in the chunk); the whole record in one chunk takes the fast paths
  // wherever they apply. Both must give the same warnings and extent, on signals that exercise
  // every branch: runs, clipping at rails (known and not), quantised and float noise, zeros.
  const uniform = uniformGenerator(2026);
  const kinds = ["noise", "quantised", "clipped", "pulses", "runs", "rails", "zeros"] as const;
  for (const kind of kinds) {
    test(kind, () => {
      for (let trial = 0; trial < 20; trial++) {
        const n = 200 + Math.floor(uniform() * 3000), q = 1 / 256, f = 0.02 + uniform() * 0.2;
        const x = new Float64Array(n).map((_, i) => {
          const v = (0.5 + 2 * uniform()) * Math.sin(f * i) + 0.1 * (uniform() - 0.5);
          if (kind === "quantised" || kind === "rails") return Math.round(v / q) * q;
          if (kind === "clipped") return Math.max(-0.9, Math.min(0.9, v));
          if (kind === "pulses") return uniform() < 0.1 ? 0.5 : 0;
          if (kind === "runs") return Math.round(4 * uniform()) / 4;
          if (kind === "zeros") return uniform() < 0.5 ? (uniform() < 0.5 ? 0 : -0) : v;
          return v;
        });
        if (kind === "runs") { for (let i = 1; i < n; i++) if (uniform() < 0.7) x[i] = x[i - 1]; }
        if (kind === "rails") {
          for (let i = 0; i < n; i++) x[i] = Math.max(-1, Math.min(1 - q, x[i]));
        }
        const converter = kind === "rails"
          ? { low: -1, high: 1 - q, step: q }
          : kind === "clipped" && trial % 2 === 0
          ? { low: -0.9, high: 0.9 }
          : undefined;
        const whole = new ChannelStatistics(converter), single = new ChannelStatistics(converter);
        whole.push(x);
        for (let i = 0; i < n; i++) single.push(x.subarray(i, i + 1));
        const c = { name: "c", unit: "V" };
        expect(whole.warnings(c)).toEqual(single.warnings(c));
        expect(whole.extent).toEqual(single.extent);
      }
    });
  }
});

// The grid's tolerance is 1e-9 of the largest magnitude (signal_checks.ts, GRID_TOLERANCE): a step
// off the grid by 1.5 tolerances refines it, by 0.4 does not, as the remainder rule `d % step`
// says. Both sit where the fast test must give way to the exact one or agree with it.
test("a step just beyond the grid's tolerance refines the grid, one just within does not", () => {
  const q = 1 / 256, n = 20_000;
  const base = new Float64Array(n).map((_, i) => {
    const v = 2 * Math.sin(0.05 * i);
    return Math.round(Math.max(-0.75, Math.min(0.75, v)) / q) * q;
  });
  const tolerance = 1e-9 * 0.75;
  const stepIn = (offBy: number) => {
    const x = base.slice();
    let at = 15_000;
    while (Math.abs(x[at]) > 0.5) at++;
    x[at] += offBy * tolerance;
    const s = new ChannelStatistics();
    s.push(x);
    const message = s.warnings({ name: "c", unit: "V" }).join();
    expect(message).toMatch(/looks clipped/);
    return /quantisation steps of 0\.003906 V/.test(message);
  };
  expect(stepIn(0)).toBe(true);
  expect(stepIn(0.4)).toBe(true);
  expect(stepIn(1.5)).toBe(false);
  expect(stepIn(3)).toBe(false);
});

// While the grid is refined, a value inside the range whose step is clearly on the grid stays on
// the fast path; one off the grid must still refine it (the clipping message prints the step).
test("a value off the grid late in the record, inside the range, refines the grid", () => {
  const uniform = uniformGenerator(2027);
  const q = 1 / 256, n = 20_000;
  const x = new Float64Array(n).map((_, i) => {
    const v = 2 * Math.sin(0.05 * i) + 0.1 * (uniform() - 0.5);
    return Math.round(Math.max(-0.75, Math.min(0.75, v)) / q) * q;
  });
  // Inside the range, between two on-grid values: half a step off the grid.
  let at = 15_000;
  while (Math.abs(x[at]) > 0.5) at++;
  x[at] += q / 2;
  const whole = new ChannelStatistics(), single = new ChannelStatistics();
  whole.push(x);
  for (let i = 0; i < n; i++) single.push(x.subarray(i, i + 1));
  const c = { name: "c", unit: "V" };
  const warnings = whole.warnings(c);
  expect(warnings).toEqual(single.warnings(c));
  expect(warnings.join()).toMatch(/looks clipped/);
  // The grid is half the written step: 1/512 V (formatNumber: 4 significant figures).
  expect(warnings.join()).toMatch(/quantisation steps of 0\.001953 V/);
});
