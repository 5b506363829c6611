/**
 * An MDF 4 file's structure ({@linkcode readMdf4Structure}): the chain from
 * the identification and header blocks to the data groups (DG), their
 * channel groups (CG) and channels (CN) with conversions (CC), names and
 * units (TX/MD) and sources (SI); no samples are read. What quiver does not
 * read is kept as a problem of its channel group, so that it is refused by
 * name when that group is asked for and listed by `quiver info`.
 *
 * Layouts, from memory of the standard (links first, then data):
 * - ID (64 bytes at 0): "MDF     ", version text "4.10    ", program
 *   (8), reserved (4), id_ver (u16 at 28), reserved (30), id_unfin_flags
 *   (u16 at 60), id_custom_unfin_flags (u16 at 62).
 * - HD at byte 64: links hd_dg_first, hd_fh_first, hd_ch_first,
 *   hd_at_first, hd_ev_first, hd_md_comment.
 * - DG: links dg_dg_next, dg_cg_first, dg_data, dg_md_comment; data
 *   dg_rec_id_size (u8), reserved (7).
 * - CG: links cg_cg_next, cg_cn_first, cg_tx_acq_name, cg_si_acq_source,
 *   cg_sr_first, cg_md_comment; data cg_record_id (u64), cg_cycle_count
 *   (u64), cg_flags (u16: bit 0 VLSD, 1 bus event, 2 plain bus event, 3
 *   remote master), cg_path_separator (u16), reserved (4), cg_data_bytes
 *   (u32), cg_inval_bytes (u32).
 * - CN: links cn_cn_next, cn_composition, cn_tx_name, cn_si_source,
 *   cn_cc_conversion, cn_data, cn_md_unit, cn_md_comment; data cn_type
 *   (u8), cn_sync_type (u8), cn_data_type (u8), cn_bit_offset (u8),
 *   cn_byte_offset (u32), cn_bit_count (u32), cn_flags (u32: bit 0 all
 *   invalid, 1 invalidation bit used, 10 bus event), cn_inval_bit_pos
 *   (u32), then precision, attachments and ranges.
 * - SI: links si_tx_name, si_tx_path, si_md_comment; data si_type (u8),
 *   si_bus_type (u8), si_flags (u8).
 *
 * @module
 */
import { blockName, ID_BLOCK_BYTES, type Mdf4Block, type Mdf4Blocks } from "./mdf4_blocks.ts";
import { type Conversion, conversionOf } from "./mdf4_conversions.ts";
import { type ChannelLayout, layoutBytes, layoutProblem } from "./mdf4_records.ts";

/** A channel quiver reads: name, unit, place in the record and conversion. */
export interface Mdf4Channel {
  readonly name: string;
  readonly unit: string;
  readonly layout: ChannelLayout;
  readonly conversion: Conversion;
  /** Bit of the record's invalidation bytes that marks the value invalid; null when none. */
  readonly invalidBit: number | null;
}

/** A channel group's time axis. */
export type Mdf4Master =
  | { readonly kind: "virtual"; readonly name: string; readonly conversion: Conversion }
  | { readonly kind: "stored"; readonly channel: Mdf4Channel };

/** One channel group: a recording, or what keeps quiver from reading it. */
export interface Mdf4Group {
  /** 1-based place among the file's channel groups (VLSD groups not counted). */
  readonly index: number;
  /** Acquisition name, else the acquisition source's name, else "". */
  readonly name: string;
  /** Its data group block. */
  readonly dg: Mdf4Block;
  /** dg_rec_id_size. */
  readonly idBytes: number;
  /** cg_record_id. */
  readonly recordId: number;
  /** cg_cycle_count: records. */
  readonly records: number;
  /** cg_data_bytes. */
  readonly dataBytes: number;
  /** cg_data_bytes + cg_inval_bytes. */
  readonly recordBytes: number;
  /** Bytes after the id of every record kind of its data group, by id (-1: VLSD). */
  readonly lengths: ReadonlyMap<number, number>;
  /** Its channels, the master excepted. */
  readonly channels: readonly Mdf4Channel[];
  /** Its time master; null when it has none. */
  readonly master: Mdf4Master | null;
  /** What quiver does not read in it, in words; empty when it reads the group. */
  readonly problems: readonly string[];
}

const DATA_TYPES: Record<number, string> = {
  6: "Latin-1 string",
  7: "UTF-8 string",
  8: "UTF-16 LE string",
  9: "UTF-16 BE string",
  10: "byte array",
  11: "MIME sample",
  12: "MIME stream",
  13: "CANopen date",
  14: "CANopen time",
};
const CHANNEL_TYPES: Record<number, string> = {
  1: "a variable-length signal (VLSD)",
  4: "a synchronisation channel",
  5: "a maximum-length data channel",
  6: "a virtual data channel",
};
const SYNC_TYPES = ["no", "time", "angle", "distance", "index"];

