/// <reference lib="dom" />
import { existsSync } from "node:fs";
import { mkdtemp, readFile } from "node:fs/promises";
import process from "node:process";
import { type BrowserContext, chromium, type Page } from "playwright-core";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";
import { CHROMIUM, CHROMIUM_ARGS } from "../../fixtures/demo/screenshots.ts";

/** Debian's chromium, headless, with a fresh profile (no network services, no sync). */
async function launch(options: { javaScriptEnabled?: boolean } = {}) {
  const profile = await mkdtemp("/tmp/quiver-chromium-");
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: 1400, height: 900 },
    ...options,
    args: [...CHROMIUM_ARGS],
  });
  // Limits for a hang, not expectations: a full-page picture of the report takes long on a
  // loaded machine.
  context.setDefaultTimeout(180_000);
  return { context, profile };
}

/** Opens the report in a new page, collecting console errors and every request made. */
async function openReport(context: BrowserContext, report: string) {
  const page = await context.newPage();
  const errors: string[] = [];
  const requests: string[] = [];
  page.on("console", (m) => {
    if (m.type() === "error") errors.push(m.text());
  });
  page.on("pageerror", (e) => errors.push(e.message));
  page.on("request", (r) => requests.push(r.url()));
  await page.goto(`file://${report}`);
  await page.waitForLoadState("load");
  return { page, errors, requests };
}

/** The interactive chart of a figure, as the page's script registered it. */
interface ChartHandle {
  scales: Record<string, { min: number; max: number }>;
  series: { show: boolean }[];
  valToPos(value: number, scale: string): number;
  over: { getBoundingClientRect(): { left: number; top: number; width: number; height: number } };
}

/**
 * Text the page shows smaller than `least` CSS px: HTML text at its computed size, SVG text
 * at its computed size times the scale its picture is drawn at (a 960-unit picture shown
 * 666 px wide draws 11-unit text at 7.6 px), and the interactive charts' axis fonts.
 */
async function textBelow(page: Page, least: number): Promise<string[]> {
  return await page.evaluate((least) => {
    const small: string[] = [];
    const shown = (e: Element) => {
      const r = e.getBoundingClientRect();
      return r.width > 0 && r.height > 0;
    };
    for (const svg of Array.from(document.querySelectorAll("figure svg"))) {
      // A map's cells are a viewport inside the picture; its parent picture holds the text.
      if (svg.parentElement?.closest("svg") || !shown(svg)) continue;
      const box = (svg as SVGSVGElement).viewBox.baseVal;
      const scale = svg.getBoundingClientRect().width / box.width;
      for (const t of Array.from(svg.querySelectorAll("text"))) {
        const size = parseFloat(getComputedStyle(t).fontSize) * scale;
        if (size < least - 1e-9) {
          small.push(`${svg.closest("figure")?.id}: "${t.textContent}" ${size.toFixed(1)} px`);
        }
      }
    }
    const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
    while (walker.nextNode()) {
      const node = walker.currentNode;
      const e = node.parentElement;
      if ((node.textContent ?? "").trim() === "" || e === null) continue;
      if (e.closest("svg, script, style") || !shown(e)) continue;
      const size = parseFloat(getComputedStyle(e).fontSize);
      if (size < least) small.push(`${e.tagName}.${e.className}: "${node.textContent}" ${size} px`);
    }
    const charts = (globalThis as unknown as {
      quiverCharts?: Record<string, { axes: { font: unknown }[]; root: Element }>;
    }).quiverCharts ?? {};
    for (const [name, u] of Object.entries(charts)) {
      if (!shown(u.root)) continue;
      for (const axis of u.axes) {
        const font = String(Array.isArray(axis.font) ? axis.font[0] : axis.font);
        const size = Number(/([\d.]+)px/.exec(font)?.[1]);
        if (!(size >= least)) small.push(`${name} axis font ${font}`);
      }
    }
    return small;
  }, least);
}

