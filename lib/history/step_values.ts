/**
 * The key values of a run's steps, for the history: every target quantity
 * the step's analysis declares in its descriptor (lib/analyses.ts: overall
 * levels, Leq, modes, a_w, MAC, …), read by the descriptor's own reader for
 * every channel (or axis) and mode the result names. No command is named
 * here: an analysis that declares quantities is recorded.
 *
 * @module
 */
import type { AnalysisTable } from "../analyses.ts";
import type { ResultTable } from "../io/result_file.ts";
import type { QuantityOf, QuantityValue } from "../quantity_reading.ts";

/** One key value of a step. */
export interface StepValue {
  readonly stepId: string;
  readonly command: string;
  readonly quantity: string;
  /** The channel (or axis) it was read for; "" when the reader needed none. */
  readonly channel: string;
  /** The mode it was read for; 0 when the reader needed none. */
  readonly mode: number;
  readonly value: number;
  /** What it was judged on, when the reader says (e.g. which mode). */
  readonly basis?: string;
}

/** Bounds on what is tried per result: a result naming more is recorded for its first ones. */
const MOST_NAMES = 64;

/** Channel (or axis) names and mode numbers the result's metadata names. */
function namesIn(metadata: unknown): { channels: string[]; modes: number[] } {
  const channels = new Set<string>();
  const modes = new Set<number>();
  const visit = (value: unknown, depth: number) => {
    if (depth > 6 || value === null || typeof value !== "object") return;
    if (Array.isArray(value)) {
      for (const item of value) visit(item, depth + 1);
      return;
    }
    for (const [key, item] of Object.entries(value)) {
      if ((key === "channel" || key === "axis") && typeof item === "string" && item !== "") {
        if (channels.size < MOST_NAMES) channels.add(item);
      } else if ((key === "mode" || key === "test_mode") && Number.isInteger(item)) {
        if (modes.size < MOST_NAMES && (item as number) > 0) modes.add(item as number);
      } else visit(item, depth + 1);
    }
  };
  visit(metadata, 0);
  return { channels: [...channels], modes: [...modes].sort((a, b) => a - b) };
}

/**
 * The key values of one step's result: each quantity of its analysis read
 * with no channel or mode, then for each channel and mode the result names;
 * a reading that repeats one with fewer of them (the reader ignored the
 * channel or mode) is left out, and so is one the reader refuses.
 *
 * @example
 * ```ts
 * import { stepValues } from "./step_values.ts";
 * import { analysisTable } from "../analyses.ts";
 * import { oneChannel } from "../quantity_reading.ts";
 * import { z } from "npm:zod@4.6.7";
 * const levels = [{ channel: "front", db: 71.5 }, { channel: "rear", db: 65 }];
 * const toy = analysisTable([{
 *   name: "toy", load: () => Promise.reject(new Error()), metadata: z.unknown(),
 *   quantities: { peak_db: (_r, of) => {
 *     const name = oneChannel(levels.map((l) => l.channel), of.channel, "peak");
 *     return { value: levels.find((l) => l.channel === name)!.db };
 *   } },
 * }]);
 * const result = { file: "t.json", columns: [], metadata: { levels } };
 * const values = await stepValues("cabin", "toy", result, toy);
 * // Two channels: the reader refuses to choose without one, so one value per channel.
 * if (values.map((v) => `${v.channel}=${v.value}`).join() !== "front=71.5,rear=65") throw new Error();
 * ```
 */
export async function stepValues(
  stepId: string,
  command: string,
  result: ResultTable,
  table: AnalysisTable,
): Promise<StepValue[]> {
  const quantities = table.get(command)?.quantities ?? {};
  const { channels, modes } = namesIn(result.metadata);
  const ofs: QuantityOf[] = [{}];
  for (const mode of modes) ofs.push({ mode });
  for (const channel of channels) {
    ofs.push({ channel });
    for (const mode of modes) ofs.push({ channel, mode });
  }
  const values: StepValue[] = [];
  for (const [quantity, read] of Object.entries(quantities)) {
    const kept: { of: QuantityOf; got: QuantityValue }[] = [];
    for (const of of ofs) {
      let got: QuantityValue;
      try {
        got = await read(result, of);
      } catch {
        continue; // this reader does not give it for that channel or mode
      }
      if (!Number.isFinite(got.value)) continue;
      const repeats = kept.some((k) =>
        (k.of.channel === undefined || k.of.channel === of.channel) &&
        (k.of.mode === undefined || k.of.mode === of.mode) &&
        Object.is(k.got.value, got.value) && k.got.basis === got.basis
      );
      if (repeats) continue;
      kept.push({ of, got });
      values.push({
        stepId,
        command,
        quantity,
        channel: of.channel ?? "",
        mode: of.mode ?? 0,
        value: got.value,
        ...(got.basis !== undefined ? { basis: got.basis } : {}),
      });
    }
  }
  return values;
}
