import { describe, expect, test } from "vitest";
import { barPlot } from "../../lib/report/plot/bar_plot.ts";
import { chartSpec } from "../../lib/report/plot/chart_spec.ts";
import { heatMap } from "../../lib/report/plot/heat_map.ts";
import { linePlot } from "../../lib/report/plot/line_plot.ts";

/** The frame of a plot: the first rect with a slate outline after the background. */
function frameBox(svg: string): { x: number; y: number; right: number; bottom: number } {
  const m =
    /<rect x="([\d.]+)" y="([\d.]+)" width="([\d.]+)" height="([\d.]+)" fill="none" stroke="#5b6b7b"\/>/
      .exec(svg);
  if (m === null) throw new Error("no frame");
  const [x, y, w, h] = m.slice(1).map(Number);
  return { x, y, right: x + w, bottom: y + h };
}

/** Each legend entry's position (its translate). */
const legendAt = (svg: string) =>
  [...svg.matchAll(/class="legend-entry[^"]*" transform="translate\(([-\d.]+) ([-\d.]+)\)"/g)]
    .map((m) => ({ x: Number(m[1]), y: Number(m[2]) }));

describe("legend placement", () => {
  const plot = {
    title: "two channels",
    x: { label: "Frequency [Hz]" },
    y: { label: "Level [dB]" },
    series: [
      { name: "seat", x: [1, 2, 3], y: [1, 2, 3] },
      { name: "floor", x: [1, 2, 3], y: [3, 2, 1] },
    ],
  };

  test("a wide plot has its legend beside the frame, a narrow one under it", () => {
    const wide = linePlot({ ...plot, width: 960 });
    const frame = frameBox(wide);
    for (const at of legendAt(wide)) expect(at.x).toBeGreaterThan(frame.right);
    const narrow = linePlot({ ...plot, width: 600 });
    const small = frameBox(narrow);
    const entries = legendAt(narrow);
    expect(entries.length).toBe(2);
    // Under the frame and below the x axis label, so the plot keeps the width.
    for (const at of entries) expect(at.y).toBeGreaterThan(small.bottom + 30);
    expect(small.right).toBeGreaterThan(600 - 30);
    // The picture grew by the legend's rows: the axes keep their height.
    const height = (svg: string) => Number(/height="(\d+(?:\.\d+)?)" role/.exec(svg)![1]);
    expect(height(narrow)).toBeGreaterThan(height(wide));
    expect(small.bottom - small.y).toBeCloseTo(frame.bottom - frame.y, 6);
  });
});

describe("bars over a limit", () => {
  const plot = {
    title: "thirds",
    labels: ["100", "125", "160"],
    groups: [{ name: "seat", values: [60, 70, 50] }, { name: "floor", values: [40, 75, 45] }],
    xLabel: "Band [Hz]",
    yLabel: "Level [dB]",
  };

  test("only the bars of the limit's channel in failing bands are hatched and marked", () => {
    // The limit is on "floor"; "seat" is over the line at 125 Hz too but has no limit of its own.
    const svg = barPlot({
      ...plot,
      limits: [{
        name: "limit floor",
        group: "floor",
        values: [65, 65, 65],
        failing: [false, true, false],
      }],
    });
    const failing = [...svg.matchAll(/<rect class="bar failing"[^>]*><title>([^<]*)</g)].map((m) =>
      m[1]
    );
    expect(failing).toEqual(["floor, 125: 75 (Level [dB]), over the limit"]);
    expect((svg.match(/class="failing-mark"/g) ?? []).length).toBe(1 + 1); // the bar and the legend
    expect((svg.match(/class="hatch"/g) ?? []).length).toBe(2 * 2); // two strokes, bar and legend
    expect(svg).toContain('class="legend-entry legend-over"');
    expect(svg).toContain(">over the limit</text>");
  });

  test("without a failing band there is no over-limit mark or legend entry", () => {
    const svg = barPlot({
      ...plot,
      limits: [{ name: "limit", values: [80, 80, 80], failing: [false, false, false] }],
    });
    expect(svg).not.toContain("failing");
    expect(svg).not.toContain("legend-over");
  });
});

describe("the chart's value axis label on each scale", () => {
  // 120 dB below the largest value: 12 decades of a power, 6 of an amplitude (dB of a power
  // ratio is 10 lg, of an amplitude ratio 20 lg; ISO 80000-3 annex / common practice).
  const f = Array.from({ length: 16 }, (_, i) => i + 1);
  const wideRange = f.map((_, i) => 10 ** -i); // 1 … 1e-15: 15 decades

  test("a power over 15 decades: the log view is cut to 12 and says so, the linear one does not", () => {
    const spec = chartSpec({
      title: "psd",
      x: { label: "Frequency [Hz]" },
      y: { label: "PSD [Pa^2/Hz]", log: true },
      series: [{ name: "mic", x: f, y: wideRange }],
    });
    expect(spec.y.labels.log).toBe("PSD [Pa^2/Hz], top 120 dB shown");
    expect(spec.y.labels.linear).toBe("PSD [Pa^2/Hz]");
    expect(spec.y.label).toBe(spec.y.labels.log);
    expect(Math.log10(spec.y.logMin)).toBeCloseTo(-12, 9);
  });

  test("an amplitude is cut at 6 decades", () => {
    const spec = chartSpec({
      title: "frf",
      x: { label: "Frequency [Hz]" },
      y: { label: "|H| [m/N]", log: true, power: false },
      series: [{ name: "h", x: f, y: wideRange }],
    });
    expect(Math.log10(spec.y.logMin)).toBeCloseTo(-6, 9);
    expect(spec.y.labels.log).toBe("|H| [m/N], top 120 dB shown");
  });

  test("a linear axis: its log view is labelled by what that view cuts", () => {
    const wide = chartSpec({
      title: "power",
      x: { label: "Frequency [Hz]" },
      y: { label: "Power [W]", domain: [0, 1] },
      series: [{ name: "p", x: f, y: wideRange }],
    });
    expect(wide.y.label).toBe("Power [W]");
    expect(wide.y.labels.log).toBe("Power [W], top 120 dB shown");
    expect(Math.log10(wide.y.logMin)).toBeCloseTo(-12, 9);
    // Three decades: nothing is cut, the log view starts at the smallest value.
    const narrow = chartSpec({
      title: "power",
      x: { label: "Frequency [Hz]" },
      y: { label: "Power [W]" },
      series: [{ name: "p", x: [1, 2, 3, 4], y: [1, 0.1, 0.01, 0.001] }],
    });
    expect(narrow.y.labels.log).toBe("Power [W]");
    expect(narrow.y.logMin).toBeCloseTo(0.001, 12);
  });
});

describe("a narrow colour map", () => {
  test("a title wrapped on two lines pushes the map down instead of running over it", () => {
    const svg = heatMap({
      title: "Link arm: test against simulation (MAC): MAC, test against simulation (5 points)",
      xLabel: "Simulation mode",
      yLabel: "Test mode",
      zLabel: "MAC [-]",
      x: [1, 2],
      y: [1, 2],
      z: [[1, 0.1], [0.1, 1]],
      width: 600,
    });
    const lines = (svg.match(/<tspan /g) ?? []).length;
    expect(lines).toBe(2);
    // The title's second baseline is at 20 + 16 px; the map starts below it with room to spare.
    const mapTop = Number(/<svg class="map"[^>]* y="([\d.]+)"/.exec(svg)![1]);
    expect(mapTop).toBeGreaterThan(20 + 16 + 8);
  });
});
