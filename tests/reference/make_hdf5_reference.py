"""Generates HDF5 and MATLAB v7.3 fixtures and their expected contents for quiver's reader tests.

Run from the project root with Debian's Python (it has python3-h5py):
    /usr/bin/python3 tests/reference/make_hdf5_reference.py

Every file is written by h5py. The MAT v7.3 file imitates the layout MATLAB writes
with `save -v7.3`, as documented of the format and known from its files (from
memory, not checked against a file MATLAB wrote): an HDF5 file behind a 512-byte
user block that starts with the text "MATLAB 7.3 MAT-file, ..." padded with spaces
to 116 bytes, 8 bytes of subsystem offset, the version 0x0200 and the endian mark
"IM"; each variable a dataset at the root with a fixed-length text attribute
MATLAB_class, its dimensions reversed (MATLAB is column-major: a 1×N row vector is
an N×1 dataset, an N×1 column vector a 1×N one, a scalar 1×1); char as uint16 and
logical as uint8 with MATLAB_int_decode; a struct as a group with MATLAB_class
"struct".

The same samples are written as CSV (17 significant digits, so every double comes
back exact) for the test that the two paths give the same spectrum. Expected values
in fixtures/reference/hdf5_reference.json are numpy's, not quiver's.
"""
import json
import sys
import time
from pathlib import Path

import h5py
import numpy as np

ROOT = Path(__file__).resolve().parents[2]
OUT = ROOT / "fixtures/recordings/hdf5"
REF = ROOT / "fixtures/reference/hdf5_reference.json"
N = 2048
RATE = 1024.0


def samples(seed: int, n: int = N, dtype=np.float64) -> np.ndarray:
    rng = np.random.default_rng(seed)
    t = np.arange(n) / RATE
    x = np.sin(2 * np.pi * (50 + 10 * seed) * t) + 0.1 * rng.standard_normal(n)
    return x.astype(dtype)


def fixed_text(value: str) -> np.bytes_:
    """A fixed-length ASCII text, as MATLAB writes its attributes."""
    return np.bytes_(value.encode("ascii"))


def write_csv(path: Path, columns: dict, rate: float) -> None:
    names = list(columns)
    rows = ["time_s," + ",".join(names)]
    for i in range(len(next(iter(columns.values())))):
        rows.append(repr(i / rate) + "," + ",".join(repr(float(columns[c][i])) for c in names))
    path.write_text("\n".join(rows) + "\n")


def summary(x: np.ndarray) -> dict:
    x = np.asarray(x, dtype=np.float64)
    return {"n": int(x.size), "first": [float(v) for v in x[:3]], "last": float(x[-1]),
            "sum": float(np.sum(x)), "at_1000": float(x[1000])}


