/**
 * The tonal prominence analysis (ECMA-418-1), as the command table, plans
 * and targets see it; and its target quantity `tnr_db`, which names its tone
 * by `of.frequency_hz` (the tone nearest it) or, against rpm, by `of.order`
 * (the highest TNR of that order over the rpm steps).
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import type { ResultTable } from "../io/result_file.ts";
import { formatNumber } from "../format_number.ts";
import { oneChannel, type QuantityOf, type QuantityValue } from "../quantity_reading.ts";
import { lazyImport } from "../lazy_import.ts";

/** tones' side outputs (its option table spreads them in). */
export const TONES_OUTPUTS = {
  "spectrum-out": sideOutput("json", {
    help:
      "the averaged PSD the tones were found in (against time):\nfrequency_hz, then one column per channel",
    onlyWith: (options) => options.against !== "rpm",
  }),
};

const column = (result: ResultTable, name: string) => {
  const c = result.columns.find((c) => c.name === name);
  if (c === undefined) throw new Error(`the result has no column "${name}"`);
  return c.values;
};
const numeric = (result: ResultTable, name: string): Float64Array => {
  const v = column(result, name);
  if (!(v instanceof Float64Array)) throw new Error(`column "${name}" is not numeric`);
  return v;
};

/**
 * The TNR a target reads from a tones result: against rpm, the highest TNR
 * of `of.order` (needed when the result has several orders) over the rpm
 * steps; against time, the TNR of the tone nearest `of.frequency_hz` (within
 * half its critical band), or without it the highest TNR of the channel.
 *
 * @throws {Error} naming what is missing or ambiguous.
 *
 * @example
 * ```ts
 * import { tnrOf } from "./tones_descriptor.ts";
 * const result = { file: "t.json", metadata: { analysis: "tones", against: "time", standard: "", criterion: "tnr",
 *   min_tnr_db: 0, criteria_range_hz: [89.1, 11220], orders: [], channels: [], rate_hz: 1, block: 1, df_hz: 1, safety: "" },
 *   columns: [{ name: "channel", unit: "", values: ["mic", "mic"] },
 *     { name: "frequency_hz", unit: "Hz", values: new Float64Array([500, 1200]) },
 *     { name: "tnr_db", unit: "dB", values: new Float64Array([12, 9]) }] };
 * if ((await tnrOf(result, {})).value !== 12) throw new Error();
 * if ((await tnrOf(result, { frequencyHz: 1190 })).value !== 9) throw new Error();
 * ```
 */
export async function tnrOf(result: ResultTable, of: QuantityOf): Promise<QuantityValue> {
  // Loaded when a target asks: the table of analyses loads at start-up.
  const { TONES_METADATA } = await lazyImport<typeof import("./tones_metadata.ts")>(
    "./tones_metadata.ts",
    import.meta.url,
  );
  const { criticalBandwidth } = await lazyImport<typeof import("./critical_band.ts")>(
    "./critical_band.ts",
    import.meta.url,
  );
  const m = TONES_METADATA.parse(result.metadata);
  const channels = column(result, "channel") as readonly string[];
  const channel = oneChannel(channels, of.channel, "tone");
  const tnr = numeric(result, "tnr_db");
  const f = numeric(result, "frequency_hz");
  const mine = (i: number) => channels[i] === channel && Number.isFinite(tnr[i]);
  let best = -1;
  if (m.against === "rpm") {
    if (of.frequencyHz !== undefined) {
      throw new Error("a tones result against rpm names its tone by of.order, not of.frequency_hz");
    }
    const order = of.order ?? (m.orders.length === 1 ? m.orders[0] : undefined);
    if (order === undefined || !m.orders.includes(order)) {
      throw new Error(
        `name one of the result's orders (${m.orders.join(", ")}) in of.order`,
      );
    }
    const orders = numeric(result, "order"), rpm = numeric(result, "rpm");
    for (let i = 0; i < tnr.length; i++) {
      if (mine(i) && orders[i] === order && (best < 0 || tnr[i] > tnr[best])) best = i;
    }
    if (best < 0) throw new Error(`no finite TNR of order ${order} in the result`);
    return {
      value: tnr[best],
      basis: `order ${formatNumber(order)} at ${formatNumber(rpm[best])} rpm (its highest TNR)`,
    };
  }
  if (of.order !== undefined) {
    throw new Error("a tones result against time names its tone by of.frequency_hz, not of.order");
  }
  for (let i = 0; i < tnr.length; i++) {
    if (!mine(i)) continue;
    if (of.frequencyHz !== undefined) {
      const d = Math.abs(f[i] - of.frequencyHz);
      if (
        d <= criticalBandwidth(of.frequencyHz) / 2 &&
        (best < 0 || d < Math.abs(f[best] - of.frequencyHz))
      ) {
        best = i;
      }
    } else if (best < 0 || tnr[i] > tnr[best]) best = i;
  }
  if (best < 0) {
    throw new Error(
      of.frequencyHz !== undefined
        ? `no tone within half a critical band of ${formatNumber(of.frequencyHz)} Hz`
        : "no tone in the result",
    );
  }
  return { value: tnr[best], basis: `tone at ${formatNumber(f[best])} Hz` };
}

/** `quiver tones`: tonal prominence, ECMA-418-1. */
export const tonesDescriptor: AnalysisDescriptor = {
  name: "tones",
  load: () =>
    lazyImport<typeof import("../../cli/tones.ts")>("../../cli/tones.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./tones_metadata.ts")>("./tones_metadata.ts", import.meta.url).then((
      m,
    ) => m.TONES_METADATA),
  report: () =>
    lazyImport<typeof import("../report/sections/tones.ts")>(
      "../report/sections/tones.ts",
      import.meta.url,
    ),
  plan: { step: "analysis", reads: { recording: true } },
  outputs: TONES_OUTPUTS,
  quantities: { tnr_db: tnrOf },
};
