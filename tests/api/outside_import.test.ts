import { spawnSync } from "node:child_process";
import { mkdtemp, writeFile } from "node:fs/promises";
import process from "node:process";
import { fileURLToPath } from "node:url";
import { expect, test } from "vitest";
import { SUBPROCESS_TIMEOUT_MS } from "../helpers/cli.ts";

const MOD = fileURLToPath(new URL("../../mod.ts", import.meta.url));

test("a Deno script outside the project imports mod.ts by path and gets an H1 FRF and its damping", async () => {
  // Analytic truth: a single mode at 40 Hz with ζ = 2 % (displacement by the exact
  // discrete recursion of the damped oscillator, Ewins, Modal Testing, 2nd ed., 2.2).
  const dir = await mkdtemp("/tmp/quiver-outside-");
  await writeFile(
    `${dir}/script.ts`,
    `import { frequencyResponse, modalDamping } from "${MOD}";
const rate = 1024, n = 1 << 18, w = 2 * Math.PI * 40, zeta = 0.02, T = 1 / rate;
let seed = 7;
const force = new Float64Array(n).map(() => (seed = (seed * 16807) % 2147483647) / 2147483647 - 0.5);
const wd = w * Math.sqrt(1 - zeta * zeta), r = Math.exp(-zeta * w * T), tip = new Float64Array(n);
for (let i = 2; i < n; i++) tip[i] = 2 * r * Math.cos(wd * T) * tip[i - 1] - r * r * tip[i - 2] + (T / wd) * r * Math.sin(wd * T) * force[i - 1];
const rec = { rate, startTime: 0, channels: [{ name: "force", unit: "N", data: force }, { name: "tip", unit: "m", data: tip }] };
const { frf } = await frequencyResponse(rec, { input: "force", outputs: ["tip"], block: 4096 });
const [mode] = modalDamping(frf, { minHz: 20, maxHz: 80 }).modes;
console.log(JSON.stringify({ hz: mode.frequencyHz, zeta: mode.dampingRatio }));
`,
  );
  // --no-config: the project's deno.json and import map are not there to help.
  const r = spawnSync(process.execPath, ["run", "-A", "--no-config", "script.ts"], {
    cwd: dir,
    encoding: "utf8",
    timeout: SUBPROCESS_TIMEOUT_MS,
  });
  expect(r.status, r.stderr).toBe(0);
  const { hz, zeta } = JSON.parse(r.stdout.trim().split("\n").pop()!);
  expect(Math.abs(hz - 40)).toBeLessThan(0.1);
  expect(Math.abs(zeta / 0.02 - 1)).toBeLessThan(0.1);
});
