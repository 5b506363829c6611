/**
 * Every command a plan can name (and `compare`, the command of a plan's
 * comparisons) has a section module in the report's table, exporting its
 * builder as `section`; a name outside the table has none.
 */
import { describe, expect, test } from "vitest";
import { PLAN_COMMANDS } from "../../lib/plan/schema.ts";
import { loaderFor } from "../../lib/report/section_loaders.ts";

describe("the report's section modules", () => {
  test.each([...PLAN_COMMANDS, "compare"])("%s has a section module", async (command) => {
    const load = loaderFor(command);
    expect(load).toBeDefined();
    const module = await load!();
    expect(typeof module.section).toBe("function");
  });

  test("a name outside the table has no section module, prototype names included", () => {
    for (const name of ["nonesuch", "toString", "constructor", "__proto__", ""]) {
      expect(loaderFor(name)).toBeUndefined();
    }
  });
});
