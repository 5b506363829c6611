import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { recordingCsv } from "../helpers/csv.ts";
import {
  linearProfile,
  type OrderContent,
  resonanceShape,
  runUpRecording,
} from "../helpers/run_up.ts";

const RATE = 8192;
const profile = linearProfile(900, 4800, 20);
const resonance = resonanceShape(320, 0.05);
const CONTENT: OrderContent[] = [
  { order: 2, rms: () => 0.5 },
  { order: 6.5, rms: (rpm) => 2 * resonance((6.5 * rpm) / 60) },
];
const parse = (text: string) => {
  const [header, ...rows] = text.trim().split("\n");
  return { header: header.split(","), rows: rows.map((r) => r.split(",").map(Number)) };
};

describe("quiver orders", () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp("/tmp/quiver-orders-");
    const rec = runUpRecording(profile, RATE, 20, 2, CONTENT, { noise: 0.02 });
    await writeFile(`${dir}/runup.csv`, recordingCsv(rec));
  });

  test("a 900→4800 rpm run-up with a 2-pulse TTL tacho: rpm within 0.5 %, cuts within 0.5 and 1 dB", async () => {
    const r = runQuiver([
      "orders",
      `${dir}/runup.csv`,
      "--rate",
      String(RATE),
      "--tacho",
      "tacho",
      "--ppr",
      "2",
      "--channels",
      "mount_acc",
      "--orders",
      "2,6.5",
      "--rpm-min",
      "1000",
      "--rpm-max",
      "4600",
      "--rpm-step",
      "100",
      "--out",
      `${dir}/cuts.csv`,
      "--rpm-out",
      `${dir}/rpm.csv`,
      "--map-out",
      `${dir}/map.csv`,
    ]);
    expect(r.code).toBe(0);
    const rpm = parse(await readFile(`${dir}/rpm.csv`, "utf8"));
    expect(rpm.header).toEqual(["time_s", "rpm [rpm]"]);
    for (const [t, v] of rpm.rows) {
      if (t > 0.5 && t < 19.5) expect(Math.abs(v / profile.rpm(t) - 1)).toBeLessThan(0.005);
    }
    const cuts = parse(await readFile(`${dir}/cuts.csv`, "utf8"));
    expect(cuts.header).toEqual([
      "rpm [rpm]",
      "mount_acc_order2 [m/s^2]",
      "mount_acc_order6.5 [m/s^2]",
      "mount_acc_overall [m/s^2]",
    ]);
    for (const [step, o2, o65] of cuts.rows) {
      expect(Math.abs(20 * Math.log10(o2 / 0.5))).toBeLessThan(0.5);
      expect(Math.abs(20 * Math.log10(o65 / CONTENT[1].rms(step)))).toBeLessThan(1);
    }
    const map = parse(await readFile(`${dir}/map.csv`, "utf8"));
    expect(map.header).toEqual(["rpm [rpm]", "order", "mount_acc [m/s^2]"]);
    const meta = JSON.parse(await readFile(`${dir}/map.csv.meta.json`, "utf8"));
    expect(meta.metadata.layout).toMatch(/tidy/);
  });

  test("a range the recording never reaches is a clear error", () => {
    const r = runQuiver([
      "orders",
      `${dir}/runup.csv`,
      "--rate",
      String(RATE),
      "--tacho",
      "tacho",
      "--ppr",
      "2",
      "--channels",
      "mount_acc",
      "--rpm-max",
      "6000",
    ]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/does not cover the requested/);
  });

  test("--tacho without --ppr is a usage error", () => {
    const r = runQuiver([
      "orders",
      `${dir}/runup.csv`,
      "--rate",
      String(RATE),
      "--tacho",
      "tacho",
      "--channels",
      "mount_acc",
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--tacho needs --ppr/);
  });

  test("a 60-2 wheel: --ppr 60 --missing-teeth 2 reads the speed; --ppr 58 alone is named", async () => {
    // Truth: the analytic run-up 1200 → 2400 rpm over 4 s; the wheel's 58 teeth as TTL pulses,
    // no pulse at the 2 missing positions. Read as 58 plain pulses the speed is 60/58 high.
    const rate = 16384, seconds = 4;
    const wheel = linearProfile(1200, 2400, seconds);
    const n = rate * seconds;
    const tacho = new Float64Array(n).map((_, i) => {
      const position = wheel.angle(i / rate) * 60;
      const tooth = Math.floor(position) % 60;
      return position - Math.floor(position) < 0.5 && tooth < 58 ? 5 : 0;
    });
    const response = new Float64Array(n).map((_, i) =>
      Math.SQRT2 * Math.sin(2 * Math.PI * 2 * wheel.angle(i / rate))
    );
    await writeFile(
      `${dir}/wheel.csv`,
      recordingCsv({
        rate,
        startTime: 0,
        channels: [
          { name: "tacho", unit: "V", data: tacho },
          { name: "mount_acc", unit: "m/s^2", data: response },
        ],
      }),
    );
    const common = ["orders", `${dir}/wheel.csv`, "--rate", String(rate), "--tacho", "tacho"];
    const args = ["--channels", "mount_acc", "--orders", "2", "--rpm-step", "100"];
    const right = runQuiver([
      ...common,
      "--ppr",
      "60",
      "--missing-teeth",
      "2",
      ...args,
      "--rpm-out",
      `${dir}/wheel_rpm.csv`,
      "--out",
      `${dir}/wheel_cuts.json`,
    ]);
    expect(right.code).toBe(0);
    expect(right.stderr).not.toMatch(/filled in|missing-tooth wheel/);
    const rpm = parse(await readFile(`${dir}/wheel_rpm.csv`, "utf8"));
    for (const [t, v] of rpm.rows) expect(Math.abs(v / wheel.rpm(t) - 1)).toBeLessThan(0.001);
    const cuts = JSON.parse(await readFile(`${dir}/wheel_cuts.json`, "utf8"));
    expect(cuts.metadata.speed_source.missing_teeth).toBe(2);
    expect(cuts.metadata.speed_source.trigger).toBe("envelope");
    const wrong = runQuiver([...common, "--ppr", "58", ...args]);
    expect(wrong.code).toBe(0);
    expect(wrong.stderr).toMatch(
      /warning: the tacho looks like a missing-tooth wheel \(60-2\).*--ppr 60 --missing-teeth 2/,
    );
    const alone = runQuiver([
      "orders",
      `${dir}/wheel.csv`,
      "--rate",
      String(rate),
      "--rpm-channel",
      "mount_acc",
      "--missing-teeth",
      "2",
      ...args,
    ]);
    expect(alone.code).toBe(2);
    expect(alone.stderr).toMatch(/--missing-teeth needs --tacho/);
  });
});
