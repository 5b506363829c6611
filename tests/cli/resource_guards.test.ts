import { mkdtemp, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { checkOptionLimits } from "../../cli/option_limits.ts";

describe("an overlap that would make a one-sample hop", () => {
  test("is refused before any work, with the largest overlap allowed and the usual range", async () => {
    const dir = await mkdtemp("/tmp/quiver-overlap-");
    const rows = ["acc [m/s^2]"];
    for (let i = 0; i < 20000; i++) rows.push(String(Math.sin(i / 9)));
    await writeFile(`${dir}/r.csv`, rows.join("\n") + "\n");
    const r = runQuiver([
      "spectrum",
      "r.csv",
      "--rate",
      "1000",
      "--block",
      "4096",
      "--overlap",
      "0.99999999",
    ], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/moves each block by 1 sample\(s\); quiver needs at least 64/);
    // 0.75, a usual overlap, is fine (common practice for Hann, Welch 1967).
    const ok = runQuiver([
      "spectrum",
      "r.csv",
      "--rate",
      "1000",
      "--block",
      "4096",
      "--overlap",
      "0.75",
    ], dir);
    expect(ok.code, ok.stderr).toBe(0);
  });
});

describe("a CSV whose header is Latin-1, not UTF-8", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-latin1-");
    // Long enough for the chunked reader (which used to fail with an internal error).
    const header = new Uint8Array([
      ...new TextEncoder().encode("time_s,acc "),
      0xb5,
      ...new TextEncoder().encode(" [m/s^2]\n"),
    ]);
    const lines = [];
    for (let i = 0; i < 200_000; i++) {
      lines.push(`${(i / 1000).toFixed(3)},${Math.sin(i / 7).toFixed(5)}`);
    }
    const body = new TextEncoder().encode(lines.join("\n") + "\n");
    const bytes = new Uint8Array(header.length + body.length);
    bytes.set(header);
    bytes.set(body, header.length);
    await writeFile(`${dir}/latin1.csv`, bytes);
  });
  for (
    const [command, args] of [
      ["spectrum", []],
      ["bands", []],
      ["level", ["--reference", "1", "--weighting", "Z"]],
      ["frf", ["--input", "a", "--outputs", "b"]],
      ["hammer", ["--force", "a", "--outputs", "b"]],
      ["orders", ["--tacho", "a", "--ppr", "1", "--channels", "b"]],
    ] as const
  ) {
    test(`${command}: the same one message, exit 1`, () => {
      const r = runQuiver([command, "latin1.csv", ...args], dir);
      expect(r.code).toBe(1);
      expect(r.stderr.trim()).toBe(
        `quiver ${command}: latin1.csv: neither a WAV, MAT v5, HDF5, MAT v7.3 or MDF 4 file nor UTF-8 text; quiver reads CSV, WAV, MAT v5, HDF5, MAT v7.3 and MDF 4 recordings (save a CSV as UTF-8: a header in Latin-1 or Windows-1252, e.g. with µ or °, is not UTF-8)`,
      );
    });
  }
});

