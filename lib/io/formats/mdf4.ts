/**
 * ASAM MDF 4 recordings (a data logger's files): one channel group is one
 * recording. The block chain is read at opening (mdf4_file.ts), the samples
 * record by record in chunks when the stream is read (DT blocks in chunks,
 * DZ blocks inflated one at a time: mdf4_data.ts), each channel decoded
 * and converted to its physical value (mdf4_records.ts,
 * mdf4_conversions.ts). The time axis comes from the group's time master
 * (mdf4_time.ts). What quiver does not read is refused by name when its
 * group is asked for and listed by `quiver info`.
 *
 * @module
 */
import { open } from "node:fs/promises";
import { QuiverError } from "../../errors.ts";
import { formatNumber } from "../../format_number.ts";
import { Mdf4Blocks } from "../mdf4_blocks.ts";
import { applyConversion } from "../mdf4_conversions.ts";
import { dataLength, type DataPiece, dataPieces, dataSegments } from "../mdf4_data.ts";
import { type Mdf4Group, readMdf4Structure } from "../mdf4_file.ts";
import { decodeChannel, RecordSplitter } from "../mdf4_records.ts";
import { type GroupTiming, groupTiming, MasterStepCheck } from "../mdf4_time.ts";
import { CHUNK_ROWS, type RecordingStream } from "../recording_source.ts";
import {
  channelTransforms,
  type DescribedGroup,
  type FormatOptions,
  type RecordingDescription,
  type RecordingFormat,
} from "./format.ts";
import { MDF4_HEAD } from "./signatures.ts";

/** How `--group` names a group: its name when it has one no other group shares, else its index. */
function groupLabel(group: Mdf4Group, all: readonly Mdf4Group[]): string {
  const unique = group.name !== "" && all.filter((g) => g.name === group.name).length === 1;
  return unique ? group.name : String(group.index);
}

/**
 * The groups in words, for a message: `"engine" (1000 Hz, 3 channels, 2000 records)`, and
 * `"CAN1" (not read)` for a group quiver does not read.
 */
function listGroups(groups: readonly DescribedGroup[], found: readonly Mdf4Group[]): string {
  return groups.map((g, i) => {
    if (found[i].problems.length > 0) return `"${g.name}" (not read)`;
    const rate = g.rate === null ? "rate found on reading" : `${formatNumber(g.rate, 10)} Hz`;
    const n = g.channels.length;
    return `"${g.name}" (${rate}, ${n} channel${n === 1 ? "" : "s"}, ${g.samples} records)`;
  }).join(", ");
}

/** Everything about a file quiver found at opening. */
interface Opened {
  readonly blocks: Mdf4Blocks;
  readonly groups: readonly Mdf4Group[];
  readonly described: readonly DescribedGroup[];
  readonly group: Mdf4Group;
  readonly pieces: readonly DataPiece[];
  readonly timing: GroupTiming;
}

/** The pieces of a group's data, checked against its records when sorted. */
async function piecesOf(blocks: Mdf4Blocks, group: Mdf4Group): Promise<DataPiece[]> {
  const pieces = await dataPieces(blocks, group.dg);
  const bytes = dataLength(pieces);
  if (group.idBytes === 0 && bytes !== group.records * group.recordBytes) {
    blocks.fail(
      `the data of channel group "${
        groupLabel(group, [group])
      }" holds ${bytes} bytes, but its ${group.records} records of ${group.recordBytes} bytes need ${
        group.records * group.recordBytes
      }`,
    );
  }
  return pieces;
}

/** A group as `quiver info` lists it; the rate when found without a pass over the data. */
async function describeGroup(
  blocks: Mdf4Blocks,
  group: Mdf4Group,
  all: readonly Mdf4Group[],
): Promise<DescribedGroup> {
  let rate: number | null = null;
  if (
    group.problems.length === 0 &&
    (group.master?.kind === "virtual" || (group.master !== null && group.idBytes === 0))
  ) {
    rate = (await groupTiming(blocks, group, await piecesOf(blocks, group), undefined))?.rate ??
      null;
  }
  return {
    name: groupLabel(group, all),
    samples: group.records,
    rate,
    channels: group.channels.map((c, i) => ({ position: i + 1, name: c.name, unit: c.unit })),
  };
}

