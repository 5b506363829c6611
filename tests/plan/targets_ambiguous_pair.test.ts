import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { formatJson } from "../../lib/io/table.ts";
import { correlateShapes, correlationTables } from "../../lib/modal/shapes.ts";
import { ambiguousSets } from "../helpers/ambiguous_shapes.ts";
import { planSchema } from "../../lib/plan/schema.ts";
import { evaluateTargets } from "../../lib/plan/target_eval.ts";

async function pairTargets(first: number, second: number) {
  const dir = await mkdtemp("/tmp/quiver-target-mac-");
  const { test, simulation } = ambiguousSets(second, first);
  const { pairs } = correlationTables(correlateShapes(test, simulation), test, simulation);
  await writeFile(`${dir}/link_mac.json`, formatJson(pairs));
  const plan = planSchema.parse({
    quiver_plan: 1,
    title: "pair targets",
    recordings: { r: { file: "r.csv" } },
    analyses: [{ id: "link_mac", command: "mac", recording: "r" }],
    targets: [
      { id: "mac1", type: "min", value: 0.9, of: { analysis: "link_mac", quantity: "pair_mac" } },
      {
        id: "shift1",
        type: "max",
        value: 5,
        unit: "%",
        of: { analysis: "link_mac", quantity: "pair_shift_percent", mode: 1 },
      },
    ],
  });
  return await evaluateTargets(plan, dir, new Set());
}

describe("MAC pair targets on an ambiguous pair", () => {
  test("0.954 against a rival of 0.940: not checked, the rival named (a PASS could be on the wrong mode)", async () => {
    const [mac, shift] = await pairTargets(0.954, 0.94);
    for (const o of [mac, shift]) {
      expect(o.status).toBe("not_checked");
      if (o.status !== "not_checked") continue;
      expect(o.reason).toBe(
        "the pair of test mode 1 with simulation mode 1 (MAC 0.954) is ambiguous: simulation mode 2 matches almost as well (MAC 0.94); more points or directions in the shapes would tell them apart",
      );
    }
  });

  test("a clear pair (rival 0.900, more than 0.05 below) is judged as before", async () => {
    const [mac, shift] = await pairTargets(0.954, 0.9);
    expect(mac.status).toBe("checked");
    expect(shift.status).toBe("checked");
    if (mac.status !== "checked" || shift.status !== "checked") return;
    // MAC cos²θ by construction; shift (41 − 40) / 40 = 2.5 %.
    expect(mac.value).toBeCloseTo(0.954, 12);
    expect(mac.pass).toBe(true);
    expect(shift.value).toBeCloseTo(2.5, 12);
  });
});
