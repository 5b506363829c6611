/**
 * The report's own views in a browser (Debian's chromium, headless): the time history of every
 * recording the plan reads with its slice marks, zoomable; the mode-shape animation (play moves
 * the drawn lines, pause stops them; labels clear of lines; a sensible size); the spectrogram map
 * limited to the plan's --max-hz, and the order lines' labels visible and off the ridge.
 */
import { existsSync } from "node:fs";
import { mkdtemp, readFile } from "node:fs/promises";
import process from "node:process";
import { type BrowserContext, chromium, type Page } from "playwright-core";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";
import { CHROMIUM, CHROMIUM_ARGS } from "../../fixtures/demo/screenshots.ts";
import { shapeDrawing, shapeFigureHtml } from "../../lib/report/shape_view.ts";
import { fileURLToPath } from "node:url";

async function launch(options: { javaScriptEnabled?: boolean } = {}) {
  const profile = await mkdtemp("/tmp/quiver-chromium-");
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: 1400, height: 900 },
    ...options,
    args: [...CHROMIUM_ARGS],
  });
  return { context, profile };
}

async function openReport(context: BrowserContext, report: string) {
  const page = await context.newPage();
  const errors: string[] = [];
  page.on("console", (m) => {
    if (m.type() === "error") errors.push(m.text());
  });
  page.on("pageerror", (e) => errors.push(e.message));
  await page.goto(`file://${report}`);
  await page.waitForLoadState("load");
  return { page, errors };
}

interface PlanJson {
  recordings: Record<string, { start?: number; end?: number }>;
  analyses: { id: string; recording?: string; options?: Record<string, unknown> }[];
}

/** The slice marks a plan sets on a recording, read from the plan file here (not from quiver). */
function expectedMarks(plan: PlanJson, name: string): { t: number; label: string }[] {
  const marks: { t: number; label: string }[] = [];
  const rec = plan.recordings[name];
  if (rec.start !== undefined) marks.push({ t: rec.start, label: "slice start" });
  if (rec.end !== undefined) marks.push({ t: rec.end, label: "slice end" });
  for (const a of plan.analyses) {
    if (a.recording !== name) continue;
    if (typeof a.options?.start === "number") {
      marks.push({ t: a.options.start, label: `${a.id} start` });
    }
    if (typeof a.options?.end === "number") marks.push({ t: a.options.end, label: `${a.id} end` });
  }
  return marks;
}

interface HistoryHandle {
  panels: {
    scales: Record<string, { min: number; max: number }>;
    valToPos(v: number, scale: string): number;
    over: { getBoundingClientRect(): { left: number; top: number; width: number; height: number } };
  }[];
  marks: { t: number; label: string }[];
}

/** The drawn positions of a shape's deformed lines and moving points. */
const shapeGeometry = (page: Page, id: string) =>
  page.locator(`#figure-${id} svg.shape`).evaluate((svg) =>
    [...svg.querySelectorAll("line.deformed, circle.moving")].map((e) =>
      ["x1", "y1", "x2", "y2", "cx", "cy"].map((a) => e.getAttribute(a)).join(",")
    ).join(";")
  );

