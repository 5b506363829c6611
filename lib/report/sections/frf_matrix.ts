/**
 * The report section of an FRF matrix (an frf or hammer step with several
 * inputs): |H| of each output against every input, the multiple coherence
 * of each output, and, when the plan wrote them, the principal components
 * of the inputs.
 *
 * @module
 */
import { numericColumn, type ResultTable } from "../../io/result_file.ts";
import { resultMetadata } from "../../io/result_metadata.ts";
import { type Figure, frequencyDomain, lineFigure, withUnit } from "../figure.ts";
import type { SectionBuilder, SectionInput } from "../section.ts";
import { numbers, requiredColumn, sideResult } from "../section_data.ts";

/** Whether a result is an FRF matrix (which an frf or a hammer step may write). */
export function isFrfMatrix(r: ResultTable): boolean {
  return r.metadata?.analysis === "frf_matrix";
}

async function frfMatrixFigures(input: SectionInput): Promise<Figure[]> {
  const { title, result: r } = input;
  const id = input.step.id;
  const m = resultMetadata(r, "frf_matrix");
  const f = numbers(r.columns[0]);
  const domain = frequencyDomain(f);
  const column = (name: string) => requiredColumn(r, name, "the FRF matrix");
  const figures: Figure[] = m.outputs.map((o) => {
    const series = m.inputs.map((x) => ({
      name: `${o.name}/${x.name}`,
      x: f,
      y: column(`${o.name}/${x.name}_mag`).values,
    }));
    return {
      name: `${id}_${o.name}_matrix`,
      ...lineFigure({
        title:
          `${title}: |H| of ${o.name} per input (h1, ${m.inputs.length} inputs, ${m.averages} averages)`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: {
          label: withUnit("|H|", column(`${o.name}/${m.inputs[0].name}_mag`).unit),
          log: true,
          power: false,
        },
        series,
      }),
    };
  });
  figures.push({
    name: `${id}_multiple_coherence`,
    ...lineFigure({
      title: `${title}: multiple coherence (share of each output the inputs explain together)`,
      x: { label: "Frequency [Hz]", log: true, domain },
      y: { label: "Multiple coherence γ² [-]", domain: [0, 1] },
      series: m.outputs.map((o) => ({
        name: o.name,
        x: f,
        y: column(`${o.name}_multiple_coherence`).values,
      })),
      height: 240,
    }),
  });
  const principal = await sideResult(input, "principal");
  if (principal !== undefined) {
    const pcs = m.inputs.map((_, k) => numericColumn(principal, `pc${k + 1}`));
    figures.push({
      name: `${id}_principal`,
      ...lineFigure({
        title:
          `${title}: principal components of the inputs (eigenvalues of Gxx; as many above the floor as independent sources)`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: { label: withUnit("Eigenvalue", pcs[0]?.unit ?? ""), log: true },
        series: pcs.flatMap((c, k) =>
          c === undefined ? [] : [{ name: `pc${k + 1}`, x: f, y: c.values }]
        ),
      }),
    });
  }
  return figures;
}

/** The section of a step whose result is an FRF matrix. */
export const section: SectionBuilder = async (input) => ({
  heading: input.title,
  note: input.note,
  figures: await frfMatrixFigures(input),
});
