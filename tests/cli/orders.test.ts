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
});
