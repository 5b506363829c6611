/** Runs the demo campaign into a fresh temporary folder (once per test file). */
import { copyFile, mkdtemp } from "node:fs/promises";
import { fileURLToPath } from "node:url";
import { writeCampaign } from "../../fixtures/demo/campaign.ts";

/** Writes the demo recordings and plan into a new folder and returns it. */
export async function demoFolder(): Promise<string> {
  const dir = await mkdtemp("/tmp/quiver-demo-");
  await writeCampaign(dir);
  for (
    const file of ["tamarack_b2_plan.json", "tamarack_road_setup.json", "tamarack_seat_setup.json"]
  ) {
    await copyFile(
      fileURLToPath(new URL(`../../fixtures/demo/${file}`, import.meta.url)),
      `${dir}/${file}`,
    );
  }
  return dir;
}
