import { describe, expect, test } from "vitest";
import { loadCommands } from "../../cli/commands.ts";
import { PLAN_COMMANDS } from "../../lib/plan/schema.ts";
import { ANALYSES } from "../../lib/analyses.ts";

describe("the one command table", () => {
  test("every option a command parses is in its --help, and nothing else is", async () => {
    for (const [name, command] of Object.entries(await loadCommands())) {
      const parsed = Object.keys(command.options);
      const shown = new Set([...command.help.matchAll(/--([a-z][a-z-]*)/g)].map((m) => m[1]));
      for (const option of parsed) expect(shown, `${name} --${option}`).toContain(option);
      // Options the help names that the parser would refuse (apart from the commands' own
      // cross-references such as "as quiver spectrum --kind rms" and "quiver run --history").
      const foreign = [...shown].filter((o) => !parsed.includes(o) && o !== "help");
      expect(foreign.filter((o) => !["kind", "history"].includes(o)), name).toEqual([]);
    }
  });

  test("every plan command is a command with an option schema", async () => {
    const commands = await loadCommands(PLAN_COMMANDS);
    for (const name of PLAN_COMMANDS) {
      const command = commands[name];
      expect(typeof command.schema.safeParse, name).toBe("function");
      // The plan runner validates plan options with the command's own schema: an unknown
      // option is refused there as on the command line.
      expect(command.schema.safeParse({ "no-such-option": "1" }).success, name).toBe(false);
    }
  });

  test("an analysis's side outputs are exactly the *-out options of its command", async () => {
    const commands = await loadCommands(ANALYSES.descriptors.map((d) => d.name));
    for (const d of ANALYSES.descriptors) {
      const parsed = Object.keys(commands[d.name].options).filter((o) => o.endsWith("-out"));
      expect(Object.keys(d.outputs ?? {}), d.name).toEqual(parsed);
    }
  });
});
