/**
 * `quiver mac`: a test mode-shape set against a simulation set.
 *
 * @module
 */
import { MAC_OUTPUTS } from "../lib/modal/mac_descriptor.ts";
import { resolve } from "node:path";
import { readFile } from "node:fs/promises";
import { z } from "npm:zod@4.6.7";
import { QuiverError } from "../lib/errors.ts";
import {
  correlateShapes,
  correlationTables,
  parsePointMap,
  readShapesFile,
} from "../lib/modal/shapes.ts";
import { formatFixed } from "../lib/format_number.ts";
import { inFile, parseCommandArgs, usageError } from "./args.ts";
import { commandHelp, option, shapeOf, specOf } from "./option_table.ts";
import { resolveFormat, writeTable } from "./output.ts";
import { OUTPUT_TABLE } from "./segment_options.ts";
import { toStderr } from "./terminal.ts";

/** One-line summary for the command list. */
export const summary = "mode-shape correlation: MAC matrix and test-to-simulation mode pairs";

const INPUTS = {
  map: option(z.string().min(1), {
    value: "MAP.csv",
    help:
      "simulation_point, simulation_direction, test_point, test_direction:\nwhich simulation degree of freedom is which test one",
    default: "match by name",
  }),
};

const OUTPUTS = {
  ...OUTPUT_TABLE,
  ...MAC_OUTPUTS,
};

const TABLE = { ...INPUTS, ...OUTPUTS };

/** The command's help text. */
export const help = commandHelp({
  usage: "quiver mac TEST_SHAPES SIM_SHAPES [options]",
  about: `The modal assurance criterion (Allemang & Brown 1982, complex-aware) of every
test mode with every simulation mode over the degrees of freedom both sets
have, and the pairing of test with simulation modes of greatest total MAC
(one-to-one, Hungarian method), with each pair's frequency shift. A pair is
ambiguous when another mode on either side has a MAC with the pair's partner
of at least 0.5 and no more than 0.05 below the pair's; it is flagged and
warned of.

Shapes files are tidy CSV: "mode, point, direction, re, im" (complex, as a
modal fit writes them; an optional frequency_hz column) or "mode,
frequency_hz, point, direction, value" (real, as a simulation exports them).
Degrees of freedom found on one side only are left out and counted.`,
  groups: [["Inputs", INPUTS], ["Output", OUTPUTS]],
  notes: `--out holds the MAC matrix, tidy: test_mode, simulation_mode, mac; its
metadata has the auto-MAC of the test set (off-diagonal values near 1 mean
too few points to tell the shapes apart) and the degrees of freedom used.`,
});

/** zod schema of the options. */
export const schema = z.strictObject(shapeOf(TABLE));

/** parseArgs spec of the options. */
export const options = specOf(TABLE);

async function text(path: string): Promise<string> {
  try {
    return await readFile(path, "utf8");
  } catch (error) {
    throw new QuiverError(
      `cannot read: ${(error as Error).message}`,
      { file: resolve(path) },
      "usage",
    );
  }
}

/** Runs the command. */
export async function run(argv: readonly string[]): Promise<void> {
  const { positionals, values } = parseCommandArgs(argv, options, schema);
  if (positionals.length !== 2) {
    usageError(
      `mac takes a test shapes file and a simulation shapes file, got ${positionals.length}`,
    );
  }
  const [testPath, simulationPath] = positionals;
  const test = await readShapesFile(testPath);
  const simulation = await readShapesFile(simulationPath);
  const map = values.map !== undefined
    ? parsePointMap(await text(values.map), { file: values.map })
    : undefined;
  const correlation = inFile(
    testPath,
    () => correlateShapes(test, simulation, map !== undefined ? { map } : {}),
  );
  const { matrix, pairs } = correlationTables(correlation, test, simulation);
  const traced = (t: typeof matrix) => ({
    ...t,
    metadata: { test: testPath, simulation: simulationPath, ...t.metadata },
  });
  await writeTable(traced(matrix), resolveFormat(values.format, values.out), values.out);
  if (values["pairs-out"] !== undefined) {
    await writeTable(
      traced(pairs),
      resolveFormat(undefined, values["pairs-out"]),
      values["pairs-out"],
    );
  }
  toStderr(
    `mac: ${test.length} test and ${simulation.length} simulation mode(s) over ${correlation.dofs.length} degree(s) of freedom` +
      `${
        correlation.testOnly.length + correlation.simulationOnly.length > 0
          ? ` (left out: ${correlation.testOnly.length} test-only, ${correlation.simulationOnly.length} simulation-only)`
          : ""
      }\n`,
  );
  for (const p of correlation.pairs) {
    const rival = p.rival === undefined
      ? ""
      : ` [ambiguous: ${p.rival.side} mode ${p.rival.mode} has MAC ${formatFixed(p.rival.mac, 3)}]`;
    toStderr(
      `  test ${p.testMode} ↔ simulation ${p.simulationMode}: MAC ${formatFixed(p.mac, 3)}` +
        (p.shiftPercent !== undefined ? `, shift ${formatFixed(p.shiftPercent, 2)} %` : "") +
        rival + "\n",
    );
  }
  for (const p of correlation.pairs) {
    if (p.rival === undefined) continue;
    const other = p.rival.side === "simulation"
      ? `simulation mode ${p.rival.mode} matches test mode ${p.testMode} almost as well`
      : `test mode ${p.rival.mode} matches simulation mode ${p.simulationMode} almost as well`;
    toStderr(
      `quiver mac: warning: the pair test ${p.testMode} ↔ simulation ${p.simulationMode} (MAC ${
        formatFixed(p.mac, 3)
      }) is ambiguous: ${other} (MAC ${
        formatFixed(p.rival.mac, 3)
      }); more points or a check of the shapes would tell them apart\n`,
    );
  }
}
