import { mkdtemp, open, writeFile } from "node:fs/promises";
import { describe, expect, test } from "vitest";
import { averagedSpectrum } from "../../lib/dsp/averaged_spectrum.ts";
import { Mdf4Blocks } from "../../lib/io/mdf4_blocks.ts";
import { readRecordingFile } from "../../lib/io/read_recording.ts";
import { openRecordingStream } from "../../lib/io/recording_stream.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { fixturePath, readJsonFixture } from "../helpers/fixtures.ts";

// Reference: tests/reference/make_mdf4_reference.py → fixtures/reference/mdf4_reference.json, the
// files built from the MDF 4 block layout typed into the script (from memory), the physical
// values computed by numpy in float64.
interface BlockRecord {
  name: string;
  id: string;
  offset: number;
  length: number;
  links: number[];
  [field: string]: unknown;
}
interface GroupRecord {
  name: string;
  rate?: number;
  /** The group has no time master: its rate is given when reading. */
  rate_given?: boolean;
  start?: number;
  records?: number;
  unsupported?: string;
  channels?: { name: string; unit: string; values: number[] }[];
}
interface Mdf4Reference {
  files: Record<string, { bytes: number; blocks: BlockRecord[]; groups: GroupRecord[] }>;
}
const reference = readJsonFixture<Mdf4Reference>("reference/mdf4_reference.json");
const pathOf = (name: string) => fixturePath(`recordings/mdf4/${name}`);

describe("MDF 4 blocks: each block's fields where the layout puts them", () => {
  // The script's own record of what it wrote (offsets, lengths, links, fields) against what the
  // block reader finds at each offset.
  for (const [name, file] of Object.entries(reference.files)) {
    test(name, async () => {
      const handle = await open(pathOf(name));
      try {
        const blocks = new Mdf4Blocks(handle, name, file.bytes);
        for (const b of file.blocks) {
          const got = await blocks.block(b.offset, [b.id], b.name);
          expect([got.id, got.length, got.links], b.name).toEqual([b.id, b.length, b.links]);
          const d = got.data;
          if (b.id === "TX") expect(await blocks.text(b.offset, b.name)).toBe(b.text);
          if (b.id === "DG") expect(d.getUint8(0)).toBe(b.rec_id_size);
          if (b.id === "CG") {
            expect([
              Number(d.getBigUint64(0, true)),
              Number(d.getBigUint64(8, true)),
              d.getUint16(16, true),
              d.getUint32(24, true),
              d.getUint32(28, true),
            ], b.name).toEqual([b.record_id, b.cycle_count, b.flags, b.data_bytes, b.inval_bytes]);
          }
          if (b.id === "CN") {
            expect([
              d.getUint8(0),
              d.getUint8(1),
              d.getUint8(2),
              d.getUint8(3),
              d.getUint32(4, true),
              d.getUint32(8, true),
              d.getUint32(12, true),
            ], b.name).toEqual([
              b.type,
              b.sync_type,
              b.data_type,
              b.bit_offset,
              b.byte_offset,
              b.bit_count,
              b.flags,
            ]);
          }
          if (b.id === "CC") {
            const count = d.getUint16(6, true);
            const values = Array.from({ length: count }, (_, i) => d.getFloat64(24 + 8 * i, true));
            expect([d.getUint8(0), values], b.name).toEqual([b.type, b.values]);
          }
          if (b.id === "DZ") {
            expect([
              String.fromCharCode(d.getUint8(0), d.getUint8(1)),
              d.getUint8(2),
              d.getUint32(4, true),
              Number(d.getBigUint64(8, true)),
              Number(d.getBigUint64(16, true)),
            ], b.name).toEqual([
              "DT",
              b.zip_type,
              b.zip_parameter,
              b.org_data_length,
              b.data_length,
            ]);
          }
          if (b.id === "DL") {
            expect([d.getUint8(0), d.getUint32(4, true)], b.name).toEqual([b.flags, b.count]);
            const listed = b.flags === 1
              ? [Number(d.getBigUint64(8, true))]
              : Array.from({ length: b.count as number }, (_, i) =>
                Number(d.getBigUint64(8 + 8 * i, true)));
            expect(listed).toEqual(b.flags === 1 ? [b.equal_length] : b.offsets);
          }
        }
      } finally {
        await handle.close();
      }
    });
  }
});