def main() -> None:
    OUT.mkdir(parents=True, exist_ok=True)
    ref = {"provenance": {
        "script": "tests/reference/make_hdf5_reference.py",
        "h5py": h5py.__version__, "hdf5": h5py.version.hdf5_version, "numpy": np.__version__,
        "python": sys.version.split()[0], "written": time.strftime("%Y-%m-%d"),
    }, "files": {}}

    # Two groups: the rate on the group (road) or on each dataset (rig); units at the dataset;
    # rig's force gzip-compressed in chunks (with shuffle), and a text dataset not read.
    road_x, road_y = samples(1), samples(2)
    rig_f = samples(3, dtype=np.float32)
    rig_a = (samples(4) * 1000).astype(np.int16)
    with h5py.File(OUT / "two_groups.h5", "w") as f:
        road = f.create_group("road")
        road.attrs["sample_rate"] = RATE
        road.create_dataset("acc_x", data=road_x).attrs["unit"] = "g"
        road.create_dataset("acc_y", data=road_y).attrs["units"] = "g"
        rig = f.create_group("rig")
        d = rig.create_dataset("force", data=rig_f, chunks=(256,), compression="gzip",
                               shuffle=True)
        d.attrs["sample_rate"] = 2 * RATE
        d.attrs["unit"] = "N"
        d = rig.create_dataset("accel", data=rig_a)
        d.attrs["sample_rate"] = 2 * RATE
        d.attrs["unit"] = "m/s^2"
        rig.create_dataset("notes", data="fixture, bench shaker rig")
    ref["files"]["two_groups.h5"] = {
        "groups": {"/road": {"rate": RATE, "samples": N, "channels": ["acc_x", "acc_y"],
                             "units": ["g", "g"]},
                   "/rig": {"rate": 2 * RATE, "samples": N, "channels": ["accel", "force"],
                            "units": ["m/s^2", "N"]}},
        "acc_x": summary(road_x), "force": summary(rig_f), "accel": summary(rig_a),
    }

    # A time dataset and no rate attribute; the rate comes from the times.
    log_a = samples(5)
    with h5py.File(OUT / "time_dataset.h5", "w") as f:
        g = f.create_group("log")
        g.create_dataset("time_s", data=10.0 + np.arange(N) / RATE)
        g.create_dataset("mic", data=log_a).attrs["unit"] = "Pa"
    ref["files"]["time_dataset.h5"] = {"rate": RATE, "start": 10.0, "samples": N,
                                       "mic": summary(log_a)}

    # A 2-D dataset, samples × channels, names and units as lists; the rate on the root group.
    m = np.column_stack([samples(6), samples(7), samples(8)])
    with h5py.File(OUT / "matrix.h5", "w") as f:
        f.attrs["sample_rate"] = RATE
        d = f.create_group("daq").create_dataset("data", data=m, chunks=(512, 3),
                                                 compression="gzip")
        d.attrs["channel_names"] = ["front", "rear", "seat"]
        d.attrs["units"] = ["m/s^2", "m/s^2", "g"]
    ref["files"]["matrix.h5"] = {"rate": RATE, "samples": N,
                                 "channels": ["front", "rear", "seat"],
                                 "seat": summary(m[:, 2]), "front": summary(m[:, 0])}

    # Mixed lengths in one group.
    with h5py.File(OUT / "mixed_lengths.h5", "w") as f:
        g = f.create_group("bad")
        g.attrs["sample_rate"] = RATE
        g.create_dataset("long", data=samples(9, 120))
        g.create_dataset("short", data=samples(9, 100))

    # A compressed chunk that does not inflate: 16 bytes inverted inside chunk 3.
    with h5py.File(OUT / "bad_chunk.h5", "w") as f:
        g = f.create_group("run")
        g.attrs["sample_rate"] = RATE
        g.create_dataset("acc", data=samples(10), chunks=(256,), compression="gzip")
    with h5py.File(OUT / "bad_chunk.h5", "r") as f:
        info = f["run/acc"].id.get_chunk_info(3)
        offset, size = int(info.byte_offset), int(info.size)
    raw = bytearray((OUT / "bad_chunk.h5").read_bytes())
    for k in range(16):
        raw[offset + size // 2 + k] ^= 0xFF
    (OUT / "bad_chunk.h5").write_bytes(bytes(raw))
    ref["files"]["bad_chunk.h5"] = {"chunk": 3, "first": 768, "last": 1023,
                                    "chunk_offset": offset, "chunk_bytes": size}

    # A file cut short: the first half of two_groups.h5.
    whole = (OUT / "two_groups.h5").read_bytes()
    (OUT / "truncated.h5").write_bytes(whole[: len(whole) // 2])
    ref["files"]["truncated.h5"] = {"holds": len(whole) // 2, "declares": len(whole)}

    # MAT v7.3: a row vector, a column vector, fs, a time vector t, text, logical, a struct.
    acc, mic = samples(11), samples(12, dtype=np.float32)
    path = OUT / "recording.mat"
    with h5py.File(path, "w", userblock_size=512) as f:
        def var(name, data, cls, **extra):
            d = f.create_dataset(name, data=data)
            d.attrs["MATLAB_class"] = fixed_text(cls)
            for k, v in extra.items():
                d.attrs[k] = v
            return d
        var("acc", acc.reshape(N, 1), "double")  # MATLAB 1×N row vector
        var("mic", mic.reshape(1, N), "single")  # MATLAB N×1 column vector
        var("fs", np.array([[RATE]]), "double")
        var("t", (np.arange(N) / RATE).reshape(N, 1), "double")
        var("label", np.frombuffer("run 7".encode("utf-16-le"), dtype=np.uint16).reshape(5, 1),
            "char", MATLAB_int_decode=np.int32(2))
        var("ok", np.array([[1]], dtype=np.uint8), "logical", MATLAB_int_decode=np.int32(1))
        s = f.create_group("meta")
        s.attrs["MATLAB_class"] = fixed_text("struct")
        d = s.create_dataset("gain", data=np.array([[2.0]]))
        d.attrs["MATLAB_class"] = fixed_text("double")
    header = (f"MATLAB 7.3 MAT-file, Platform: GLNXA64, Created on: "
              f"{time.strftime('%a %b %d %H:%M:%S %Y')} HDF5 schema 1.00 .").encode("ascii")
    block = header.ljust(116, b" ") + b" " * 8 + bytes([0x00, 0x02]) + b"IM"
    raw = bytearray(path.read_bytes())
    raw[: len(block)] = block
    path.write_bytes(bytes(raw))
    ref["files"]["recording.mat"] = {
        "rate": RATE, "samples": N, "channels": ["acc", "mic"],
        "not_read": ["label", "ok", "meta"], "acc": summary(acc), "mic": summary(mic),
    }

    # The same samples as CSV: road's two channels, and the MAT-file's.
    write_csv(OUT / "road_same_samples.csv", {"acc_x [g]": road_x, "acc_y [g]": road_y}, RATE)
    write_csv(OUT / "mat_same_samples.csv", {"acc": acc, "mic": mic}, RATE)

    REF.write_text(json.dumps(ref, indent=1) + "\n")
    print(f"wrote {len(list(OUT.iterdir()))} files to {OUT} and {REF}")


if __name__ == "__main__":
    main()