describe("the HTML report in a browser", () => {
  let report: string;
  beforeAll(async () => {
    const dir = await demoFolder();
    const r = runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", `${dir}/out`]);
    expect(r.code).toBe(0);
    report = `${dir}/out/report.html`;
  });

  // Debian's chromium (.ci/run installs it); skipping needs an explicit QUIVER_SKIP_BROWSER=1,
  // and then the test shows as skipped, not passed.
  const skip = !existsSync(CHROMIUM) && process.env.QUIVER_SKIP_BROWSER === "1";
  test.skipIf(skip)(
    "with JavaScript off: every plot shows as its static picture, no console errors, nothing fetched",
    async () => {
      expect(existsSync(CHROMIUM), `${CHROMIUM} is needed for this test`).toBe(true);
      const { context, profile } = await launch({ javaScriptEnabled: false });
      try {
        const { page, errors, requests } = await openReport(context, report);
        const plots = await page.locator("figure svg").count();
        expect(plots).toBeGreaterThanOrEqual(6);
        // Every figure shows a picture of real size (none hidden behind a script that did not run).
        const figures = await page.locator("figure").count();
        for (let i = 0; i < figures; i++) {
          const box = await page.locator("figure").nth(i).locator("svg").first().boundingBox();
          expect(box, `figure ${i}`).not.toBeNull();
          expect(box!.height, `figure ${i}`).toBeGreaterThan(100);
        }
        const firstBox = await page.locator("figure svg").first().boundingBox();
        expect(firstBox!.width).toBeGreaterThan(300);
        expect(await page.locator("table.targets tr.pass").count()).toBeGreaterThan(0);
        // The new views (issue: run-ups and cabin noise): colour maps against time and rpm,
        // order lines over the rpm map, the A-weighted order cuts; each drawn with a real size.
        for (
          const name of [
            "cabin_spectrogram_driver_ear_spectrogram",
            "runup_spectrogram_cabin_mic_spectrogram",
            "cabin_orders_cuts",
            "link_modes_stability",
            "link_modes_synthesis",
            "link_mac_mac",
            "link_modes_shape_1",
          ]
        ) {
          const box = await page.locator(`#figure-${name} svg`).first().boundingBox();
          expect(box, name).not.toBeNull();
          expect(box!.width, name).toBeGreaterThan(300);
          expect(box!.height, name).toBeGreaterThan(200);
        }
        expect(
          await page.locator(
            "#figure-runup_spectrogram_cabin_mic_spectrogram .wide-picture g.overlay",
          ).count(),
        ).toBe(2);
        // The MAC grid carries its values; the stability chart its poles as markers.
        expect(await page.locator("#figure-link_mac_mac .wide-picture text.value").count()).toBe(
          12,
        );
        expect(await page.locator("#figure-link_modes_stability circle.marker").count())
          .toBeGreaterThan(20);
        // Each link-arm mode drawn on the geometry: 4 lines between its 5 points, deformed.
        expect(await page.locator("#figure-link_modes_shape_2 line.deformed").count()).toBe(4);
        // The cabin thirds' limit curve is drawn on their bar chart, the bands over it outlined
        // and flagged, and the targets table lists every one of them with its margin.
        const manifest = JSON.parse(
          await readFile(report.replace(/report\.html$/, "manifest.json"), "utf8"),
        );
        const thirds = manifest.targets.find((t: { id: string }) => t.id === "cabin_thirds");
        expect(thirds.failing.length).toBeGreaterThan(0);
        expect(await page.locator("#figure-cabin_bands_bands .wide-picture path.limit").count())
          .toBe(1);
        expect(
          await page.locator("#figure-cabin_bands_bands .wide-picture rect.bar.failing").count(),
        ).toBe(
          thirds.failing.length,
        );
        const row = await page.locator("table.targets tr.fail").first().textContent();
        expect(row).toContain(`${thirds.failing.length} band(s) over the limit`);
        expect(row).toContain("in the 2500 Hz band");
        // The comparison's band differences as bars, one per band of its summary.
        const compared = JSON.parse(
          await readFile(report.replace(/report\.html$/, "bracket_vs_sim.json"), "utf8"),
        );
        expect(await page.locator("#figure-bracket_vs_sim_bands .wide-picture rect.bar").count())
          .toBe(
            compared.metadata.bands.length,
          );
        // The hammer: the force spectrum with its usable bandwidth, and every hit drawn with
        // its status (the demo's one double hit included).
        expect(await page.locator("#figure-bracket_frf_force").count()).toBe(1);
        const hits = await page.locator("figure[id^='figure-bracket_frf_hit_']").count();
        expect(hits).toBe(6);
        expect(await page.locator("#figure-bracket_frf_hit_4 svg").first().textContent())
          .toContain("double");
        // References as an engineer writes them.
        expect(await page.locator("body").innerText()).not.toContain("0.00002");
        // The map's cells are one raster image; the browser decodes it to its full size.
        const image = page.locator(
          "#figure-runup_spectrogram_cabin_mic_spectrogram .wide-picture svg.map image",
        );
        expect(await image.count()).toBe(1);
        expect((await image.boundingBox())!.width).toBeGreaterThan(300);
        // Without JavaScript a section still closes and opens on its heading (<details>).
        const psd = page.locator("details#section-road_psd");
        await psd.locator("summary").click();
        expect(await psd.evaluate((d) => (d as HTMLDetailsElement).open)).toBe(false);
        expect(await page.locator("#figure-road_psd_spectrum").isVisible()).toBe(false);
        await psd.locator("summary").click();
        expect(await page.locator("#figure-road_psd_spectrum svg").first().isVisible()).toBe(true);
        // At 700 px the static pictures (line plots included) keep their text at 11 px or more.
        await page.setViewportSize({ width: 700, height: 900 });
        expect(await textBelow(page, 11)).toEqual([]);
        await page.setViewportSize({ width: 1400, height: 900 });
        const shot = await page.screenshot({ fullPage: true, path: `${profile}/report.png` });
        expect(shot.length).toBeGreaterThan(10_000);
        expect(errors).toEqual([]);
        expect(requests.filter((u) => !u.startsWith("file://"))).toEqual([]);
        expect((await readFile(`${profile}/report.png`)).subarray(1, 4).toString()).toBe("PNG");
      } finally {
        await context.close();
      }
    },
  );

  test.skipIf(skip)(
    "interactive charts: a readout at a known point, zoom, a legend click hides a trace",
    async () => {
      expect(existsSync(CHROMIUM), `${CHROMIUM} is needed for this test`).toBe(true);
      const { context } = await launch();
      try {
        const { page, errors, requests } = await openReport(context, report);
        // The road PSD's value at 100 Hz, from the result file the report was made from.
        const result = JSON.parse(
          await readFile(report.replace(/report\.html$/, "road_psd.json"), "utf8"),
        );
        const f = result.columns[0].values as number[];
        const k = f.indexOf(100);
        expect(k).toBeGreaterThan(0);
        const seat = result.columns.find((c: { name: string }) => c.name === "seat_rail_z");
        const expected = seat.values[k] as number;
        const figure = page.locator("#figure-road_psd_spectrum");
        expect(await figure.locator(".static").isVisible()).toBe(false);
        // The contents come first: the chart is below the first screen.
        await figure.scrollIntoViewIfNeeded();
        // Drag from 20 Hz to 200 Hz: the x axis then spans about that.
        const drag = await page.evaluate(() => {
          const u = (globalThis as unknown as { quiverCharts: Record<string, ChartHandle> })
            .quiverCharts.road_psd_spectrum;
          const box = u.over.getBoundingClientRect();
          return {
            from: box.left + u.valToPos(20, "x"),
            to: box.left + u.valToPos(200, "x"),
            y: box.top + box.height / 2,
          };
        });
        await page.mouse.move(drag.from, drag.y);
        await page.mouse.down();
        await page.mouse.move(drag.to, drag.y + 2, { steps: 8 });
        await page.mouse.up();
        const zoomed = await page.evaluate(() =>
          (globalThis as unknown as { quiverCharts: Record<string, ChartHandle> }).quiverCharts
            .road_psd_spectrum.scales.x
        );
        expect(zoomed.min).toBeGreaterThan(15);
        expect(zoomed.min).toBeLessThan(25);
        expect(zoomed.max).toBeGreaterThan(170);
        expect(zoomed.max).toBeLessThan(230);
        // Hover at 100 Hz (in the zoomed view, where lines lie pixels apart): the legend reads the
        // frequency and the value with its unit.
        const at = await page.evaluate(() => {
          const u = (globalThis as unknown as { quiverCharts: Record<string, ChartHandle> })
            .quiverCharts.road_psd_spectrum;
          const box = u.over.getBoundingClientRect();
          return { x: box.left + u.valToPos(100, "x"), y: box.top + box.height / 2 };
        });
        await page.mouse.move(at.x, at.y);
        const values = await figure.locator(".u-legend .u-value").allTextContents();
        expect(values[0]).toBe("100 Hz");
        const [number, unit] = values[1].split(" ");
        expect(unit).toBe("(m/s^2)^2/Hz");
        // Five significant digits in the readout.
        expect(Math.abs(Number(number) - expected) / expected).toBeLessThan(1e-4);
        // Shift + drag pans: the zoomed view moves by the drag and keeps its width (a decade
        // here, on the log axis), so dragging left by a third of the plot raises both ends.
        const pan = await page.evaluate(() => {
          const u = (globalThis as unknown as { quiverCharts: Record<string, ChartHandle> })
            .quiverCharts.road_psd_spectrum;
          const box = u.over.getBoundingClientRect();
          return { x: box.left + box.width / 2, y: box.top + box.height / 2, width: box.width };
        });
        await page.keyboard.down("Shift");
        await page.mouse.move(pan.x, pan.y);
        await page.mouse.down();
        await page.mouse.move(pan.x - pan.width / 3, pan.y, { steps: 6 });
        await page.mouse.up();
        await page.keyboard.up("Shift");
        const panned = await page.evaluate(() =>
          (globalThis as unknown as { quiverCharts: Record<string, ChartHandle> }).quiverCharts
            .road_psd_spectrum.scales.x
        );
        expect(panned.min).toBeGreaterThan(zoomed.min * 1.5);
        expect(Math.log10(panned.max / panned.min)).toBeCloseTo(
          Math.log10(zoomed.max / zoomed.min),
          6,
        );
        // Reset brings the whole range back.
        await figure.locator("button", { hasText: "Reset view" }).click();
        const reset = await page.evaluate(() =>
          (globalThis as unknown as { quiverCharts: Record<string, ChartHandle> }).quiverCharts
            .road_psd_spectrum.scales.x
        );
        expect(reset.max).toBeGreaterThan(10000);
        // A click on the second trace's legend entry hides it.
        await figure.locator(".u-legend .u-series").nth(2).click();
        const shown = await page.evaluate(() =>
          (globalThis as unknown as { quiverCharts: Record<string, ChartHandle> }).quiverCharts
            .road_psd_spectrum.series.map((s) => s.show)
        );
        expect(shown).toEqual([true, true, false]);
        // A colour map's readout: the MAC grid's cell under the pointer, its value read back
        // from the colour, against the result file (within the colour's 8-bit step).
        const macMap = page.locator("#figure-link_mac_mac .wide-picture svg.map");
        const grid = await macMap.evaluate((m) => ({
          x: (m as unknown as { dataset: Record<string, string> }).dataset.x.split(",").map(Number),
          y: (m as unknown as { dataset: Record<string, string> }).dataset.y.split(",").map(Number),
        }));
        await macMap.scrollIntoViewIfNeeded();
        const cell = await macMap.boundingBox();
        // Bottom-left cell, then the cell one up and one right.
        for (const [column, row] of [[0, 0], [1, 1]]) {
          await page.mouse.move(
            cell!.x + ((column + 0.5) / grid.x[2]) * cell!.width,
            cell!.y + cell!.height - ((row + 0.5) / grid.y[2]) * cell!.height,
          );
          const text = await page.locator("#figure-link_mac_mac .wide-picture .map-readout")
            .textContent();
          const mac = JSON.parse(
            await readFile(report.replace(/report\.html$/, "link_mac.json"), "utf8"),
          );
          const [tests, sims, values] = mac.columns.map((c: { values: number[] }) => c.values);
          const xMode = grid.x[0] + column, yMode = grid.y[0] + row;
          const k = tests.findIndex((t: number, i: number) =>
            (t === xMode && sims[i] === yMode) || (t === yMode && sims[i] === xMode)
          );
          const shown = Number(/[≈≤] (-?[0-9.e-]+)/.exec(text ?? "")?.[1]);
          expect(Math.abs(shown - values[k]), text ?? "").toBeLessThan(0.01);
        }
        // Bars carry their value as a tooltip.
        expect(await page.locator("#figure-cabin_bands_bands rect.bar title").first().textContent())
          .toMatch(/driver_ear, 25: -?[0-9.]+ \(Level \[dB\(A\) re 20 µPa\]\)/);
        // Every line plot became a chart; the colour maps, bars and drawings stay pictures.
        const charts = await page.locator("figure[data-chart]").count();
        expect(charts).toBeGreaterThan(10);
        expect(await page.locator("figure.live").count()).toBe(charts);
        expect(errors).toEqual([]);
        expect(requests.filter((u) => !u.startsWith("file://"))).toEqual([]);
      } finally {
        await context.close();
      }
    },
  );

  test.skipIf(skip)(
    "contents: every section listed with its status, links that reach it, a way back, collapsing",
    async () => {
      expect(existsSync(CHROMIUM), `${CHROMIUM} is needed for this test`).toBe(true);
      const { context } = await launch();
      try {
        const { page, errors, requests } = await openReport(context, report);
        const dir = report.replace(/report\.html$/, "");
        const manifest = JSON.parse(await readFile(`${dir}manifest.json`, "utf8"));
        const plan = JSON.parse(await readFile(`${dir}../tamarack_b2_plan.json`, "utf8"));
        // The status each step should show, from the run's own files: a step that did not run is
        // failed; a target on it not met, "target failed"; warnings in its result, "warnings".
        const expected = new Map<string, string>();
        for (const step of manifest.steps) {
          const mine = plan.targets.filter((t: { of: { analysis: string } }) =>
            t.of.analysis === step.id
          ).map((t: { id: string }) => manifest.targets.find((o: { id: string }) => o.id === t.id));
          const result = JSON.parse(await readFile(`${dir}${step.id}.json`, "utf8"));
          expected.set(
            step.id,
            step.status !== "ok"
              ? "failed"
              : mine.some((o: { status: string; pass: boolean }) =>
                  o.status === "checked" && !o.pass
                )
              ? "target failed"
              : (result.metadata?.warnings ?? []).length > 0 ||
                  mine.some((o: { status: string }) => o.status !== "checked")
              ? "warnings"
              : "ok",
          );
        }
        // The demo shows each kind it can: a failed target, warnings and plain ok.
        expect(new Set(expected.values())).toEqual(new Set(["target failed", "warnings", "ok"]));
        const items = page.locator("nav#contents li");
        // + targets, the recordings' time histories and the trace
        expect(await items.count()).toBe(manifest.steps.length + 3);
        for (const step of manifest.steps) {
          const link = page.locator(`nav#contents a[href="#section-${step.id}"]`);
          expect(await link.count(), step.id).toBe(1);
          const status = await link.locator("xpath=..").locator(".status").textContent();
          expect(status, step.id).toMatch(new RegExp(`^[✓!✕] ${expected.get(step.id)}(:|$)`));
          // The link reaches its section: the section's heading is then on screen.
          await link.click();
          expect(await page.evaluate(() => location.hash)).toBe(`#section-${step.id}`);
          const top = await page.locator(`#section-${step.id} > summary`).evaluate((e) =>
            e.getBoundingClientRect().top
          );
          expect(top, step.id).toBeGreaterThanOrEqual(-1);
          expect(top, step.id).toBeLessThan(900);
          // The section's own heading carries the same status.
          expect(await page.locator(`#section-${step.id} > summary .status`).textContent())
            .toBe(status);
        }
        const failedTargets = manifest.targets.filter((t: { pass: boolean }) => t.pass === false);
        // The targets' own entry: not all met, so "target failed", with the count met.
        expect(failedTargets.length).toBeGreaterThan(0);
        const targetsEntry = page.locator('nav#contents a[href="#targets"]').locator("xpath=..");
        expect(await targetsEntry.locator(".status").textContent()).toBe(
          `✕ target failed: ${
            manifest.targets.length - failedTargets.length
          } of ${manifest.targets.length} met`,
        );
        // The way back: a fixed link, on screen wherever the reader is, to the contents.
        await page.evaluate(() => globalThis.scrollTo(0, document.body.scrollHeight));
        const back = page.locator("a.to-contents");
        const box = await back.boundingBox();
        expect(box).not.toBeNull();
        expect(box!.y).toBeGreaterThan(0);
        expect(box!.y + box!.height).toBeLessThanOrEqual(900);
        await back.click();
        expect(await page.evaluate(() => location.hash)).toBe("#contents");
        expect(
          await page.locator("nav#contents").evaluate((e) => e.getBoundingClientRect().top),
        ).toBeLessThan(10);
        // Collapsing: "Close all" leaves only the headings; a closed section's chart is fitted to
        // the page when it opens again.
        const height = () => page.evaluate(() => document.body.scrollHeight);
        const open = await height();
        await page.locator("nav#contents button", { hasText: "Close all" }).click();
        const closed = await height();
        expect(closed).toBeLessThan(open / 5);
        expect(await page.locator("#figure-road_psd_spectrum").isVisible()).toBe(false);
        await page.locator("#section-road_psd > summary").click();
        expect(await page.locator("#figure-road_psd_spectrum .uplot").isVisible()).toBe(true);
        await page.waitForTimeout(300);
        const widths = await page.evaluate(() => {
          const figure = document.querySelector("#figure-road_psd_spectrum") as HTMLElement;
          const canvas = figure.querySelector(".uplot canvas") as HTMLElement;
          return { figure: figure.clientWidth, chart: canvas.getBoundingClientRect().width };
        });
        expect(widths.chart).toBeGreaterThan(widths.figure / 2);
        await page.locator("nav#contents button", { hasText: "Open all" }).click();
        expect(await height()).toBe(open);
        // The modal section names the FRFs and geometry it was fitted from.
        const modal = manifest.steps.find((s: { command: string }) => s.command === "modal");
        const note = await page.locator(`#section-${modal.id} > p.note`).textContent();
        for (const input of modal.inputs) {
          expect(note).toContain(String(input.path).split("/").pop());
        }
        // The over-limit bars: hatched and marked on the chart, and the legend says what it means.
        const thirds = manifest.targets.find((t: { id: string }) => t.id === "cabin_thirds");
        const bands = page.locator("#figure-cabin_bands_bands .wide-picture");
        expect(await bands.locator("rect.bar.failing + path.hatch").count()).toBe(
          thirds.failing.length,
        );
        expect(await bands.locator("g.failing-mark").count()).toBe(thirds.failing.length + 1);
        expect(await bands.locator("g.legend-over").textContent()).toContain("over the limit");
        expect(errors).toEqual([]);
        expect(requests.filter((u) => !u.startsWith("file://"))).toEqual([]);
      } finally {
        await context.close();
      }
    },
  );

  test.skipIf(skip)(
    "at 700 px all text is 11 px or more; the y scale switch relabels the axis and keeps the zoom",
    async () => {
      expect(existsSync(CHROMIUM), `${CHROMIUM} is needed for this test`).toBe(true);
      const { context } = await launch();
      try {
        const { page, errors } = await openReport(context, report);
        // Wide: the live charts' legends in a column beside the plot, as README says.
        const legendBeside = await page.evaluate(() => {
          const figure = document.querySelector("#figure-road_psd_spectrum")!;
          const plot = figure.querySelector(".u-wrap")!.getBoundingClientRect();
          const legend = figure.querySelector(".u-legend")!.getBoundingClientRect();
          return {
            plotRight: plot.right,
            legendLeft: legend.left,
            legendTop: legend.top,
            plotBottom: plot.bottom,
          };
        });
        expect(legendBeside.legendLeft).toBeGreaterThanOrEqual(legendBeside.plotRight);
        expect(legendBeside.legendTop).toBeLessThan(legendBeside.plotBottom);
        expect(await textBelow(page, 11)).toEqual([]);
        await page.setViewportSize({ width: 700, height: 900 });
        await page.waitForTimeout(400); // the charts refit 100 ms after a resize
        // Narrow: the narrow pictures are the ones shown, and every text is 11 px or more.
        expect(await page.locator("#figure-cabin_bands_bands .narrow-picture svg").isVisible())
          .toBe(true);
        expect(await page.locator("#figure-cabin_bands_bands .wide-picture svg").isVisible())
          .toBe(false);
        expect(await textBelow(page, 11)).toEqual([]);
        // The paths' contributions span more than 120 dB: the log axis says it is cut.
        type Live = ChartHandle & { axes: { label: string }[] };
        const chart = () =>
          page.evaluate(() => {
            const u = (globalThis as unknown as { quiverCharts: Record<string, Live> })
              .quiverCharts.mount_paths_contributions;
            return {
              label: u.axes[1].label,
              x: u.scales.x,
              y: u.scales.y,
              distr: (u.scales.y as unknown as { distr: number }).distr,
            };
          });
        const figure = page.locator("#figure-mount_paths_contributions");
        await figure.scrollIntoViewIfNeeded();
        const before = await chart();
        expect(before.label).toMatch(/, top 120 dB shown$/);
        // Zoom to 30 … 300 Hz by a drag.
        const drag = await page.evaluate(() => {
          const u = (globalThis as unknown as { quiverCharts: Record<string, ChartHandle> })
            .quiverCharts.mount_paths_contributions;
          const box = u.over.getBoundingClientRect();
          return {
            from: box.left + u.valToPos(30, "x"),
            to: box.left + u.valToPos(300, "x"),
            y: box.top + box.height / 2,
          };
        });
        await page.mouse.move(drag.from, drag.y);
        await page.mouse.down();
        await page.mouse.move(drag.to, drag.y + 2, { steps: 8 });
        await page.mouse.up();
        const zoomed = await chart();
        expect(zoomed.x.min).toBeGreaterThan(25);
        expect(zoomed.x.max).toBeLessThan(360);
        // To linear: the label drops the cut, the y axis is linear, the x zoom stays.
        await figure.locator("button", { hasText: "y: lin / log" }).click();
        const linear = await chart();
        expect(linear.label).toBe(before.label.replace(/, top 120 dB shown$/, ""));
        expect(linear.distr).toBe(1);
        expect(linear.x.min).toBeCloseTo(zoomed.x.min, 9);
        expect(linear.x.max).toBeCloseTo(zoomed.x.max, 9);
        // And back: the cut is named again, the zoom still there.
        await figure.locator("button", { hasText: "y: lin / log" }).click();
        const back = await chart();
        expect(back.label).toBe(before.label);
        expect(back.distr).toBe(3);
        expect(back.x.min).toBeCloseTo(zoomed.x.min, 9);
        expect(back.x.max).toBeCloseTo(zoomed.x.max, 9);
        // A y zoom survives the switch to linear and back too.
        const yDrag = await page.evaluate(() => {
          const u = (globalThis as unknown as { quiverCharts: Record<string, ChartHandle> })
            .quiverCharts.mount_paths_contributions;
          const box = u.over.getBoundingClientRect();
          return {
            x: box.left + box.width / 2,
            top: box.top + 0.2 * box.height,
            bottom: box.top + 0.6 * box.height,
          };
        });
        await page.mouse.move(yDrag.x, yDrag.top);
        await page.mouse.down();
        await page.mouse.move(yDrag.x + 2, yDrag.bottom, { steps: 8 });
        await page.mouse.up();
        const yZoomed = await chart();
        expect(yZoomed.y.max).toBeLessThan(back.y.max);
        await figure.locator("button", { hasText: "y: lin / log" }).click();
        const yLinear = await chart();
        expect(yLinear.y.min).toBeCloseTo(yZoomed.y.min, 12);
        expect(yLinear.y.max).toBeCloseTo(yZoomed.y.max, 12);
        expect(yLinear.x.min).toBeCloseTo(yZoomed.x.min, 9);
        expect(errors).toEqual([]);
      } finally {
        await context.close();
      }
    },
  );
});