/** The group `options.group` names, else the only readable group with samples. */
function pickGroup(
  blocks: Mdf4Blocks,
  groups: readonly Mdf4Group[],
  described: readonly DescribedGroup[],
  wanted: string | undefined,
): Mdf4Group {
  const usage = (detail: string): never => {
    throw new QuiverError(detail, { file: blocks.path }, "usage");
  };
  if (groups.length === 0) blocks.fail("the file holds no channel group");
  let group: Mdf4Group | undefined;
  if (wanted !== undefined) {
    const named = groups.filter((g) => g.name === wanted);
    if (named.length > 1) {
      usage(
        `${named.length} channel groups are named "${wanted}"; name one by its index (1–${groups.length})`,
      );
    }
    group = named[0] ??
      (/^[1-9][0-9]*$/.test(wanted) ? groups[Number(wanted) - 1] : undefined);
    if (group === undefined) {
      usage(`no channel group "${wanted}"; the file holds ${listGroups(described, groups)}`);
    }
  } else {
    const candidates = groups.filter((g) => g.records > 0 && g.problems.length === 0);
    if (candidates.length !== 1) {
      usage(
        `${
          candidates.length === 0
            ? "no channel group quiver reads holds samples"
            : `${candidates.length} channel groups hold samples`
        }; name one with --group: ${listGroups(described, groups)}`,
      );
    }
    group = candidates[0];
  }
  const g = group as Mdf4Group;
  if (g.problems.length > 0) {
    blocks.fail(
      `channel group "${groupLabel(g, groups)}" is not read by quiver: ${g.problems.join("; ")}`,
    );
  }
  return g;
}

async function withFile<T>(path: string, work: (blocks: Mdf4Blocks) => Promise<T>): Promise<T> {
  const handle = await open(path, "r");
  try {
    return await work(new Mdf4Blocks(handle, path, (await handle.stat()).size));
  } finally {
    await handle.close();
  }
}

/** Opens the structure, picks the group and finds its time axis. */
async function openStructure(
  blocks: Mdf4Blocks,
  options: Omit<FormatOptions, "setup">,
): Promise<Opened> {
  const usage = (detail: string): never => {
    throw new QuiverError(detail, { file: blocks.path }, "usage");
  };
  if (options.timeColumn !== undefined) {
    usage(
      "an MDF 4 file has no time column; its time master gives the time (do not give --time-column)",
    );
  }
  const groups = await readMdf4Structure(blocks);
  const described = await Promise.all(groups.map((g) => describeGroup(blocks, g, groups)));
  const group = pickGroup(blocks, groups, described, options.group);
  const label = groupLabel(group, groups);
  if (group.master !== null && options.rate !== undefined) {
    usage(`channel group "${label}" has a time master, which gives its rate; do not give one`);
  }
  const pieces = await piecesOf(blocks, group);
  const timing = await groupTiming(blocks, group, pieces, options.rate);
  if (timing === null) {
    if (group.master === null) {
      usage(`channel group "${label}" has no time master: give its sample rate (--rate HZ)`);
    }
    blocks.fail(
      `channel group "${label}" holds ${group.records} record${
        group.records === 1 ? "" : "s"
      }: too few for a rate from its time master`,
    );
  }
  return { blocks, groups, described, group, pieces, timing: timing as GroupTiming };
}

/** What quiver does not read in the file, in words, for `quiver info`. */
function unsupportedOf(groups: readonly Mdf4Group[]): string[] {
  return groups.filter((g) => g.problems.length > 0).map((g) =>
    `channel group "${groupLabel(g, groups)}": ${g.problems.join("; ")}`
  );
}

