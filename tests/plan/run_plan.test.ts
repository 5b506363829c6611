import { existsSync } from "node:fs";
import { readFile, writeFile } from "node:fs/promises";
import { beforeAll, describe, expect, test } from "vitest";
import { runQuiver } from "../helpers/cli.ts";
import { demoFolder } from "../helpers/demo_campaign.ts";

describe("quiver run", () => {
  let dir: string;
  let plan: Record<string, unknown>;
  beforeAll(async () => {
    dir = await demoFolder();
    plan = JSON.parse(await readFile(`${dir}/tamarack_b2_plan.json`, "utf8"));
  });

  const variant = async (name: string, change: (p: Record<string, unknown>) => void) => {
    const copy = structuredClone(plan);
    change(copy);
    await writeFile(`${dir}/${name}.json`, JSON.stringify(copy));
    return runQuiver(["run", `${dir}/${name}.json`, "--out-dir", `${dir}/${name}_out`]);
  };

  const refusals: [string, (p: Record<string, unknown>) => void, RegExp][] = [
    [
      "a wrong key",
      (p) => ((p.analyses as Record<string, unknown>[])[1].optoins = {}),
      /plan key analyses\[1\]\.optoins: unknown key "optoins"; did you mean "options"\?/,
    ],
    [
      "a missing recording file",
      (p) => ((p.recordings as Record<string, { file: string }>).bracket.file = "gone.csv"),
      /plan key recordings\.bracket\.file: no such file: gone\.csv/,
    ],
    [
      "an unknown analysis",
      (p) => ((p.analyses as Record<string, unknown>[])[0].command = "no_such_analysis"),
      /plan key analyses\[0\]\.command/,
    ],
    [
      "a reference to no recording",
      (p) => ((p.analyses as Record<string, unknown>[])[2].recording = "tunnel"),
      /plan key analyses\[2\]\.recording: no recording "tunnel"/,
    ],
    [
      "a bad option value",
      (p) => ((p.analyses as { options: Record<string, unknown> }[])[5].options["rpm-step"] = -5),
      /plan key analyses\[5\]\.options\.rpm-step/,
    ],
    [
      "a modal fit of something that is not an FRF",
      (p) => {
        const modal = (p.analyses as { id: string; inputs?: string[] }[])
          .find((a) => a.id === "link_modes")!;
        modal.inputs = ["link_p1", "road_psd"];
      },
      /plan key analyses\[\d+\]\.inputs\[1\]: "road_psd" is not an earlier frf or hammer analysis/,
    ],
    [
      "a shape correlation without the simulation's shapes",
      (p) => {
        const mac = (p.analyses as { id: string; simulation?: unknown }[])
          .find((a) => a.id === "link_mac")!;
        delete mac.simulation;
      },
      /plan key analyses\[\d+\]\.simulation\.file: mac needs the simulation's mode shapes/,
    ],
    [
      "a point map that is not there",
      (p) => {
        const mac = (p.analyses as { id: string; map?: { file: string } }[])
          .find((a) => a.id === "link_mac")!;
        mac.map = { file: "no_map.csv" };
      },
      /plan key analyses\[\d+\]\.map\.file: no such file: no_map\.csv/,
    ],
    [
      "an unknown option",
      (p) => ((p.analyses as { options: Record<string, unknown> }[])[0].options.windwo = "hann"),
      /plan key analyses\[0\]\.options\.windwo/,
    ],
  ];
  for (const [label, change, pattern] of refusals) {
    test(`refuses ${label} with the key path, before any work`, async () => {
      const name = label.replace(/\W+/g, "_");
      const r = await variant(name, change);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(pattern);
      expect(existsSync(`${dir}/${name}_out`)).toBe(false);
    });
  }

  test(
    "runs the demo campaign: results, manifest with hashes, targets and the report",
    async () => {
      const r = runQuiver(["run", `${dir}/tamarack_b2_plan.json`, "--out-dir", `${dir}/out`]);
      expect(r.code).toBe(0);
      expect(r.stderr).toMatch(/\[28\/28\] compare bracket_vs_sim: ok/);
      const manifest = JSON.parse(await readFile(`${dir}/out/manifest.json`, "utf8"));
      expect(manifest.status).toBe("ok");
      expect(manifest.steps).toHaveLength(28);
      const hammer = manifest.steps.find((s: { id: string }) => s.id === "bracket_frf");
      expect(hammer.inputs[0].sha256).toMatch(/^[0-9a-f]{64}$/);
      expect(hammer.outputs["hits-out"].path).toBe("bracket_frf_hits.csv");
      const targets = Object.fromEntries(manifest.targets.map((t: { id: string }) => [t.id, t]));
      expect(targets.bracket_first_mode.pass).toBe(true);
      expect(Math.abs(targets.bracket_first_mode.value - 44.2)).toBeLessThan(0.2); // the bracket's invented first mode
      expect(targets.cabin_thirds.status).toBe("checked");
      // The link arm's first bending, paired with the simulation's by MAC (invented data:
      // identical shapes, the simulation 3 % stiffer; tolerance for the fit's 0.01 % error).
      expect(targets.link_first_mode_mac.pass).toBe(true);
      expect(targets.link_first_mode_mac.value).toBeGreaterThan(0.99);
      expect(Math.abs(targets.link_first_mode_shift.value - 2.93)).toBeLessThan(0.05);
      const html = await readFile(`${dir}/out/report.html`, "utf8");
      expect((html.match(/<svg /g) ?? []).length).toBeGreaterThanOrEqual(6);
      expect(html).not.toMatch(/(src|href)="https?:/);
      expect(existsSync(`${dir}/out/figures/bracket_vs_sim_overlay.svg`)).toBe(true);
      // The cabin spectrogram, A-weighted in dB, as a colour map.
      expect(existsSync(`${dir}/out/figures/cabin_spectrogram_driver_ear_spectrogram.svg`)).toBe(
        true,
      );
      // The run-up's cabin microphone against rpm with its two order lines, and its A-weighted
      // order cuts in dB on a linear axis.
      const map = await readFile(
        `${dir}/out/figures/runup_spectrogram_cabin_mic_spectrogram.svg`,
        "utf8",
      );
      expect(map).toMatch(/>Speed \[rpm\]</);
      expect((map.match(/<g class="overlay"[ >]/g) ?? []).length).toBe(2);
      const cuts = await readFile(`${dir}/out/figures/cabin_orders_cuts.svg`, "utf8");
      expect(cuts).toMatch(/>Level \[dB\(A\) re 20 µPa\]</);
      // The rear mounts: the FRF matrix with multiple coherence and principal components, and
      // the ranked path contributions with their band levels (companion files from the plan).
      const matrix = manifest.steps.find((s: { id: string }) => s.id === "mount_matrix");
      expect(Object.keys(matrix.outputs).sort()).toEqual(["out", "partial-out", "principal-out"]);
      for (const figure of ["mount_matrix_multiple_coherence", "mount_matrix_principal"]) {
        expect(existsSync(`${dir}/out/figures/${figure}.svg`), figure).toBe(true);
      }
      const paths = JSON.parse(await readFile(`${dir}/out/mount_paths.json`, "utf8"));
      expect(paths.metadata.ranking[0].paths).toHaveLength(3);
      expect(paths.metadata.transfers).toHaveLength(3);
      expect(existsSync(`${dir}/out/figures/mount_paths_contributions.svg`)).toBe(true);
      expect(existsSync(`${dir}/out/figures/mount_paths_bands.svg`)).toBe(true);
      expect(html).toMatch(/Paths ranked by energy/);
      // The seat pad and the steering wheel (invented: a few tenths of a m/s² weighted, two
      // potholes): the comfort and hand-arm steps, their targets, their report sections.
      for (const id of ["seat_av", "seat_vdv", "wheel_ahv"]) {
        expect(targets[id].pass, id).toBe(true);
      }
      const seat = JSON.parse(await readFile(`${dir}/out/seat_comfort.json`, "utf8"));
      // The pothole's jolt on z, at a crest factor above 9 (ISO 2631-1 6.2.1), is flagged.
      expect(seat.metadata.rows[2].flags).toContain("crest>9");
      for (const figure of ["seat_comfort_running_rms", "wheel_hand_arm_running_rms"]) {
        expect(existsSync(`${dir}/out/figures/${figure}.svg`), figure).toBe(true);
      }
      expect(html).toContain("ISO 2631-1 Annex C");
      expect(html).toMatch(/not a certified measurement of a person/);
      // Speech intelligibility at the driver's ear: the index, its standard, each band's share.
      expect(targets.cabin_sii.pass).toBe(true);
      expect(html).toContain("ANSI S3.5-1997");
      expect(existsSync(`${dir}/out/figures/cabin_speech_contributions.svg`)).toBe(true);
      // The whine's tone-to-noise ratio (ECMA-418-1) along the run-up: the invented order 16 of
      // 0.05·H(f) Pa (cabin resonance 1.1 kHz, ζ 0.08) over white noise of 0.005 Pa at 8192 Hz
      // peaks near 10·lg(0.05² / (2·0.005²/8192 · Δf_c(1.1 kHz))) = 33.7 dB; the target reads
      // the highest step, which one frame's noise estimate (about ±1 dB) lifts a little.
      expect(targets.whine_tnr.status).toBe("checked");
      expect(targets.whine_tnr.value).toBeGreaterThan(32.5);
      expect(targets.whine_tnr.value).toBeLessThan(37);
      expect(targets.whine_tnr.pass).toBe(false);
      expect(existsSync(`${dir}/out/figures/cabin_whine_tones_tnr_0.svg`)).toBe(true);
    },
  );

  test(
    "a recording that fails is recorded in the manifest; the others complete; exit code 1",
    async () => {
      await writeFile(`${dir}/broken.csv`, "time_s,tacho [V],mount_acc [m/s^2]\n0,1,2\n0.1,1\n");
      const r = await variant("one_bad", (p) => {
        (p.recordings as Record<string, { file: string }>).runup.file = "broken.csv";
      });
      expect(r.code).toBe(1);
      const manifest = JSON.parse(await readFile(`${dir}/one_bad_out/manifest.json`, "utf8"));
      expect(manifest.status).toBe("failed");
      const orders = manifest.steps.find((s: { id: string }) => s.id === "mount_orders");
      expect(orders.status).toBe("failed");
      expect(orders.error).toMatch(/broken\.csv:3: row has 2 fields/);
      expect(manifest.steps.filter((s: { status: string }) => s.status === "ok")).toHaveLength(23);
    },
  );
});
