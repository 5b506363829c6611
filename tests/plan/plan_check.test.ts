/**
 * Plan checking names every problem at once, each with its key path and what
 * is allowed (or the nearest name), and nothing that only follows from
 * another problem.
 */
import { existsSync } from "node:fs";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { planCommandTable } from "../../cli/plan_commands.ts";
import { checkPlan, type PlanCommand } from "../../lib/plan/runner.ts";
import { runQuiver } from "../helpers/cli.ts";

let dir: string;
let commands: Readonly<Record<string, PlanCommand>>;
beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-plan-check-");
  const csv = "time_s,mic [Pa]\n0,0\n0.001,1\n0.002,0\n0.003,-1\n";
  await writeFile(`${dir}/road.csv`, csv);
  await writeFile(`${dir}/tunnel.csv`, csv);
  commands = await planCommandTable();
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

const recordings = { road: { file: "road.csv" }, tunnel: { file: "tunnel.csv" } };

/** The problem lines of checking `plan` (in-process; the nearest names are the command line's). */
async function problemsOf(name: string, plan: Record<string, unknown>): Promise<string[]> {
  await writeFile(`${dir}/${name}.json`, JSON.stringify({ quiver_plan: 1, title: name, ...plan }));
  try {
    await checkPlan(`${dir}/${name}.json`, `${dir}/${name}_out`, commands);
  } catch (error) {
    const lines = (error as Error).message.split("\n");
    // One problem: "<plan file>: plan key …"; several: a heading, then one per line.
    return lines.length === 1
      ? [lines[0].slice(lines[0].indexOf("plan key"))]
      : lines.slice(1).map((l) => l.trim());
  }
  return [];
}

describe("six planted mistakes", () => {
  test("are named all six, with key paths and allowed values, and nothing else", async () => {
    const plan = {
      quiver_plan: 1,
      title: "six mistakes",
      recordings,
      analyses: [
        // 1: a misspelt option; the step still counts as there for the comparison and target.
        { id: "road_psd", command: "spectrum", recording: "road", options: { windwo: "hann" } },
        // 2: an unknown command; the target on this step is no second problem.
        { id: "cabin", command: "spectrun", recording: "road" },
        // 3: a bad option value.
        { id: "road_rms", command: "spectrum", recording: "road", options: { kind: "rsm" } },
        // 4: a reference to a missing recording.
        { id: "tunnel_psd", command: "spectrum", recording: "tunel" },
        // 6: a duplicate id.
        { id: "road_psd", command: "spectrum", recording: "tunnel" },
      ],
      comparisons: [{ id: "road_vs_sim", test: "road_psd", simulation: { file: "road.csv" } }],
      targets: [
        // 5: a misspelt target quantity.
        { id: "t1", type: "max", value: 80, of: { analysis: "road_psd", quantity: "overal_db" } },
        { id: "t2", type: "max", value: 80, of: { analysis: "cabin", quantity: "overall_db" } },
      ],
    };
    await writeFile(`${dir}/six.json`, JSON.stringify(plan));
    const r = runQuiver(["run", `${dir}/six.json`, "--out-dir", `${dir}/six_out`]);
    expect(r.code).toBe(2);
    expect(r.stderr.split("\n").slice(1).join("\n")).toBe(
      [
        '  plan key analyses[0].options.windwo: spectrum has no option "windwo"; did you mean "window"?',
        '  plan key analyses[1].command: unknown command "spectrun"; did you mean "spectrum"? (allowed: spectrum, frf, hammer, damping, bands, level, orders, spectrogram, modal, mac, paths, comfort, hand-arm, speech, loudness, tones)',
        '  plan key analyses[2].options.kind: unknown value "rsm" (allowed: psd, power, rms, peak)',
        '  plan key analyses[3].recording: no recording "tunel" in recordings; did you mean "tunnel"? (recordings: road, tunnel)',
        '  plan key analyses[4].id: "road_psd" is used twice (analyses[0].id has it too): ids must differ',
        '  plan key targets[0].of.quantity: unknown quantity "overal_db"; did you mean "overall_db"? (allowed: first_mode_hz, mode_hz, overall_db, leq_db, lmax_db, pair_mac, pair_shift_percent, aw, mtvv, vdv, a_hv, a8, sii, loudness_sone, n5_sone, sharpness_acum, tnr_db)',
        "",
      ].join("\n"),
    );
    expect(r.stderr.split("\n")[0]).toMatch(/six\.json: the plan has 6 problems:$/);
    expect(existsSync(`${dir}/six_out`)).toBe(false);
  });
});

