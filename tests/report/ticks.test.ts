import { describe, expect, test } from "vitest";
import { linePlot } from "../../lib/report/svg_plot.ts";

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
