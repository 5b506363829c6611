/**
 * The test-against-simulation mode pairing (MAC), as the command table,
 * plans and targets see it.
 *
 * @module
 */
import { type AnalysisDescriptor, sideOutput } from "../analysis_descriptor.ts";
import type { ResultTable } from "../io/result_file.ts";
import { finiteValue, type QuantityOf } from "../quantity_reading.ts";
import { formatNumber } from "../format_number.ts";
import { lazyImport } from "../lazy_import.ts";

// The schemas are loaded when a target asks (the table of analyses loads at start-up).
const results = () =>
  lazyImport<typeof import("../io/result_metadata.ts")>(
    "../io/result_metadata.ts",
    import.meta.url,
  );

/** mac's side outputs (its option table spreads them in). */
export const MAC_OUTPUTS = {
  "pairs-out": sideOutput("json", {
    help:
      "pairs CSV: test_mode, simulation_mode, test_hz, simulation_hz,\nshift_percent, mac, ambiguous, rival_simulation_mode,\nrival_test_mode, rival_mac (one row per paired test mode)",
  }),
};

/**
 * The pair of test mode `mode` (1-based). A pair the shapes do not tell
 * apart from its rival is no basis for a verdict: a PASS on it may be a
 * PASS on the wrong mode.
 */
async function pairOf(result: ResultTable, { mode }: QuantityOf) {
  const wanted = mode ?? 1;
  const { resultMetadata } = await results();
  const pair = resultMetadata(result, "mac").pairs.find((p) => p.test_mode === wanted);
  if (pair === undefined) throw new Error(`test mode ${wanted} has no simulation pair`);
  if (pair.ambiguous === true) {
    const rival = pair.rival;
    throw new Error(
      `the pair of test mode ${wanted} with simulation mode ${pair.simulation_mode} (MAC ${
        formatNumber(pair.mac, 3)
      }) is ambiguous${
        rival !== undefined && rival !== null
          ? `: ${rival.side} mode ${rival.mode} matches almost as well (MAC ${
            formatNumber(rival.mac, 3)
          })`
          : ""
      }; more points or directions in the shapes would tell them apart`,
    );
  }
  return pair;
}

/** `quiver mac`: test modes paired with simulation modes. */
export const macDescriptor: AnalysisDescriptor = {
  name: "mac",
  load: () => lazyImport<typeof import("../../cli/mac.ts")>("../../cli/mac.ts", import.meta.url),
  metadata: () =>
    lazyImport<typeof import("./mac_metadata.ts")>("./mac_metadata.ts", import.meta.url).then((m) =>
      m.MAC_METADATA
    ),
  report: () =>
    lazyImport<typeof import("../report/sections/mac.ts")>(
      "../report/sections/mac.ts",
      import.meta.url,
    ),
  plan: {
    step: "analysis",
    reads: {
      results: {
        key: "input",
        from: ["modal"],
        output: "shapes-out",
        missing: "mac needs the id of an earlier modal analysis",
      },
      files: [
        { key: "simulation", missing: "mac needs the simulation's mode shapes" },
        // Which simulation point is which test point (simulation_point, …, test_direction).
        { key: "map", option: "map" },
      ],
      recording: false,
    },
  },
  outputs: MAC_OUTPUTS,
  quantities: {
    pair_mac: async (result, of) => ({
      value: finiteValue((await pairOf(result, of)).mac, "the pair's MAC"),
    }),
    // The shift as its magnitude, so that a `max` target bounds it either way.
    pair_shift_percent: async (result, of) => ({
      value: Math.abs(
        finiteValue((await pairOf(result, of)).shift_percent, "the pair's frequency shift"),
      ),
    }),
  },
};