describe("what each problem says", () => {
  test('a target of no known type names the types and the keys each needs (no bare "Invalid input")', async () => {
    const lines = await problemsOf("types", {
      recordings,
      analyses: [{ id: "a", command: "spectrum", recording: "road" }],
      targets: [
        { id: "t1", type: "maxx", value: 1, of: { analysis: "a", quantity: "overall_db" } },
        { id: "t2", value: 1, of: { analysis: "a", quantity: "overall_db" } },
        {
          id: "t3",
          type: "limit_curve",
          limit: "max",
          of: { analysis: "a", channel: "mic" },
          points: [[1, 2]],
        },
      ],
    });
    const types =
      'type "min" or "max" checks one value (keys id, value, of: {analysis, quantity}; optional unit, description, of.channel, of.mode, of.order, of.frequency_hz); ' +
      'type "limit_curve" checks a spectrum against a curve (keys id, limit: "min" or "max", of: {analysis, channel}, points: [[Hz, value], …]; optional unit, description)';
    expect(lines).toEqual([
      `plan key targets[0].type: "maxx" is not a target type; did you mean "max"? (${types})`,
      `plan key targets[1].type: a target needs a type (${types})`,
      "plan key targets[2].points: a limit curve needs at least two points [Hz, value]",
    ]);
    expect(lines.join("\n")).not.toMatch(/Invalid input/);
  });

  test("a misspelt key gets the nearest key and the keys allowed there", async () => {
    const lines = await problemsOf("keys", {
      recordings,
      analyses: [{ id: "a", command: "spectrum", recording: "road", optoins: {} }],
    });
    expect(lines).toEqual([
      'plan key analyses[0].optoins: unknown key "optoins"; did you mean "options"? (keys here: id, command, recording, input, inputs, geometry, simulation, map, title, options)',
    ]);
  });

  test("a misspelt step id or target analysis gets the nearest id; a later step is named as later", async () => {
    const lines = await problemsOf("refs", {
      recordings,
      analyses: [
        {
          id: "bracket_frf",
          command: "frf",
          recording: "road",
          options: { input: "mic", outputs: "mic" },
        },
        { id: "bracket_modes", command: "damping", input: "bracket_frq" },
        { id: "early", command: "damping", input: "late_frf" },
        {
          id: "late_frf",
          command: "frf",
          recording: "road",
          options: { input: "mic", outputs: "mic" },
        },
        { id: "psd", command: "spectrum", recording: "road" },
        { id: "psd_modes", command: "damping", input: "psd" },
      ],
      comparisons: [{ id: "c", test: "bracket_fr", simulation: { file: "road.csv" } }],
      targets: [
        {
          id: "t",
          type: "min",
          value: 38,
          of: { analysis: "bracket_mode", quantity: "first_mode_hz" },
        },
      ],
    });
    expect(lines).toEqual([
      'plan key analyses[1].input: "bracket_frq" is not an earlier frf or hammer analysis: no step has this id; did you mean "bracket_frf"?',
      'plan key analyses[2].input: "late_frf" is not an earlier frf or hammer analysis: it comes later in the plan, and a step takes only earlier steps\' results',
      'plan key analyses[5].input: "psd" is not an earlier frf or hammer analysis: it is a spectrum step',
      'plan key comparisons[0].test: no analysis "bracket_fr"; did you mean "bracket_frf"?',
      'plan key targets[0].of.analysis: no analysis "bracket_mode"; did you mean "bracket_modes"?',
    ]);
  });

  test("a step whose own entry is broken is no second problem for the steps that use it", async () => {
    const lines = await problemsOf("broken", {
      recordings,
      analyses: [
        {
          id: "bracket_frf",
          command: "frf",
          recording: "road",
          options: { input: "mic", outputs: "mic" },
          tittle: "x",
        },
        { id: "bracket_modes", command: "damping", input: "bracket_frf" },
      ],
      targets: [
        {
          id: "t",
          type: "min",
          value: 38,
          of: { analysis: "bracket_modes", quantity: "first_mode_hz" },
        },
      ],
    });
    expect(lines).toEqual([
      'plan key analyses[0].tittle: unknown key "tittle"; did you mean "title"? (keys here: id, command, recording, input, inputs, geometry, simulation, map, title, options)',
    ]);
  });

  test("a paths step whose transfer is misspelt: no follow-on about the --transfer the runner gives", async () => {
    const lines = await problemsOf("paths_ref", {
      recordings,
      analyses: [
        {
          id: "mount_frf",
          command: "frf",
          recording: "road",
          options: { input: "mic", outputs: "mic" },
        },
        {
          id: "paths",
          command: "paths",
          recording: "road",
          inputs: ["mount_fr"],
          options: { references: "mic", target: "mic" },
        },
      ],
    });
    expect(lines).toEqual([
      'plan key analyses[1].inputs[0]: "mount_fr" is not an earlier frf or hammer analysis: no step has this id; did you mean "mount_frf"?',
    ]);
  });

  test("two bad options of one step are both named", async () => {
    const lines = await problemsOf("two_options", {
      recordings,
      analyses: [{
        id: "a",
        command: "spectrum",
        recording: "road",
        options: { kind: "rsm", window: "han" },
      }],
    });
    // In the order of the command's options.
    expect(lines).toEqual([
      'plan key analyses[0].options.window: unknown value "han"; did you mean "hann"? (allowed: rectangular, hann, hamming, blackman-harris, flattop)',
      'plan key analyses[0].options.kind: unknown value "rsm" (allowed: psd, power, rms, peak)',
    ]);
  });
});

describe("a step id equal to another step's side output", () => {
  const orders = {
    id: "ru",
    command: "orders",
    recording: "road",
    options: { tacho: "mic", ppr: 1, channels: ["mic"] },
  };
  const spectrum = { id: "ru_map", command: "spectrum", recording: "road" };
  test("orders ru, then ru_map: the clash names ru's side output", async () => {
    const lines = await problemsOf("clash1", { recordings, analyses: [orders, spectrum] });
    expect(lines).toEqual([
      `plan key analyses[1].id: step "ru_map" (out) would write ${dir}/clash1_out/ru_map.json, which step "ru" (map-out) writes too: the map side output of step "ru" is named ru_map.json (side outputs are named <step id>_<part>); give one of the two steps another id`,
    ]);
  });
  test("ru_map first, then orders ru: the same explanation", async () => {
    const lines = await problemsOf("clash2", { recordings, analyses: [spectrum, orders] });
    expect(lines).toEqual([
      `plan key analyses[1].id: step "ru" (map-out) would write ${dir}/clash2_out/ru_map.json, which step "ru_map" (out) writes too: the map side output of step "ru" is named ru_map.json (side outputs are named <step id>_<part>); give one of the two steps another id`,
    ]);
  });
});
