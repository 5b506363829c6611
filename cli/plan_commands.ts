/**
 * The commands a plan can run, as the plan runner sees them: a dry check of
 * the arguments (each command's own option schema) and the run itself.
 *
 * @module
 */
import type { PlanCommand } from "../lib/plan/runner.ts";
import { type OptionSpec, parseCommandArgs } from "./args.ts";
import * as bands from "./bands.ts";
import * as compare from "./compare.ts";
import * as damping from "./damping.ts";
import * as frf from "./frf.ts";
import * as hammer from "./hammer.ts";
import * as level from "./level.ts";
import * as orders from "./orders.ts";
import * as spectrum from "./spectrum.ts";
import * as spectrogram from "./spectrogram.ts";
import type { z } from "npm:zod@4.6.7";

interface CommandModule {
  options: OptionSpec;
  schema: z.ZodType;
  run(argv: readonly string[]): Promise<void>;
}

const asPlanCommand = (m: CommandModule): PlanCommand => ({
  validate: (argv) => void parseCommandArgs(argv, m.options, m.schema),
  run: m.run,
});

/** The plan runner's command table. */
export const PLAN_COMMAND_TABLE: Readonly<Record<string, PlanCommand>> = {
  spectrum: asPlanCommand(spectrum),
  frf: asPlanCommand(frf),
  hammer: asPlanCommand(hammer),
  damping: asPlanCommand(damping),
  bands: asPlanCommand(bands),
  level: asPlanCommand(level),
  orders: asPlanCommand(orders),
  spectrogram: asPlanCommand(spectrogram),
  compare: asPlanCommand(compare as unknown as CommandModule),
};
