import { chromium } from "npm:playwright-core@1.65.1";
const [file, width, out, clip] = Deno.args;
const ctx = await chromium.launchPersistentContext(await Deno.makeTempDir(), {
  executablePath: "/usr/bin/chromium",
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
  viewport: { width: Number(width), height: 900 },
});
const page = await ctx.newPage();
page.on("console", (m) => {
  if (m.type() === "error") console.log("console error:", m.text());
});
await page.goto(`file://${file}`);
if (clip) {
  const el = page.locator(clip);
  await el.screenshot({ path: out });
} else await page.screenshot({ path: out, fullPage: true });
await ctx.close();
