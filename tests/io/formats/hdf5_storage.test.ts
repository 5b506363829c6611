import { closeSync, openSync } from "node:fs";
import { mkdtemp } from "node:fs/promises";
import h5wasm from "h5wasm/node";
import { describe, expect, test } from "vitest";
import { Hdf5File } from "../../../lib/io/hdf5_file.ts";
import { contiguousStorage } from "../../../lib/io/hdf5_storage.ts";
import { collectRecording, openRecordingStream } from "../../../lib/io/recording_stream.ts";
import { fixturePath, readJsonFixture } from "../../helpers/fixtures.ts";
import { gaussianNoise } from "../../helpers/random.ts";

/** h5py's (HDF5's own) addresses, offsets and sizes: tests/reference/make_hdf5_storage_reference.py. */
const ref = readJsonFixture<{
  files: Record<string, Record<string, { header: number; offset: number | null; bytes: number }>>;
}>("reference/hdf5_storage_reference.json");
const file = (name: string) => fixturePath(`recordings/hdf5/${name}`);

describe("contiguous HDF5 datasets read straight from the file", () => {
  test("each fixture dataset's storage offset and size are h5py's (superblock 0 and 3, a 512-byte user block, object headers 1 and 2)", () => {
    let contiguous = 0, other = 0;
    for (const [name, datasets] of Object.entries(ref.files)) {
      const fd = openSync(file(name), "r");
      try {
        for (const [path, d] of Object.entries(datasets)) {
          const got = contiguousStorage(fd, d.header);
          // h5py: get_offset() is None for chunked, compact and unwritten storage.
          if (d.offset === null) {
            expect(got, `${name} ${path}`).toBeNull();
            other++;
          } else {
            expect(got, `${name} ${path}`).toEqual({ offset: d.offset, bytes: d.bytes });
            contiguous++;
          }
        }
      } finally {
        closeSync(fd);
      }
    }
    expect(contiguous).toBeGreaterThanOrEqual(15);
    expect(other).toBeGreaterThanOrEqual(4);
  });

  test("the reader takes the raw path for contiguous datasets and the library's for the others", async () => {
    const f = await Hdf5File.open(file("latest_format.h5"));
    try {
      const run = f.groups().find((g) => g.path === "/run")!;
      const by = new Map(run.datasets.map((d) => [d.name, d]));
      const r = ref.files["latest_format.h5"];
      expect(f.storageOf(by.get("acc")!)).toEqual({ offset: r["/run/acc"].offset, bytes: 12000 });
      expect(f.storageOf(by.get("grid")!)).toEqual({ offset: r["/run/grid"].offset, bytes: 18000 });
      expect(f.storageOf(by.get("packed")!)).toBeNull();
      expect(f.storageOf(by.get("unwritten")!)).toBeNull();
      // A never-written dataset reads as HDF5's fill value, 0 (HDF5 default fill), through the library.
      const out = new Float64Array(4).fill(NaN);
      f.readRows(by.get("unwritten")!, 2996, 4, out);
      expect(Array.from(out)).toEqual([0, 0, 0, 0]);
    } finally {
      f.close();
    }
  });

  test("contiguous float32, float64, int16 and 2-D datasets across read chunks come back sample for sample", async () => {
    const dir = await mkdtemp("/tmp/quiver-hdf5-raw-");
    const n = 140_003; // two read chunks of 65 536 and a part
    const x = gaussianNoise(41, n);
    const x32 = Float32Array.from(x);
    const codes = Int16Array.from(x, (v) => Math.round(v * 8000));
    const grid = new Float64Array(n * 3);
    for (let i = 0; i < grid.length; i++) grid[i] = x[i % n] + Math.floor(i / n);
    await h5wasm.ready;
    const h = new h5wasm.File(`${dir}/raw.h5`, "w");
    try {
      const g = h.create_group("run");
      g.create_attribute("sample_rate", 4096);
      g.create_dataset({ name: "a64", data: x });
      g.create_dataset({ name: "a32", data: x32 });
      g.create_dataset({ name: "codes", data: codes });
      g.create_dataset({ name: "grid", data: grid, shape: [n, 3] });
    } finally {
      h.close();
    }
    const f = await Hdf5File.open(`${dir}/raw.h5`);
    try {
      for (const d of f.groups().find((g) => g.path === "/run")!.datasets) {
        expect(f.storageOf(d), d.name).not.toBeNull();
      }
    } finally {
      f.close();
    }
    const rec = await collectRecording(await openRecordingStream(`${dir}/raw.h5`));
    const byName = new Map(rec.channels.map((c) => [c.name, c.data]));
    // The file's values widened to doubles exactly (ECMAScript's Float32Array/Int16Array reads).
    expect(byName.get("a64")).toEqual(x);
    expect(byName.get("a32")).toEqual(Float64Array.from(x32));
    expect(byName.get("codes")).toEqual(Float64Array.from(codes));
    for (let k = 0; k < 3; k++) {
      const column = byName.get(`grid_${k + 1}`)!;
      const want = new Float64Array(n);
      for (let i = 0; i < n; i++) want[i] = grid[i * 3 + k];
      expect(column, `grid column ${k + 1}`).toEqual(want);
    }
  });
});
