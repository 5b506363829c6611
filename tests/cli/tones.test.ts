/**
 * `quiver tones` on the command line: the columns, the safety note,
 * and bad input refused with exit code 2 (usage), one line on stderr, the
 * output untouched.
 */
import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";

let dir: string;

beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-tones-");
  const rate = 8192;
  const rows = Array.from({ length: rate * 4 }, (_, i) => {
    const t = i / rate;
    // A 1.5 kHz tone of 0.1 Pa rms and a 3.1 kHz tone of 0.001 Pa over a little broadband noise.
    const noise = 0.002 * (Math.sin(i * 12.9898) * 43758.5453 % 1);
    const p = 0.1 * Math.SQRT2 * Math.sin(2 * Math.PI * 1500 * t) + noise;
    return `${t},${p.toFixed(8)},${Math.sin(2 * Math.PI * 50 * t).toFixed(6)}`;
  });
  await writeFile(`${dir}/mic.csv`, "time_s,mic [Pa],acc [m/s^2]\n" + rows.join("\n") + "\n");
  await writeFile(`${dir}/out.csv`, "previous\n");
});

describe("quiver tones", () => {
  test("the tone of a Pa channel, with the issue's columns, and the safety note", () => {
    const r = runQuiver(["tones", "mic.csv"], dir);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split("\n");
    expect(lines[0]).toBe(
      "channel,frequency_hz [Hz],level_db [dB re 20 µPa],tnr_db [dB],pr_db [dB],prominent,margin_db [dB],criterion_db [dB],critical_bandwidth_hz [Hz]",
    );
    const row = lines.find((l) => Math.abs(Number(l.split(",")[1]) - 1500) < 1)!;
    expect(row.split(",")[0]).toBe("mic");
    expect(row.split(",")[5]).toBe("true");
    // 0.1 Pa re 20 µPa: 73.98 dB.
    expect(Number(row.split(",")[2])).toBeCloseTo(73.98, 1);
    expect(r.stderr).toMatch(/not a certified instrument/);
  });

  for (
    const [what, args, pattern] of [
      ["--against rpm without orders", ["--against", "rpm", "--rpm-channel", "acc"], /--orders/],
      ["orders against time", ["--orders", "8"], /go with --against rpm/],
      ["no channel in Pa", ["--channels", "nope"], /nope/],
      ["an rpm step against time", ["--rpm-step", "50"], /go with --against rpm/],
      [
        "--min-tnr against rpm",
        ["--against", "rpm", "--rpm-channel", "acc", "--orders", "8", "--min-tnr", "3"],
        /--min-tnr goes with --against time/,
      ],
    ] as const
  ) {
    test(`refused: ${what}`, async () => {
      const r = runQuiver(["tones", "mic.csv", ...args, "--out", "out.csv"], dir);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(pattern);
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(await readFile(`${dir}/out.csv`, "utf8")).toBe("previous\n");
    });
  }

  test("a recording without a Pa channel and no --channels is refused as usage", async () => {
    await writeFile(
      `${dir}/acc.csv`,
      "time_s,acc [m/s^2]\n" +
        Array.from({ length: 40000 }, (_, i) => `${i / 8192},${Math.sin(i)}`).join("\n") + "\n",
    );
    const r = runQuiver(["tones", "acc.csv", "--out", "out.csv"], dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/no channel is in Pa/);
    expect(await readFile(`${dir}/out.csv`, "utf8")).toBe("previous\n");
  });
});