/** Walks a chain of blocks linked by their link 0, refusing a loop. */
async function chain(
  blocks: Mdf4Blocks,
  first: Mdf4Block | null,
  id: string,
  what: string,
  each: (block: Mdf4Block, i: number) => Promise<void>,
): Promise<void> {
  const seen = new Set<number>();
  let block = first;
  for (let i = 0; block !== null; i++) {
    if (seen.has(block.offset)) {
      blocks.fail(`${blockName(id, block.offset)} is linked twice: the ${what} chain loops`);
    }
    seen.add(block.offset);
    await each(block, i);
    block = await blocks.follow(block, 0, [id], `the next ${what}`);
  }
}

async function readConversion(
  blocks: Mdf4Blocks,
  cn: Mdf4Block,
): Promise<{ conversion: Conversion | string; unit: string }> {
  const cc = await blocks.follow(cn, 4, ["CC"], "its conversion");
  if (cc === null) return { conversion: { kind: "identity" }, unit: "" };
  blocks.need(cc, 24);
  const type = cc.data.getUint8(0);
  const count = cc.data.getUint16(6, true);
  blocks.need(cc, 24 + 8 * count);
  const values: number[] = [];
  for (let i = 0; i < count; i++) values.push(cc.data.getFloat64(24 + 8 * i, true));
  return {
    conversion: conversionOf(type, values),
    unit: await blocks.linkedText(cc, 1, "its conversion's unit"),
  };
}

interface ChannelFound {
  readonly channel: Mdf4Channel;
  readonly type: number;
  readonly sync: number;
  readonly problem: string | null;
}

async function readChannel(
  blocks: Mdf4Blocks,
  cn: Mdf4Block,
  cg: { dataBytes: number; invalBytes: number },
): Promise<ChannelFound> {
  blocks.need(cn, 24);
  const d = cn.data;
  const type = d.getUint8(0), sync = d.getUint8(1);
  const layout: ChannelLayout = {
    dataType: d.getUint8(2),
    bitOffset: d.getUint8(3),
    byteOffset: d.getUint32(4, true),
    bitCount: d.getUint32(8, true),
  };
  const flags = d.getUint32(12, true);
  const name = await blocks.linkedText(cn, 2, "its name");
  const { conversion, unit: ccUnit } = await readConversion(blocks, cn);
  // The channel's own unit overrules its conversion's (from memory).
  const unit = (await blocks.linkedText(cn, 6, "its unit")) || ccUnit;
  let problem: string | null = CHANNEL_TYPES[type] ?? null;
  if (problem === null && type > 6) problem = `a channel of unknown type ${type}`;
  if (problem === null && (cn.links[1] ?? 0) !== 0) problem = "a structure or array (composition)";
  if (problem === null && (flags & (1 << 10)) !== 0) problem = "a bus event";
  if (problem === null && (flags & 1) !== 0) problem = "all its values marked invalid";
  if (problem === null && typeof conversion === "string") problem = conversion;
  if (problem === null && type !== 3) {
    problem = DATA_TYPES[layout.dataType] !== undefined
      ? `a ${DATA_TYPES[layout.dataType]}`
      : layout.dataType > 5
      ? `a value of unknown data type ${layout.dataType}`
      : layoutProblem(layout);
    if (problem === null && layout.byteOffset + layoutBytes(layout) > cg.dataBytes) {
      blocks.fail(
        `${blockName(cn.id, cn.offset)} (channel "${name}") reaches byte ${
          layout.byteOffset + layoutBytes(layout)
        } of a ${cg.dataBytes}-byte record`,
      );
    }
  }
  let invalidBit: number | null = null;
  if ((flags & 2) !== 0) {
    invalidBit = d.getUint32(16, true);
    if (invalidBit >= 8 * cg.invalBytes) {
      blocks.fail(
        `${
          blockName(cn.id, cn.offset)
        } (channel "${name}") has invalidation bit ${invalidBit} in ${cg.invalBytes} invalidation bytes`,
      );
    }
  }
  return {
    channel: {
      name,
      unit,
      layout,
      conversion: typeof conversion === "string" ? { kind: "identity" } : conversion,
      invalidBit,
    },
    type,
    sync,
    problem,
  };
}

interface GroupFound extends Omit<Mdf4Group, "index" | "lengths"> {
  readonly vlsd: boolean;
}

