import { describe, expect, test } from "vitest";
import { linePlot } from "../../lib/report/plot/line_plot.ts";

const yLabels = (svg: string) =>
  [...svg.matchAll(
    /<text (?:class="y-tick" )?x="[^"]*" y="[^"]*" text-anchor="end"[^>]*>([^<]*)</g,
  )].map((m) => m[1]);

describe("tick labels", () => {
  test("a level varying by 0.25 dB gets distinct labels with the decimals its step needs", () => {
    const t = Array.from({ length: 50 }, (_, i) => i * 0.1);
    const svg = linePlot({
      title: "level",
      x: { label: "Time [s]" },
      y: { label: "Level [dB]" },
      series: [{ name: "mic", x: t, y: t.map((v) => 66 + 0.12 * Math.sin(v)) }],
    });
    const labels = yLabels(svg);
    expect(labels.length).toBeGreaterThan(2);
    expect(new Set(labels).size).toBe(labels.length);
    // Each label reads back as the tick it stands for: equal steps between them.
    const values = labels.map(Number);
    const steps = values.slice(1).map((v, i) => v - values[i]);
    for (const s of steps) expect(s).toBeCloseTo(steps[0], 9);
  });

  test("a constant level gets distinct labels too", () => {
    const svg = linePlot({
      title: "level",
      x: { label: "Time [s]" },
      y: { label: "Level [dB]" },
      series: [{ name: "mic", x: [0, 1, 2], y: [70.5, 70.5, 70.5] }],
    });
    const labels = yLabels(svg);
    expect(labels.length).toBeGreaterThan(1);
    expect(new Set(labels).size).toBe(labels.length);
    expect(labels).toContain("70.5");
  });
});

describe("axes that contain the data", () => {
  const pathPoints = (svg: string) =>
    [...svg.matchAll(/<path d="([^"]+)"/g)][0][1].match(/[ML][\d.]+,[\d.]+/g)!
      .map((p) => p.slice(1).split(",").map(Number));

  test("the largest value sits below the frame's top, not on it", () => {
    const svg = linePlot({
      title: "t",
      x: { label: "x" },
      y: { label: "y" },
      series: [{ name: "s", x: [0, 1, 2, 3], y: [0, 10, 20, 30] }],
    });
    const top = Math.min(...pathPoints(svg).map((p) => p[1]));
    // The frame's top edge is at y = 34 px (the plot margin); 5 % headroom leaves a gap.
    expect(top).toBeGreaterThan(34 + 5);
  });

  test("a log axis shows the top 120 dB: 12 decades of a power, 6 of an amplitude, and says so", () => {
    const x = Array.from({ length: 18 }, (_, i) => i + 1);
    const ticks = (svg: string) => yLabels(svg).map(Number).filter((v) => v > 0);
    const power = linePlot({
      title: "t",
      x: { label: "Frequency [Hz]" },
      y: { label: "PSD [Pa^2/Hz]", log: true },
      series: [{ name: "s", x, y: x.map((v) => 10 ** (-v)) }], // 17 decades
    });
    expect(power).toContain("PSD [Pa^2/Hz], top 120 dB shown");
    // 10·lg of a power (the decibel of a power quantity, IEC 60027-3, from memory): 120 dB is 12
    // decades below the largest value, 0.1.
    expect(Math.min(...ticks(power))).toBeCloseTo(1e-13, 20);
    // Values below the clamp are drawn at the bottom edge (clamped scale), none below it.
    const bottom = Math.max(...pathPoints(power).map((p) => p[1]));
    expect(bottom).toBeLessThanOrEqual(400 - 46 + 1e-9);
    const amplitude = linePlot({
      title: "t",
      x: { label: "Frequency [Hz]" },
      y: { label: "|H| [Pa/N]", log: true, power: false },
      series: [{ name: "s", x, y: x.map((v) => 10 ** (-v)) }],
    });
    expect(amplitude).toContain("|H| [Pa/N], top 120 dB shown");
    // 20·lg of an amplitude (a root-power quantity, same standard): 120 dB is 6 decades below 0.1.
    expect(Math.min(...ticks(amplitude))).toBeCloseTo(1e-7, 12);
  });
});
