/**
 * A new analysis is one descriptor (kept in its own folder) and one line in
 * the table of analyses: here a toy analysis, added to a copy of the table,
 * runs as a plan step (its recording read, its side output named, its
 * options checked by its own schema) and gives a target quantity, with no
 * other change to the plan schema, the runner or the targets.
 */
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { z } from "npm:zod@4.6.7";
import { option, shapeOf, specOf } from "../../cli/option_table.ts";
import { numberOption, parseCommandArgs } from "../../cli/args.ts";
import { RECORDING_TABLE } from "../../cli/recording_options.ts";
import { OUTPUT_TABLE } from "../../cli/segment_options.ts";
import { type AnalysisDescriptor, sideOutput } from "../../lib/analysis_descriptor.ts";
import { ANALYSES, analysisTable } from "../../lib/analyses.ts";
import { finiteValue } from "../../lib/quantity_reading.ts";
import { checkPlan, runPlan } from "../../lib/plan/runner.ts";
import { planCommandTable } from "../../cli/plan_commands.ts";
import { writeReport } from "../../lib/report/html_report.ts";

// The toy's "folder": its command module and its descriptor.
const toyMetadata = z.looseObject({ analysis: z.literal("toy"), peak: z.number() });
const TOY_OUTPUTS = { "peaks-out": sideOutput("json", { help: "the peaks, one per row" }) };
const TOY_TABLE = {
  gain: option(numberOption().pipe(z.number().positive("must be a positive number")), {
    value: "G",
    help: "times this",
  }),
  ...RECORDING_TABLE,
  ...OUTPUT_TABLE,
  ...TOY_OUTPUTS,
};
const toyCommand = {
  summary: "a toy analysis: its recording's peak, times the gain",
  help: "quiver toy IN --gain G",
  options: specOf(TOY_TABLE),
  schema: z.strictObject(shapeOf(TOY_TABLE)),
  async run(argv: readonly string[]) {
    const { values, positionals } = parseCommandArgs(argv, toyCommand.options, toyCommand.schema);
    const text = await readFile(positionals[0], "utf8");
    const samples = text.trim().split("\n").slice(1).map((line) => Number(line.split(",")[1]));
    const peak = samples.reduce((a, b) => Math.max(a, Math.abs(b)), 0) * (values.gain ?? 1);
    const table = (name: string, value: number) =>
      JSON.stringify({
        metadata: { analysis: "toy", peak: value },
        columns: [{ name, unit: "", values: [value] }],
      });
    await writeFile(values.out!, table("peak", peak));
    await writeFile(values["peaks-out"]!, table("peaks", peak));
  },
};
const toyDescriptor: AnalysisDescriptor = {
  name: "toy",
  load: () => Promise.resolve(toyCommand),
  metadata: toyMetadata,
  plan: { step: "analysis", reads: { recording: true } },
  outputs: TOY_OUTPUTS,
  // Its report section: the peak in words (a real one draws figures: lib/report/sections/).
  report: () =>
    Promise.resolve({
      section: (input) =>
        Promise.resolve({
          heading: input.title,
          note: input.note,
          figures: [],
          html: `<p class="toy-peak">toy peak ${toyMetadata.parse(input.result.metadata).peak}</p>`,
        }),
    }),
  quantities: {
    toy_peak: (result) => ({ value: finiteValue(toyMetadata.parse(result.metadata).peak, "peak") }),
  },
};

// The one line: the table with the toy in it.
const table = analysisTable([...ANALYSES.descriptors, toyDescriptor]);

let dir: string;
beforeAll(async () => {
  dir = await mkdtemp("/tmp/quiver-toy-");
  await writeFile(`${dir}/road.csv`, "time_s,mic [Pa]\n0,0\n0.5,1.5\n1,-2\n");
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

const plan = (gain: unknown, limit: number) => ({
  quiver_plan: 1,
  title: "toy",
  recordings: { road: { file: "road.csv", rate: 2 } },
  analyses: [{ id: "t", command: "toy", recording: "road", options: { gain } }],
  targets: [{ id: "p", type: "max", value: limit, of: { analysis: "t", quantity: "toy_peak" } }],
  report: { title: "toy" },
});
const quiet = { start() {}, end() {} };

describe("a toy analysis added as one descriptor and one table line", () => {
  test("runs as a plan step, its side output named by the runner, and its quantity checked", async () => {
    await writeFile(`${dir}/plan.json`, JSON.stringify(plan(3, 10)));
    const commands = await planCommandTable(table);
    const manifest = await runPlan(`${dir}/plan.json`, {
      outDir: `${dir}/out`,
      commands,
      table,
      progress: quiet,
      report: (outDir, manifest, plan) => writeReport(outDir, manifest, plan, table),
    });
    expect(manifest.status).toBe("ok");
    // The report found the toy's section through its descriptor.
    expect(await readFile(`${dir}/out/report.html`, "utf8")).toContain(
      '<p class="toy-peak">toy peak 6</p>',
    );
    const [step] = manifest.steps;
    expect(step.argv).toEqual([
      `${dir}/road.csv`,
      "--rate",
      "2",
      "--gain",
      "3",
      "--out",
      `${dir}/out/t.json`,
      "--peaks-out",
      `${dir}/out/t_peaks.json`,
    ]);
    expect(Object.keys(step.outputs)).toEqual(["out", "peaks-out"]);
    expect(step.outputs["peaks-out"].path).toBe("t_peaks.json");
    // |-2| × 3 = 6 ≤ 10.
    expect(manifest.targets).toMatchObject([{ id: "p", status: "checked", value: 6, pass: true }]);
  });

  test("its options are checked by its own schema, and a misspelt one gets the nearest", async () => {
    const bad = { ...plan(0, 10) };
    bad.analyses[0].options = { gain: 0, gainn: 2 } as never;
    await writeFile(`${dir}/bad.json`, JSON.stringify(bad));
    const message = await checkPlan(
      `${dir}/bad.json`,
      `${dir}/bad_out`,
      await planCommandTable(table),
      {
        table,
      },
    ).then(() => "", (error: Error) => error.message);
    expect(message).toContain(
      'plan key analyses[0].options.gainn: toy has no option "gainn"; did you mean "gain"?',
    );
    expect(message).toContain("plan key analyses[0].options.gain: must be a positive number");
  });

  test("without its line in the table, quiver's plan schema does not know it", async () => {
    await writeFile(`${dir}/plain.json`, JSON.stringify(plan(3, 10)));
    const message = await checkPlan(
      `${dir}/plain.json`,
      `${dir}/plain_out`,
      await planCommandTable(),
    )
      .then(() => "", (error: Error) => error.message);
    expect(message).toMatch(/plan key analyses\[0\]\.command: unknown command "toy"/);
    expect(message).toMatch(/plan key targets\[0\]\.of\.quantity: unknown quantity "toy_peak"/);
  });
});
