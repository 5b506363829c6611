import { mkdtemp, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { formatJson } from "../../lib/io/table.ts";
import { correlateShapes, correlationTables, parseShapes } from "../../lib/modal/shapes.ts";
import { planSchema } from "../../lib/plan/schema.ts";
import { evaluateTargets } from "../../lib/plan/target_eval.ts";

/**
 * Four-point shapes of our own whose MACs are set by construction: a real shape
 * (cos θ, sin θ, 0, 0) against (1, 0, 0, 0) has MAC cos²θ (Allemang & Brown 1982, for real
 * vectors). Test mode 1 matches simulation mode 1 at `first` and simulation mode 2 at `second`.
 */
function shapes(first: number, second: number) {
  const a = Math.acos(Math.sqrt(first)), b = Math.acos(Math.sqrt(second));
  const row = (mode: number, hz: number, v: readonly number[]) =>
    v.map((x, p) => `${mode},${hz},P${p + 1},+z,${x}`).join("\n");
  const head = "mode,frequency_hz,point,direction,value\n";
  return {
    test: parseShapes(head + [row(1, 40, [1, 0, 0, 0]), row(2, 90, [0, 0, 0, 1])].join("\n")),
    simulation: parseShapes(
      head + [
        row(1, 41, [Math.cos(a), Math.sin(a), 0, 0]),
        row(2, 44, [Math.cos(b), 0, Math.sin(b), 0]),
        row(3, 93, [0, 0, 0.1, 1]),
      ].join("\n"),
    ),
  };
}

async function pairTargets(first: number, second: number) {
  const dir = await mkdtemp("/tmp/quiver-target-mac-");
  const { test, simulation } = shapes(first, second);
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
