"""Where h5py says each HDF5 fixture's datasets lie: the reference for quiver's reading of contiguous
datasets' bytes straight from the file (lib/io/hdf5_storage.ts).

Run from the project root with Debian's Python (it has python3-h5py):
    /usr/bin/python3 tests/reference/make_hdf5_storage_reference.py

It writes one more fixture, fixtures/recordings/hdf5/latest_format.h5, with libver="latest"
(superblock version 3, version 2 object headers), then records for every dataset of every
fixture h5py's object header address (h5o.get_info(...).addr), its storage offset in the file
(DatasetID.get_offset(): None for chunked, compact or unwritten storage) and its storage size
(DatasetID.get_storage_size()), in fixtures/reference/hdf5_storage_reference.json. The values
are h5py's (HDF5's own), not quiver's.
"""
import json
from pathlib import Path

import h5py
import numpy as np

ROOT = Path(__file__).resolve().parents[2]
OUT = ROOT / "fixtures/recordings/hdf5"
REF = ROOT / "fixtures/reference/hdf5_storage_reference.json"


def write_latest(path: Path) -> None:
    rng = np.random.default_rng(20261205)
    with h5py.File(path, "w", libver="latest") as f:
        g = f.create_group("run")
        g.attrs["sample_rate"] = 2048.0
        a = g.create_dataset("acc", data=rng.standard_normal(3000).astype("f4"))
        a.attrs["unit"] = "m/s^2"
        # Many attributes after the layout message: the header continues in a second block.
        for k in range(40):
            a.attrs[f"note_{k:02d}"] = f"bench shaker rig, channel note {k}"
        g.create_dataset("grid", data=rng.integers(-30000, 30000, (3000, 3)).astype("<i2"))
        g.create_dataset("packed", data=rng.standard_normal(3000), chunks=(500,), compression="gzip")
        g.create_dataset("unwritten", shape=(3000,), dtype="f8")  # storage never allocated


def main() -> None:
    write_latest(OUT / "latest_format.h5")
    ref = {}
    for path in sorted(OUT.glob("*.h5")) + [OUT / "recording.mat"]:
        try:
            f = h5py.File(path, "r")
        except OSError:
            continue  # truncated.h5: HDF5 refuses it
        rows = {}

        def visit(name, obj):
            if isinstance(obj, h5py.Dataset):
                rows["/" + name] = {
                    "header": h5py.h5o.get_info(obj.id).addr,
                    "offset": obj.id.get_offset(),
                    "bytes": obj.id.get_storage_size(),
                }

        f.visititems(visit)
        f.close()
        ref[path.name] = rows
    REF.write_text(json.dumps({"generator": "h5py " + h5py.version.version, "files": ref}, indent=1) + "\n")


if __name__ == "__main__":
    main()