describe("options that size memory or time are checked against the header, before any work", () => {
  // 2 channels, 2000 samples at 1000 Hz: 2 s. A tacho-like square wave on f, one pulse per
  // revolution of a shaft running up from 1200 to 1800 rpm, so orders finds a speed range.
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-limits-");
    const rows = ["time_s,f [V],a [m/s^2]"];
    for (let i = 0; i < 2000; i++) {
      const t = i / 1000;
      const revolutions = 20 * t + 2.5 * t * t; // ∫ (20 + 5t) Hz dt
      rows.push(`${t},${revolutions % 1 < 0.5 ? 5 : 0},${Math.sin(i / 3).toFixed(6)}`);
    }
    await writeFile(`${dir}/r.csv`, rows.join("\n") + "\n");
  });
  const refused = (args: string[], message: RegExp) => {
    const r = runQuiver(args, dir);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr.trim().split("\n"), r.stderr).toHaveLength(1);
    expect(r.stderr.trim()).toMatch(message);
  };
  const accepted = (args: string[]) => {
    const r = runQuiver(args, dir);
    expect(r.code, r.stderr).toBe(0);
  };

  test(
    "--block: one sample more than the record is refused naming the record's length; the record itself works",
    () => {
      refused(
        ["spectrum", "r.csv", "--block", "2001"],
        /^quiver spectrum: r\.csv: --block 2001 is longer than the record of 2000 samples \(2 s at 1000 Hz\); the largest is 2000$/,
      );
      // The 2^32 (an internal error from fft.js before) and 2^30 (gigabytes first).
      refused(["spectrum", "r.csv", "--block", "4294967296"], /the largest is 2000$/);
      refused(["spectrum", "r.csv", "--block", "1073741824"], /the largest is 2000$/);
      accepted(["spectrum", "r.csv", "--block", "2000"]);
      // The same rule for every command with --block.
      refused(["bands", "r.csv", "--block", "2001"], /--block 2001 is longer than the record/);
      refused(
        ["frf", "r.csv", "--input", "f", "--outputs", "a", "--block", "2001"],
        /--block 2001 is longer than the record/,
      );
    },
    600_000,
  );

  test("--resolution finer than rate/length is refused naming the finest, which works", () => {
    // 1000 Hz / 2000 samples = 0.5 Hz (a DFT's line spacing is rate/N, Bendat & Piersol 11.2).
    refused(
      ["spectrum", "r.csv", "--resolution", "1e-9"],
      /--resolution 1e-9 Hz needs a block of 1000000000000 samples, longer than the record of 2000 samples .*; the finest is 0\.5 Hz$/,
    );
    refused(["spectrum", "r.csv", "--resolution", "0.49"], /the finest is 0\.5 Hz$/);
    accepted(["spectrum", "r.csv", "--resolution", "0.5"]);
  }, 600_000);

  test(
    "--frames beyond the segments of the record is refused naming the largest, which works",
    () => {
      // Welch segments at 50 % overlap: floor((2000 − 256)/128) + 1 = 14.
      refused(
        ["spectrogram", "r.csv", "--block", "256", "--frames", "15"],
        /--frames 15 asks for more segments per frame than the record of 2000 samples .* holds: 14 of 256 samples; the largest is 14$/,
      );
      accepted(["spectrogram", "r.csv", "--block", "256", "--frames", "14"]);
    },
    600_000,
  );

  test(
    "level --step and hammer --record longer than the record are refused (step was an internal error)",
    () => {
      refused(
        ["level", "r.csv", "--reference", "1", "--weighting", "Z", "--step", "1e9"],
        /--step 1000000000 s is longer than the record of 2000 samples .*; the largest is 2 s$/,
      );
      refused(
        ["hammer", "r.csv", "--force", "f", "--outputs", "a", "--record", "2.5"],
        /--record 2\.5 s is longer than the record .*; the largest is 2 s$/,
      );
    },
    600_000,
  );

  test(
    "bands --min-hz below one cycle in the record is refused naming the smallest, which works",
    () => {
      // 2 s of record: 1/T = 0.5 Hz, the DFT's finest line spacing (Bendat & Piersol 11.2).
      refused(
        ["bands", "r.csv", "--min-hz", "1e-300"],
        /--min-hz 1e-300 is below one cycle in the record of 2000 samples .*; the smallest is 0\.5 Hz$/,
      );
      refused(["bands", "r.csv", "--min-hz", "0.49"], /the smallest is 0\.5 Hz$/);
      accepted(["bands", "r.csv", "--min-hz", "0.5", "--method", "filter", "--reference", "1"]);
    },
    600_000,
  );

  test(
    "--rpm-step: too many steps are refused at once with a given range, and after the speed without one",
    () => {
      refused(
        [
          "orders",
          "r.csv",
          "--tacho",
          "f",
          "--ppr",
          "1",
          "--channels",
          "a",
          "--rpm-min",
          "1000",
          "--rpm-max",
          "2000",
          "--rpm-step",
          "1e-9",
        ],
        /--rpm-step 1e-9 makes 1000000000001 rpm steps from 1000 to 2000; quiver takes at most 20000, so the smallest step is 0\.0500026$/,
      );
      // Without a range the speed must be read first; the 1e-9 took gigabytes, now one line.
      refused(
        ["orders", "r.csv", "--tacho", "f", "--ppr", "1", "--channels", "a", "--rpm-step", "1e-9"],
        /an rpm step of 1e-9 makes \d+ steps .*quiver takes at most 20000/,
      );
    },
    600_000,
  );

  test("--max-cells and the angle block are checked against the machine", () => {
    refused(
      ["spectrogram", "r.csv", "--max-cells", "1000000000000000"],
      /--max-cells 1000000000000000 allows an output larger than this machine holds .*; the largest is \d+$/,
    );
    refused(
      [
        "orders",
        "r.csv",
        "--tacho",
        "f",
        "--ppr",
        "1",
        "--channels",
        "a",
        "--revolutions",
        "1000000",
        "--samples-per-rev",
        "65536",
      ],
      /--revolutions 1000000 × --samples-per-rev 65536 make an angle block of 65536000000 samples/,
    );
  }, 600_000);
});

describe("checkOptionLimits against a given memory budget (the machine's share made small)", () => {
  const shape = { rate: 1000, length: 10_000_000, channels: 4 };
  test("a block within the record but beyond the memory is refused naming the largest, which passes", () => {
    // 1 GiB: per block sample 256 + 48 × 4 channels = 448 bytes (the documented estimate).
    const budget = 2 ** 30;
    const largest = Math.floor(budget / 448);
    expect(() => checkOptionLimits(shape, { block: largest + 1 }, "r.csv", budget)).toThrow(
      new RegExp(
        `more than the spectral core may take on this machine for 4 channel\\(s\\).*the largest is ${largest}$`,
      ),
    );
    expect(() => checkOptionLimits(shape, { block: largest }, "r.csv", budget)).not.toThrow();
    // Fewer channels chosen: more room per channel.
    expect(() => checkOptionLimits(shape, { block: largest + 1, channels: ["a"] }, "r.csv", budget))
      .not.toThrow();
  });

  test("a wide recording is refused by its channel count, with how to choose fewer", () => {
    // 64 MiB: 65536 rows × 24 bytes = 1.5 MiB per channel, so 42 channels at once.
    const budget = 64 * 2 ** 20;
    expect(() => checkOptionLimits({ rate: 1000, length: 100, channels: 43 }, {}, "w.csv", budget))
      .toThrow(
        /43 channels would take .* this machine allows 42 at once \(choose them with --channels\)$/,
      );
    expect(() =>
      checkOptionLimits(
        { rate: 1000, length: 100, channels: 43 },
        { channels: ["a", "b"] },
        "w.csv",
        budget,
      )
    ).not.toThrow();
  });

  test("the finest resolution shown is rounded up, so that given back it passes", () => {
    const odd = { rate: 48000, length: 7, channels: 1 };
    let message = "";
    try {
      checkOptionLimits(odd, { resolution: 1 }, "r.wav", 2 ** 30);
    } catch (e) {
      message = (e as Error).message;
    }
    const finest = Number(/the finest is ([\d.]+) Hz$/.exec(message)?.[1]);
    expect(finest).toBeGreaterThanOrEqual(48000 / 7);
    expect(() => checkOptionLimits(odd, { resolution: finest }, "r.wav", 2 ** 30)).not.toThrow();
  });
});
