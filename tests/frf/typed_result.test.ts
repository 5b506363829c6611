import { mkdtemp } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { frequencyResponse } from "../../lib/frf/frf_analysis.ts";
import { readFrfFile } from "../../lib/modal/frf_input.ts";
import { writeCsvPair } from "../../lib/io/table_file.ts";
import { formatCsv, formatJson } from "../../lib/io/table.ts";
import { writeFile } from "node:fs/promises";
import { gaussianNoise } from "../helpers/random.ts";

// The typed FRF an analysis returns and the FRF read back from its table files must be the
// same numbers: the table is only the edge. CSV numbers are shortest round-trip, so equal.
describe("an FRF result, typed and through its table files", () => {
  test("frequencies, H, |H|, coherence and form agree exactly, in JSON and in CSV + sidecar", async () => {
    const force = gaussianNoise(3, 1 << 14);
    const acc = force.map((v, i) => 0.7 * v + (i > 0 ? 0.2 * force[i - 1] : 0));
    const vel = force.map((v, i) => 0.1 * v - (i > 1 ? 0.05 * force[i - 2] : 0));
    const result = await frequencyResponse({
      rate: 1000,
      startTime: 0,
      channels: [
        { name: "force", unit: "N", data: force },
        { name: "acc", unit: "m/s^2", data: acc },
        { name: "vel", unit: "m/s", data: vel },
      ],
    }, { input: "force", outputs: ["acc", "vel"], block: 256, form: "receptance" });
    const dir = await mkdtemp("/tmp/quiver-typed-");
    await writeFile(`${dir}/frf.json`, formatJson(result.table));
    await writeCsvPair(
      `${dir}/frf.csv`,
      formatCsv(result.table),
      result.table.columns,
      result.table.metadata as Record<string, unknown>,
    );
    for (const file of ["frf.json", "frf.csv"]) {
      const back = await readFrfFile(`${dir}/${file}`);
      expect(Array.from(back.frequencies), file).toEqual(Array.from(result.frf.frequencies));
      // receptance from m/s^2 divides by (jω)²: the 0 Hz line is dropped in both.
      expect(result.frf.frequencies[0]).toBeGreaterThan(0);
      expect(back.channels.map((c) => c.name)).toEqual(["acc", "vel"]);
      back.channels.forEach((c, i) => {
        const typed = result.frf.channels[i];
        expect(c.form).toBe("receptance");
        expect(typed.form).toBe("receptance");
        expect(c.unit).toBe(typed.unit);
        expect(Array.from(c.re!)).toEqual(Array.from(typed.re!));
        expect(Array.from(c.im!)).toEqual(Array.from(typed.im!));
        expect(Array.from(c.magnitude)).toEqual(Array.from(typed.magnitude));
        expect(Array.from(c.coherence!)).toEqual(Array.from(typed.coherence!));
      });
    }
  });
});