async function readGroup(
  blocks: Mdf4Blocks,
  dg: Mdf4Block,
  idBytes: number,
  cg: Mdf4Block,
): Promise<GroupFound> {
  blocks.need(cg, 32);
  const recordId = blocks.u64(cg, 0, "record id");
  const records = blocks.u64(cg, 8, "cycle count");
  const flags = cg.data.getUint16(16, true);
  const dataBytes = cg.data.getUint32(24, true);
  const invalBytes = cg.data.getUint32(28, true);
  let name = await blocks.linkedText(cg, 2, "its acquisition name");
  const source = await blocks.follow(cg, 3, ["SI"], "its acquisition source");
  if (name === "" && source !== null) {
    name = await blocks.linkedText(source, 0, "its source's name");
  }
  const problems: string[] = [];
  if ((flags & 0b110) !== 0) problems.push("a bus-frame channel group (bus events)");
  if ((flags & 0b1000) !== 0) problems.push("a channel group with a remote master");
  if (
    source !== null && source.data.byteLength >= 2 && source.data.getUint8(0) === 2 &&
    problems.length === 0
  ) {
    problems.push("a bus-frame channel group (its source is a bus)");
  }
  const vlsd = (flags & 1) !== 0;
  const channels: Mdf4Channel[] = [];
  let master: Mdf4Master | null = null;
  if (!vlsd) {
    if (dataBytes === 0 && problems.length === 0) problems.push("a channel group of empty records");
    const first = await blocks.follow(cg, 1, ["CN"], "its first channel");
    await chain(blocks, first, "CN", "channel", async (cn) => {
      const found = await readChannel(blocks, cn, { dataBytes, invalBytes });
      const label = `channel "${found.channel.name}"`;
      if (found.type === 2 || found.type === 3) {
        if (found.sync !== 1) {
          problems.push(
            `${label}: a master of ${
              SYNC_TYPES[found.sync] ?? `sync type ${found.sync}`
            } (quiver reads time masters)`,
          );
        } else if (found.problem !== null) {
          problems.push(`${label} (time master): ${found.problem}`);
        } else if (master !== null) problems.push(`${label}: a second time master`);
        else {
          master = found.type === 3
            ? { kind: "virtual", name: found.channel.name, conversion: found.channel.conversion }
            : { kind: "stored", channel: found.channel };
        }
        return;
      }
      if (found.problem !== null) problems.push(`${label}: ${found.problem}`);
      else channels.push(found.channel);
    });
  }
  return {
    name,
    dg,
    idBytes,
    recordId,
    records,
    dataBytes,
    recordBytes: dataBytes + invalBytes,
    channels,
    master,
    problems,
    vlsd,
  };
}

/**
 * Every channel group of the file, from the identification block on.
 *
 * @throws {QuiverError} for a file that is not MDF 4, is not finalised, or
 * whose blocks are damaged (naming the block and its offset).
 */
export async function readMdf4Structure(blocks: Mdf4Blocks): Promise<Mdf4Group[]> {
  if (blocks.size < ID_BLOCK_BYTES) {
    blocks.fail(`truncated: ${blocks.size} bytes, shorter than the 64-byte identification block`);
  }
  const id = await blocks.bytes(0, ID_BLOCK_BYTES);
  const view = new DataView(id.buffer);
  const version = view.getUint16(28, true);
  if (version < 400 || version >= 500) {
    blocks.fail(`the identification block gives version ${version}; quiver reads MDF 4.x`);
  }
  const unfinished = view.getUint16(60, true) | view.getUint16(62, true);
  if (unfinished !== 0) {
    blocks.fail(
      `the identification block marks the file unfinalised (flags ${unfinished}): the logger did not close it`,
    );
  }
  const hd = await blocks.block(ID_BLOCK_BYTES, ["HD"], "the header block");
  const found: (GroupFound & { lengths: Map<number, number> })[] = [];
  const firstDg = await blocks.follow(hd, 0, ["DG"], "the first data group");
  await chain(blocks, firstDg, "DG", "data group", async (dg) => {
    blocks.need(dg, 1);
    const idBytes = dg.data.getUint8(0);
    if (![0, 1, 2, 4, 8].includes(idBytes)) {
      blocks.fail(`${blockName(dg.id, dg.offset)} gives record ids of ${idBytes} bytes`);
    }
    const lengths = new Map<number, number>();
    const firstCg = await blocks.follow(dg, 1, ["CG"], "its first channel group");
    let groups = 0;
    await chain(blocks, firstCg, "CG", "channel group", async (cg) => {
      const g = await readGroup(blocks, dg, idBytes, cg);
      if (lengths.has(g.recordId)) {
        blocks.fail(
          `${blockName(cg.id, cg.offset)} repeats record id ${g.recordId} of its data group`,
        );
      }
      lengths.set(g.recordId, g.vlsd ? -1 : g.recordBytes);
      found.push({ ...g, lengths });
      groups++;
    });
    if (idBytes === 0 && groups > 1) {
      blocks.fail(
        `${blockName(dg.id, dg.offset)} holds ${groups} channel groups without record ids`,
      );
    }
  });
  return found.filter((g) => !g.vlsd).map(({ vlsd: _v, ...g }, i) => ({ ...g, index: i + 1 }));
}
