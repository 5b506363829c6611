/**
 * The quiver command line: `deno run -A cli/main.ts <command> [options]`.
 *
 * Exit codes: 0 success, 1 bad data, 2 wrong usage, 3 internal error,
 * 4 targets not met (only when asked for with --require-targets).
 * Errors print one line without a stack trace unless `--debug` is given.
 *
 * @module
 */
import process from "node:process";
import { toStderr } from "./terminal.ts";
import { EXIT_DATA, EXIT_DONE, EXIT_INTERNAL, EXIT_USAGE } from "./exit_codes.ts";
import { QuiverError } from "../lib/errors.ts";
import { QUIVER_VERSION } from "../lib/version.ts";
import { COMMAND_NAMES, isCommandName, loadCommand, loadCommands } from "./commands.ts";

export { COMMAND_NAMES };

/** The main help, with every command's summary (loads every command module). */
async function mainHelp(): Promise<string> {
  const commands = await loadCommands();
  return `quiver: NVH test data from raw time histories to trustworthy numbers

Usage: quiver <command> [options]      (quiver <command> --help for details)

Commands:
${Object.entries(commands).map(([name, c]) => `  ${name.padEnd(12)} ${c.summary}`).join("\n")}

Every command takes --help, and --debug to show a stack trace on error.
quiver --version prints the version.
Exit codes: 0 done, 1 bad data, 2 wrong usage, 3 internal error,
4 targets not met (run and damping, only with --require-targets).
`;
}

/** Runs quiver with the given arguments and returns the exit code. */
export async function main(argv: readonly string[]): Promise<number> {
  const debug = argv.includes("--debug");
  const [name, ...rest] = argv;
  if (name === undefined || name === "--help" || name === "-h" || name === "help") {
    process.stdout.write(await mainHelp());
    return name === undefined ? EXIT_USAGE : EXIT_DONE;
  }
  if (name === "--version" || name === "-V" || name === "version") {
    process.stdout.write(`quiver ${QUIVER_VERSION}\n`);
    return EXIT_DONE;
  }
  if (!isCommandName(name)) {
    toStderr(`quiver: unknown command "${name}"\n\n${await mainHelp()}`);
    return EXIT_USAGE;
  }
  const command = await loadCommand(name);
  if (rest.includes("--help") || rest.includes("-h")) {
    process.stdout.write(command.help);
    return EXIT_DONE;
  }
  try {
    await command.run(rest);
    // A command that finished but must report failure (e.g. a campaign step) sets the exit code.
    return typeof process.exitCode === "number" ? process.exitCode : EXIT_DONE;
  } catch (error) {
    return report(error, name, debug);
  }
}

function report(error: unknown, command: string, debug: boolean): number {
  if (debug && error instanceof Error && error.stack !== undefined) {
    process.stderr.write(`${error.stack}\n`);
  }
  if (error instanceof QuiverError) {
    toStderr(`quiver ${command}: ${error.message}\n`);
    return error.kind === "usage" ? EXIT_USAGE : EXIT_DATA;
  }
  // Library functions throw RangeError for impossible parameters, which on
  // the command line come from options. Anything else is a bug of ours.
  if (error instanceof RangeError) {
    toStderr(`quiver ${command}: ${error.message}\n`);
    return EXIT_USAGE;
  }
  const message = error instanceof Error ? error.message : String(error);
  toStderr(
    `quiver ${command}: internal error: ${message}${
      debug ? "" : " (run with --debug for the stack trace)"
    }\n`,
  );
  return EXIT_INTERNAL;
}

/**
 * `deno task quiver` runs in the checkout (the folder of deno.json); the task
 * passes the folder the user ran it from in QUIVER_TASK_CWD, and quiver works
 * there, so relative paths mean what the user meant. The variable is removed
 * so that nothing started from here inherits it.
 */
function enterTaskFolder(): void {
  const from = process.env.QUIVER_TASK_CWD;
  if (from === undefined) return;
  delete process.env.QUIVER_TASK_CWD;
  if (from === "") return;
  try {
    process.chdir(from);
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    toStderr(`quiver: cannot work in the folder the task was run from (${from}): ${message}\n`);
    process.exit(EXIT_USAGE);
  }
}

if (import.meta.main) {
  enterTaskFolder();
  // A closed pipe (`quiver spectrum … | head`) is the reader's choice, not an error.
  process.stdout.on("error", (error: { code?: string }) => {
    if (error.code === "EPIPE") process.exit(process.exitCode ?? 0);
    throw error;
  });
  process.exitCode = await main(process.argv.slice(2));
}
