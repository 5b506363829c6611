/**
 * A modal fit as tables: modes, shapes (tidy), the stability chart, and
 * measured against synthesised FRFs, each with the fit's metadata.
 *
 * @module
 */
import type { Table, TableColumn } from "../io/table.ts";
import type { ModalFitResult } from "./modal_fit.ts";
import type { ModalMetadata } from "./modal_metadata.ts";

/** The method as written into the metadata. */
export const MODAL_METHOD =
  "LSCF common-denominator poles (Guillaume, Verboven, Vanlanduit, Van der Auweraer & Peeters, IMAC XXI, 2003); residues by least squares (LSFD) with complex upper and lower residuals; MPC (Pappa, Elliott & Schenk 1993)";

/**
 * The fit as tables: modes, shapes (tidy), stability, and measured against
 * synthesised FRFs.
 *
 * @example
 * ```ts
 * import { modalTables } from "./modal_tables.ts";
 * const t = modalTables({ modes: [{ mode: 1, frequencyHz: 50, dampingRatio: 0.02, mpc: 1, shape: [{ re: 1, im: 0 }], flags: [],
 *   stableOrders: 12, ordersSpanned: 14, frequencySpreadPercent: 0.1, dampingSpreadPercent: 3 }],
 *   dofs: [{ point: "1", direction: "z" }], stability: [], frequencies: new Float64Array([50]),
 *   measured: [{ re: new Float64Array([0]), im: new Float64Array([1]) }], synthesis: [{ re: new Float64Array([0]), im: new Float64Array([1]) }],
 *   relativeError: new Float64Array([0]), warnings: [] }, {});
 * if (t.modes.columns[1].values[0] !== 50 || t.shapes.columns[1].values[0] !== "1") throw new Error();
 * if (t.modes.columns[5].values[0] !== 12) throw new Error();
 * ```
 */
export function modalTables(
  result: ModalFitResult,
  settings: Readonly<Record<string, unknown>>,
): {
  modes: Table<ModalMetadata, Float64Array | readonly string[]>;
  shapes: Table<ModalMetadata, Float64Array | readonly string[]>;
  stability: Table<ModalMetadata>;
  synthesis: Table<ModalMetadata>;
} {
  const metadata: ModalMetadata = {
    analysis: "modal",
    method: MODAL_METHOD,
    shape_normalisation: "largest component real and 1",
    ...settings,
    dofs: result.dofs,
    fit_relative_error: Array.from(result.relativeError),
    modes: result.modes.map(({ shape: _s, ...m }) => m),
    unexplained_peaks: (result.unexplainedPeaks ?? []).map((p) => ({
      frequency_hz: p.frequencyHz,
      prominence_db: p.prominenceDb,
      coherence: p.coherence ?? null,
    })),
    warnings: result.warnings,
  };
  const num = (
    name: string,
    unit: string,
    values: ArrayLike<number>,
  ): TableColumn<Float64Array> => ({
    name,
    unit,
    values: Float64Array.from(values),
  });
  const shapeRows = result.modes.flatMap((m) =>
    m.shape.map((c, i) => ({ m, c, dof: result.dofs[i] }))
  );
  // Receptance's unit: metres per the FRF's input unit (what follows its last "/").
  const inputUnit = /\/([^/()]+)$/.exec(result.unit ?? "")?.[1];
  const unit = inputUnit === undefined ? "" : `m/${inputUnit}`;
  const dofName = (i: number) =>
    `${result.dofs[i].point}${
      result.dofs[i].direction === "" ? "" : `_${result.dofs[i].direction}`
    }`;
  return {
    modes: {
      columns: [
        num("mode", "", result.modes.map((m) => m.mode)),
        num("frequency_hz", "Hz", result.modes.map((m) => m.frequencyHz)),
        num("damping_ratio", "", result.modes.map((m) => m.dampingRatio)),
        num("mpc", "", result.modes.map((m) => m.mpc)),
        { name: "flags", unit: "", values: result.modes.map((m) => m.flags.join(" ")) },
        num("stable_orders", "", result.modes.map((m) => m.stableOrders)),
        num("orders_spanned", "", result.modes.map((m) => m.ordersSpanned)),
        num("frequency_spread", "%", result.modes.map((m) => m.frequencySpreadPercent)),
        num("damping_spread", "%", result.modes.map((m) => m.dampingSpreadPercent)),
      ],
      metadata,
    },
    shapes: {
      columns: [
        num("mode", "", shapeRows.map((r) => r.m.mode)),
        { name: "point", unit: "", values: shapeRows.map((r) => r.dof.point) },
        { name: "direction", unit: "", values: shapeRows.map((r) => r.dof.direction) },
        num("re", "", shapeRows.map((r) => r.c.re)),
        num("im", "", shapeRows.map((r) => r.c.im)),
        num("frequency_hz", "Hz", shapeRows.map((r) => r.m.frequencyHz)),
      ],
      metadata: { ...metadata, layout: "tidy: one row per (mode, degree of freedom)" },
    },
    stability: {
      columns: [
        num("order", "", result.stability.map((p) => p.order)),
        num("frequency_hz", "Hz", result.stability.map((p) => p.frequencyHz)),
        num("damping_ratio", "", result.stability.map((p) => p.dampingRatio)),
        num("stable_frequency", "", result.stability.map((p) => Number(p.stableFrequency))),
        num("stable_damping", "", result.stability.map((p) => Number(p.stableDamping))),
        num("stable_shape", "", result.stability.map((p) => Number(p.stableShape))),
        num("mode", "", result.stability.map((p) => p.mode)),
      ],
      metadata: { ...metadata, layout: "one row per pole and model order" },
    },
    synthesis: {
      columns: [
        num("frequency_hz", "Hz", result.frequencies),
        ...result.dofs.flatMap((_, i) => [
          num(`${dofName(i)}_measured_re`, unit, result.measured[i].re),
          num(`${dofName(i)}_measured_im`, unit, result.measured[i].im),
          num(`${dofName(i)}_synth_re`, unit, result.synthesis[i].re),
          num(`${dofName(i)}_synth_im`, unit, result.synthesis[i].im),
        ]),
      ],
      metadata: {
        ...metadata,
        layout: "receptance, measured beside synthesised, per degree of freedom",
      },
    },
  };
}