describe("the report's views in a browser", () => {
  let report: string;
  let plan: PlanJson;
  beforeAll(async () => {
    const dir = await demoFolder();
    const r = runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", `${dir}/out`]);
    expect(r.code, r.stderr).toBe(0);
    report = `${dir}/out/report.html`;
    plan = JSON.parse(await readFile(`${dir}/tamarack_b2_plan.json`, "utf8"));
  });

  const skip = !existsSync(CHROMIUM) && process.env.QUIVER_SKIP_BROWSER === "1";

  test.skipIf(skip)(
    "a time history for each recording, with its slice marks, zoomable; without JavaScript the picture",
    async () => {
      expect(existsSync(CHROMIUM), `${CHROMIUM} is needed for this test`).toBe(true);
      const { context } = await launch();
      try {
        const { page, errors } = await openReport(context, report);
        const names = Object.keys(plan.recordings);
        // The demo plan sets a slice (its cabin spectrogram's 0.5–7.5 s): something to mark.
        expect(names.flatMap((n) => expectedMarks(plan, n)).length).toBeGreaterThan(0);
        for (const name of names) {
          const figure = page.locator(`#figure-history_${name}`);
          expect(await figure.count(), name).toBe(1);
          const handle = await page.evaluate(
            (n) => {
              const h =
                (globalThis as unknown as { quiverHistories: Record<string, HistoryHandle> })
                  .quiverHistories[`history_${n}`];
              return { panels: h.panels.length, marks: h.marks };
            },
            name,
          );
          expect(handle.panels, name).toBeGreaterThan(0);
          const marks = expectedMarks(plan, name);
          expect(handle.marks.map((m) => ({ t: m.t, label: m.label })), name).toEqual(marks);
          // The static picture carries the same marks (hidden on screen while the chart shows).
          expect(await figure.locator("svg g.slice-mark").count(), name).toBe(marks.length);
          expect(await figure.locator(".static").isVisible(), name).toBe(false);
          expect((await figure.locator("canvas").count()) >= handle.panels, name).toBe(true);
        }
        // The slice marks' labels on the road's picture name the analysis that set them.
        const road = page.locator("#figure-history_road svg g.slice-mark text");
        expect(await road.allTextContents()).toEqual([
          "cabin_spectrogram start",
          "cabin_spectrogram end",
        ]);
        // Drag across the road's first panel from 2 s to 4 s: every panel then shows about that.
        const at = await page.evaluate(() => {
          const h = (globalThis as unknown as { quiverHistories: Record<string, HistoryHandle> })
            .quiverHistories.history_road;
          const u = h.panels[0];
          const box = u.over.getBoundingClientRect();
          return {
            from: box.left + u.valToPos(2, "x"),
            to: box.left + u.valToPos(4, "x"),
            y: box.top + box.height / 2,
          };
        });
        await page.locator("#figure-history_road").scrollIntoViewIfNeeded();
        const again = await page.evaluate(() => {
          const u = (globalThis as unknown as { quiverHistories: Record<string, HistoryHandle> })
            .quiverHistories.history_road.panels[0];
          const box = u.over.getBoundingClientRect();
          return {
            from: box.left + u.valToPos(2, "x"),
            to: box.left + u.valToPos(4, "x"),
            y: box.top + box.height / 2,
          };
        });
        expect(again.to - again.from).toBeCloseTo(at.to - at.from, 3);
        await page.mouse.move(again.from, again.y);
        await page.mouse.down();
        await page.mouse.move(again.to, again.y, { steps: 8 });
        await page.mouse.up();
        const scales = await page.evaluate(() =>
          (globalThis as unknown as { quiverHistories: Record<string, HistoryHandle> })
            .quiverHistories.history_road.panels.map((u) => u.scales.x)
        );
        for (const x of scales) {
          expect(x.min).toBeGreaterThan(1.9);
          expect(x.min).toBeLessThan(2.1);
          expect(x.max).toBeGreaterThan(3.9);
          expect(x.max).toBeLessThan(4.1);
        }
        await page.locator("#figure-history_road button", { hasText: "Reset view" }).click();
        const reset = await page.evaluate(() =>
          (globalThis as unknown as { quiverHistories: Record<string, HistoryHandle> })
            .quiverHistories.history_road.panels[2].scales.x
        );
        expect(reset.min).toBeLessThan(0.01);
        expect(reset.max).toBeGreaterThan(7.99);
        expect(errors).toEqual([]);
      } finally {
        await context.close();
      }
      // Without JavaScript the static picture shows, marks included.
      const off = await launch({ javaScriptEnabled: false });
      try {
        const { page } = await openReport(off.context, report);
        const picture = page.locator("#figure-history_road .static svg");
        expect(await picture.isVisible()).toBe(true);
        expect((await picture.boundingBox())!.height).toBeGreaterThan(200);
        expect(await page.locator("#figure-history_road svg g.slice-mark").count()).toBe(2);
        expect(await page.locator("#figure-link_modes_shape_1 svg.shape").isVisible()).toBe(true);
      } finally {
        await off.context.close();
      }
    },
  );

  test.skipIf(skip)(
    "mode shapes: a sensible size, labels clear of lines, play moves the lines and pause stops them",
    async () => {
      expect(existsSync(CHROMIUM), `${CHROMIUM} is needed for this test`).toBe(true);
      const { context } = await launch();
      try {
        const { page, errors } = await openReport(context, report);
        const shapes = page.locator("figure svg.shape");
        expect(await shapes.count()).toBeGreaterThanOrEqual(2);
        for (let i = 0; i < await shapes.count(); i++) {
          const box = (await shapes.nth(i).boundingBox())!;
          // Within ~600 px tall at 1400 px wide, aspect kept (720 × 420).
          expect(box.height).toBeLessThanOrEqual(600);
          expect(box.height).toBeGreaterThan(200);
          expect(box.width / box.height).toBeCloseTo(720 / 420, 1);
        }
        // No point label crosses a line (at rest or deformed): each label's box against every
        // drawn segment (Liang–Barsky clipping of the segment to the box, analytic).
        const crossings = await shapes.evaluateAll((all) => {
          const hits: string[] = [];
          for (const svg of all) {
            const segments = [...svg.querySelectorAll("line")].map((l) =>
              ["x1", "y1", "x2", "y2"].map((a) => Number(l.getAttribute(a)))
            );
            for (const label of svg.querySelectorAll("text.point-label")) {
              const b = (label as unknown as { getBBox(): DOMRect }).getBBox();
              for (const [x1, y1, x2, y2] of segments) {
                let t0 = 0, t1 = 1;
                const dx = x2 - x1, dy = y2 - y1;
                const edges: [number, number][] = [
                  [-dx, x1 - b.x],
                  [dx, b.x + b.width - x1],
                  [-dy, y1 - b.y],
                  [dy, b.y + b.height - y1],
                ];
                let inside = true;
                for (const [p, q] of edges) {
                  if (p === 0) {
                    if (q < 0) inside = false;
                  } else {
                    const r = q / p;
                    if (p < 0) t0 = Math.max(t0, r);
                    else t1 = Math.min(t1, r);
                  }
                }
                if (inside && t0 <= t1) hits.push(label.textContent ?? "");
              }
            }
          }
          return hits;
        });
        expect(crossings).toEqual([]);
        const id = "link_modes_shape_1";
        const figure = page.locator(`#figure-${id}`);
        await figure.scrollIntoViewIfNeeded();
        const still = await shapeGeometry(page, id);
        await page.waitForTimeout(300);
        expect(await shapeGeometry(page, id)).toBe(still); // nothing moves before play
        const play = figure.locator("button.shape-play");
        expect(await play.textContent()).toBe("Play");
        await play.click();
        await page.waitForTimeout(400);
        const moving = await shapeGeometry(page, id);
        expect(moving).not.toBe(still);
        await page.waitForTimeout(300);
        expect(await shapeGeometry(page, id)).not.toBe(moving);
        expect(await play.textContent()).toBe("Pause");
        await play.click();
        const paused = await shapeGeometry(page, id);
        await page.waitForTimeout(400);
        expect(await shapeGeometry(page, id)).toBe(paused);
        expect(errors).toEqual([]);
      } finally {
        await context.close();
      }
    },
  );

  test.skipIf(skip)(
    "the run-up map stops at the plan's --max-hz; order labels visible and off the ridge",
    async () => {
      expect(existsSync(CHROMIUM), `${CHROMIUM} is needed for this test`).toBe(true);
      const { context } = await launch();
      try {
        const { page, errors } = await openReport(context, report);
        const step = plan.analyses.find((a) => a.id === "runup_spectrogram")!;
        const maxHz = step.options!["max-hz"] as number;
        const figure = page.locator("#figure-runup_spectrogram_cabin_mic_spectrogram");
        await figure.scrollIntoViewIfNeeded();
        // The wide picture (the window is wide); the narrow copy is hidden.
        const map = figure.locator(".wide-picture svg.map");
        const grid = await map.evaluate((m) => ({
          x: (m as unknown as { dataset: Record<string, string> }).dataset.x.split(",").map(Number),
          y: (m as unknown as { dataset: Record<string, string> }).dataset.y.split(",").map(Number),
        }));
        // The top line is the last line at or below the limit (lines 4 Hz apart: 8192 / 2048).
        expect(grid.y[1]).toBeLessThanOrEqual(maxHz);
        expect(grid.y[1]).toBeGreaterThan(maxHz - 4);
        const box = (await map.boundingBox())!;
        // Cell centres: column j at box.left + (j + 0.5)/columns · width; row likewise from the bottom.
        const rpmAt = (px: number) =>
          grid.x[0] +
          (((px - box.x) / box.width) * grid.x[2] - 0.5) * (grid.x[1] - grid.x[0]) /
            (grid.x[2] - 1);
        const pixelOf = (hz: number) =>
          box.y + box.height -
          (((hz - grid.y[0]) / (grid.y[1] - grid.y[0])) * (grid.y[2] - 1) + 0.5) / grid.y[2] *
            box.height;
        const labels = figure.locator(".wide-picture text.overlay-label");
        expect(await labels.count()).toBe(2);
        for (let i = 0; i < 2; i++) {
          const label = labels.nth(i);
          expect(await label.isVisible()).toBe(true);
          const text = (await label.textContent())!;
          const order = Number(/order ([0-9.]+)/.exec(text)![1]);
          const l = (await label.boundingBox())!;
          // Inside the map, and the ridge (f = order · rpm / 60) not under it at either end.
          expect(l.x).toBeGreaterThanOrEqual(box.x);
          expect(l.x + l.width).toBeLessThanOrEqual(box.x + box.width);
          expect(l.y).toBeGreaterThanOrEqual(box.y);
          for (const x of [l.x, l.x + l.width / 2, l.x + l.width]) {
            const ridge = pixelOf((order * rpmAt(x)) / 60);
            expect(ridge < l.y - 1 || ridge > l.y + l.height + 1, `${text} at x ${x}`).toBe(true);
          }
        }
        // Each order line is drawn as two guides beside the ridge, none over it.
        expect(await figure.locator(".wide-picture g.overlay path.guide").count()).toBe(4);
        expect(errors).toEqual([]);
      } finally {
        await context.close();
      }
    },
  );

  test.skipIf(skip)(
    "the animation draws Re(φ·e^{iθ}): a quarter cycle on, a real point is at rest and an imaginary one at its extreme",
    async () => {
      expect(existsSync(CHROMIUM), `${CHROMIUM} is needed for this test`).toBe(true);
      // Two points moving in z: φ = 1 and φ = i (a travelling wave, analytic).
      const view = shapeDrawing({
        title: "t",
        lines: [[0, 1]],
        points: [
          { name: "a", at: [0, 0, 0], re: [0, 0, 1], im: [0, 0, 0] },
          { name: "b", at: [1, 0, 0], re: [0, 0, 0], im: [0, 0, 1] },
        ],
      });
      const client = await readFile(
        fileURLToPath(new URL("../../lib/report/views_client.js", import.meta.url)),
        "utf8",
      );
      const { context } = await launch();
      try {
        const page = await context.newPage();
        await page.setContent(
          `<!DOCTYPE html><html><body><figure id="figure-t">${
            shapeFigureHtml(view)
          }</figure><script>${client}</script></body></html>`,
        );
        const drawn = (theta: number) =>
          page.locator("svg.shape").evaluate((svg, t) => {
            (globalThis as unknown as { quiverShapes: Record<string, { place(t: number): void }> })
              .quiverShapes.t.place(t);
            const rest = svg.querySelector("line.undeformed")!;
            const points = [...svg.querySelectorAll("circle.moving")];
            return {
              rest: [["x1", "y1"], ["x2", "y2"]].map((p) =>
                p.map((a) => Number(rest.getAttribute(a)))
              ),
              at: points.map((c) => ["cx", "cy"].map((a) => Number(c.getAttribute(a)))),
            };
          }, theta);
        // θ = 0: Re φ: a up (z up is up the page), b at rest.
        const start = await drawn(0);
        const amplitude = start.rest[0][1] - start.at[0][1];
        expect(amplitude).toBeGreaterThan(20);
        expect(start.at[1][1]).toBeCloseTo(start.rest[1][1], 0);
        // θ = π/2: Re(φ·i) = −Im φ: a at rest, b down by the same amplitude.
        const quarter = await drawn(Math.PI / 2);
        expect(quarter.at[0][1]).toBeCloseTo(quarter.rest[0][1], 0);
        expect(quarter.at[1][1] - quarter.rest[1][1]).toBeCloseTo(amplitude, 0);
        // z motion only: nothing moves sideways.
        expect(quarter.at[1][0]).toBeCloseTo(quarter.rest[1][0], 0);
      } finally {
        await context.close();
      }
    },
  );
});