async function openMdf4(path: string, options: FormatOptions): Promise<RecordingStream> {
  const opened = await withFile(path, (blocks) => openStructure(blocks, options));
  const { group, pieces, timing } = opened;
  const transforms = await channelTransforms(
    group.channels.map((c) => ({ name: c.name, unit: c.unit })),
    options,
  );
  const tolerance = options.timeTolerance ?? 0.01;
  return {
    rate: timing.rate,
    startTime: timing.startTime,
    length: group.records,
    channels: transforms.map(({ factor: _f, ...meta }) => meta),
    read(selected, onChunk) {
      return withFile(path, async (blocks) => {
        const rows = Math.max(1, Math.min(CHUNK_ROWS, group.records));
        const out = selected.map(() => new Float64Array(rows));
        const master = group.master?.kind === "stored" ? group.master.channel : null;
        const times = master === null ? null : new Float64Array(rows);
        const check = master === null
          ? null
          : new MasterStepCheck(master.name, timing.rate, tolerance, path);
        const factors = selected.map((s) => transforms[s].factor);
        let first = 0;
        const splitter = new RecordSplitter({
          idBytes: group.idBytes,
          lengths: group.lengths,
          target: group.recordId,
          rows,
          file: path,
        }, (bytes, count) => {
          if (first + count > group.records) return; // counted and refused at the end
          const chunk = selected.map((s, j) => {
            const channel = group.channels[s];
            const values = out[j].subarray(0, count);
            decodeChannel(bytes, group.recordBytes, count, channel.layout, values);
            if (channel.invalidBit !== null) refuseInvalid(bytes, count, channel, first);
            applyConversion(channel.conversion, values);
            const f = factors[j];
            for (let i = 0; i < count; i++) {
              const v = values[i] * f;
              if (v - v !== 0) {
                throw new QuiverError(
                  `channel "${channel.name}", record ${first + i + 1}: ${
                    values[i]
                  } is not a finite number`,
                  { file: path },
                );
              }
              values[i] = v;
            }
            return values;
          });
          if (master !== null && times !== null && check !== null) {
            const t = times.subarray(0, count);
            decodeChannel(bytes, group.recordBytes, count, master.layout, t);
            applyConversion(master.conversion, t);
            check.push(t);
          }
          first += count;
          onChunk(chunk);
        });
        const refuseInvalid = (
          bytes: Uint8Array,
          count: number,
          channel: Mdf4Group["channels"][number],
          at: number,
        ) => {
          const bit = channel.invalidBit as number;
          const byte = group.dataBytes + (bit >> 3), mask = 1 << (bit & 7);
          for (let i = 0; i < count; i++) {
            if ((bytes[i * group.recordBytes + byte] & mask) !== 0) {
              throw new QuiverError(
                `channel "${channel.name}", record ${
                  at + i + 1
                }: the value is marked invalid; quiver reads valid samples only`,
                { file: path },
              );
            }
          }
        };
        for await (const segment of dataSegments(blocks, pieces)) splitter.push(segment);
        splitter.end();
        if (splitter.records !== group.records) {
          blocks.fail(
            `the data holds ${splitter.records} records of channel group "${
              groupLabel(group, opened.groups)
            }", which declares ${group.records}`,
          );
        }
        check?.end();
      });
    },
  };
}

/** What `quiver info` shows of an MDF 4 file: its blocks, no samples (a stored master's ends aside). */
async function describeMdf4(
  path: string,
  options: Omit<FormatOptions, "setup">,
): Promise<RecordingDescription> {
  const { groups, described, group, timing } = await withFile(
    path,
    (blocks) => openStructure(blocks, options),
  );
  return {
    delimiter: null,
    decimalMark: null,
    timeColumn: null,
    rate: timing.rate,
    rateFrom: timing.from,
    startTime: timing.startTime,
    samples: group.records,
    channels: group.channels.map((c, i) => ({ position: i + 1, name: c.name, unit: c.unit })),
    positionName: "channel",
    // The group read has its rate found now, whichever master gives it.
    groups: described.map((g, i) => groups[i] === group ? { ...g, rate: timing.rate } : g),
    unsupported: unsupportedOf(groups),
  };
}

/**
 * The ASAM MDF 4 format, told by its identification block ("MDF     4.").
 *
 * @example
 * ```ts
 * import { mdf4Format } from "./mdf4.ts";
 * if (!mdf4Format.sniff(new TextEncoder().encode("MDF     4.10    ")) || mdf4Format.label !== "MDF 4") throw new Error();
 * ```
 */
export const mdf4Format: RecordingFormat = {
  ...MDF4_HEAD,
  open: openMdf4,
  describe: describeMdf4,
};
