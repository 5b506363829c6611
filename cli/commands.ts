/**
 * The one list of quiver's commands, in the order of `quiver --help` and
 * README's command table. The command line, the plan runner's table and its
 * workers all take their commands from here.
 *
 * @module
 */
import * as bands from "./bands.ts";
import * as calibrate from "./calibrate.ts";
import * as compare from "./compare.ts";
import * as damping from "./damping.ts";
import * as frf from "./frf.ts";
import * as hammer from "./hammer.ts";
import * as level from "./level.ts";
import * as mac from "./mac.ts";
import * as modal from "./modal.ts";
import * as orders from "./orders.ts";
import * as paths from "./paths.ts";
import * as report from "./report.ts";
import * as run from "./run.ts";
import * as spectrogram from "./spectrogram.ts";
import * as spectrum from "./spectrum.ts";

/** The commands, by name. */
export const COMMANDS = {
  spectrum,
  spectrogram,
  frf,
  hammer,
  damping,
  modal,
  mac,
  bands,
  level,
  calibrate,
  orders,
  paths,
  compare,
  run,
  report,
} as const;

/** A command's name. */
export type CommandName = keyof typeof COMMANDS;