describe("MDF 4 channel groups read as numpy computed their physical values", () => {
  for (const [name, file] of Object.entries(reference.files)) {
    for (const group of file.groups.filter((g) => g.channels !== undefined)) {
      test(`${name}, group "${group.name}": rate, start, units and values to 1e-12`, async () => {
        const rec = await readRecordingFile(pathOf(name), {
          group: group.name,
          ...(group.rate_given === true ? { rate: group.rate } : {}),
        });
        expect(rec.rate).toBeCloseTo(group.rate as number, 9);
        assertClose(
          rec.startTime,
          group.start as number,
          { relative: 0, absolute: 1e-12 },
          "start",
        );
        expect(rec.channels.map((c) => [c.name, c.unit])).toEqual(
          group.channels!.map((c) => [c.name, c.unit]),
        );
        rec.channels.forEach((c, i) => {
          assertClose(
            c.data,
            group.channels![i].values,
            { relative: 1e-12, absolute: 1e-12 },
            c.name,
          );
        });
      });
    }
  }

  test("a group is named by its index as well; without --group, the only readable group with samples", async () => {
    const byIndex = await readRecordingFile(pathOf("unsorted_dl.mf4"), { group: "2" });
    expect(byIndex.channels.map((c) => c.name)).toEqual(["c"]);
    const only = await readRecordingFile(pathOf("zipped_hl.mf4"));
    expect(only.channels.map((c) => c.name)).toEqual(["level", "count"]);
  });

  test("chunks and slices: a time slice of a DZ-compressed group is the reference's stretch", async () => {
    // 512 Hz from 0.5 s: 1.0–1.5 s is samples 256–511.
    const group = reference.files["zipped_hl.mf4"].groups[0];
    const rec = await readRecordingFile(pathOf("zipped_hl.mf4"), { start: 1.0, end: 1.5 });
    assertClose(
      rec.channels[1].data,
      group.channels![1].values.slice(256, 512),
      { relative: 1e-12, absolute: 0 },
      "count",
    );
  });
});

describe("the same samples as CSV and as MDF 4 give the same spectrum", () => {
  test("sorted_dt.mf4 against a CSV of the reference values: to 1e-9 relative", async () => {
    // The CSV holds numpy's values (17 significant digits) with the time axis of the group.
    const group = reference.files["sorted_dt.mf4"].groups[0];
    const channels = group.channels!;
    const rows = [`time_s,${channels.map((c) => `${c.name} [${c.unit}]`).join(",")}`];
    for (let i = 0; i < (group.records as number); i++) {
      const t = (group.start as number) + i / (group.rate as number);
      rows.push([t, ...channels.map((c) => c.values[i])].map((v) => v.toPrecision(17)).join(","));
    }
    const dir = await mkdtemp("/tmp/quiver-mdf4-");
    await writeFile(`${dir}/same.csv`, `${rows.join("\n")}\n`);
    const options = { block: 128, kind: "psd" as const };
    const fromCsv = await averagedSpectrum(await openRecordingStream(`${dir}/same.csv`), options);
    const fromMdf = await averagedSpectrum(
      await openRecordingStream(pathOf("sorted_dt.mf4")),
      options,
    );
    expect(fromMdf.columns.map((c) => c.name)).toEqual(fromCsv.columns.map((c) => c.name));
    fromCsv.columns.forEach((c, i) => {
      const scale = Math.max(...c.values.map(Math.abs));
      assertClose(
        fromMdf.columns[i].values,
        c.values,
        { relative: 1e-9, absolute: 1e-9 * scale },
        c.name,
      );
    });
  });
});
