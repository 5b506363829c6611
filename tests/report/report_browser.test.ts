import { existsSync } from "node:fs";
import { mkdtemp, readFile } from "node:fs/promises";
import process from "node:process";
import { chromium } from "playwright-core";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";

const CHROMIUM = "/usr/bin/chromium";

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
    "opens in headless Chromium with no console errors, shows its plots and fetches nothing",
    async () => {
      expect(existsSync(CHROMIUM), `${CHROMIUM} is needed for this test`).toBe(true);
      const profile = await mkdtemp("/tmp/quiver-chromium-");
      const context = await chromium.launchPersistentContext(profile, {
        executablePath: CHROMIUM,
        headless: true,
        args: [
          "--headless",
          "--no-sandbox",
          "--disable-gpu",
          "--disable-background-networking",
          "--disable-component-update",
          "--disable-sync",
          "--no-first-run",
        ],
      });
      try {
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
        const plots = await page.locator("figure svg").count();
        expect(plots).toBeGreaterThanOrEqual(6);
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
          const box = await page.locator(`#figure-${name} > svg`).boundingBox();
          expect(box, name).not.toBeNull();
          expect(box!.width, name).toBeGreaterThan(300);
          expect(box!.height, name).toBeGreaterThan(200);
        }
        expect(
          await page.locator("#figure-runup_spectrogram_cabin_mic_spectrogram g.overlay").count(),
        ).toBe(2);
        // The MAC grid carries its values; the stability chart its poles as markers.
        expect(await page.locator("#figure-link_mac_mac text.value").count()).toBe(12);
        expect(await page.locator("#figure-link_modes_stability circle.marker").count())
          .toBeGreaterThan(20);
        // Each link-arm mode drawn on the geometry: 4 lines between its 5 points, deformed.
        expect(await page.locator("#figure-link_modes_shape_2 line.deformed").count()).toBe(4);
        // The map's cells are one raster image; the browser decodes it to its full size.
        const image = page.locator("#figure-runup_spectrogram_cabin_mic_spectrogram svg.map image");
        expect(await image.count()).toBe(1);
        expect((await image.boundingBox())!.width).toBeGreaterThan(300);
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
});
