/**
 * The report section of an order analysis: the order cuts and overall
 * level against speed, and the map of level against speed and order (or
 * frequency) when the plan wrote it.
 *
 * @module
 */
import { resultMetadata } from "../../io/result_metadata.ts";
import { type Figure, lineFigure, mapFigure, withUnit } from "../figure.ts";
import type { SectionBuilder, SectionInput } from "../section.ts";
import { numbers, sideResult } from "../section_data.ts";

async function orderFigures(input: SectionInput): Promise<Figure[]> {
  const { title, result: r } = input;
  const id = input.step.id;
  const m = resultMetadata(r, "orders");
  const rpm = numbers(r.columns[0]);
  const cuts = r.columns.slice(1);
  const figures: Figure[] = [{
    name: `${id}_cuts`,
    ...lineFigure({
      title: `${title}: order cuts and overall (${m.amplitude}, ${m.method} method${
        m.weighting !== "Z" ? `, ${m.weighting}-weighted` : ""
      })`,
      x: { label: "Speed [rpm]" },
      // Levels in dB on a linear axis; amplitudes on a logarithmic one.
      y: m.db
        ? { label: withUnit("Level", cuts[0]?.unit ?? "") }
        : { label: withUnit("Amplitude", cuts[0]?.unit ?? ""), log: true, power: false },
      series: cuts.map((c) => ({
        name: c.name,
        x: rpm,
        y: numbers(c),
        dashed: c.name.endsWith("_overall"),
      })),
    }),
  }];
  const map = await sideResult(input, "map");
  if (map !== undefined && map.columns.length >= 3) {
    const mr = numbers(map.columns[0]);
    const axis = numbers(map.columns[1]);
    const values = numbers(map.columns[2]);
    const steps = [...new Set(mr)];
    const perStep = axis.length / steps.length;
    const y = Array.from(axis.subarray(0, perStep));
    const z = steps.map((_, i) =>
      values.slice(i * perStep, (i + 1) * perStep).map((v) => 20 * Math.log10(v))
    );
    const unit = map.columns[2].unit;
    figures.push({
      name: `${id}_map`,
      ...mapFigure({
        title: `${title}: ${map.columns[2].name}, level against speed and ${
          map.columns[1].name === "order" ? "order" : "frequency"
        }`,
        xLabel: "Speed [rpm]",
        yLabel: map.columns[1].name === "order" ? "Order [-]" : "Frequency [Hz]",
        zLabel: `dB re 1 ${unit}`,
        x: steps,
        y,
        z,
      }),
    });
  }
  return figures;
}

/** The section of an orders step. */
export const section: SectionBuilder = async (input) => ({
  heading: input.title,
  note: input.note,
  figures: await orderFigures(input),
});
