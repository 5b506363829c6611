"""Generates MAT v5 fixtures and the values an independent reader finds in them.

Run from the project root:  python3 tests/reference/make_mat5_reference.py

Files (fixtures/recordings/mat/):
- shaker_f64.mat, shaker_f64_z.mat: scipy.io.savemat, float64 row vectors, a scalar `fs`,
  `<name>_unit` char variables, and a struct and a char variable that quiver lists as not read;
  without and with compression (do_compression).
- shaker_f32_z.mat: float32 vectors, compressed, rate from a float64 time vector `t`.
- shaker_i16.mat: int16 column vectors (oned_as="column"), scalar `sample_rate`.
- shaker_matrix_z.mat: a 2-D samples x channels float64 matrix `acc` (N x 3) and `fs`, compressed.
- shaker_be.mat, shaker_be_z.mat: big-endian ("MI"), written by hand with struct from MATLAB's documented Level 5
  layout (128-byte header, tags, array flags, dimensions, name in the small-element form for
  names of up to 4 bytes, real part), float64 and int32 vectors and a float64 scalar `fs`; the _z
  one with each variable's element deflated by zlib inside an miCOMPRESSED element.
- mixed_lengths.mat: two float64 vectors of different lengths (refused).
- shaker_f64_same.csv: shaker_f64.mat's samples as CSV (repr, exact), for the spectrum check.
Expected values: scipy.io.loadmat reading each file back (for the hand-written big-endian file
too), as float64; the rate and where it comes from are what this script wrote.
"""
import json
import struct
import sys
import zlib
from pathlib import Path

import numpy as np
import scipy
import scipy.io

ROOT = Path(__file__).resolve().parents[2]
OUT = ROOT / "fixtures/recordings/mat"
RATE = 1024
N = 512


def signals(channels: int, seed: int) -> np.ndarray:
    rng = np.random.default_rng(seed)
    t = np.arange(N) / RATE
    return np.vstack([0.8 * np.sin(2 * np.pi * (60 + 90 * c) * t) + 0.2 * rng.standard_normal(N)
                      for c in range(channels)])


def element(mtype: int, data: bytes, small_ok: bool = False) -> bytes:
    """A big-endian data element: tag then data padded to 8 bytes (small form when allowed)."""
    if small_ok and len(data) <= 4:
        return struct.pack(">HH", len(data), mtype) + data + bytes(4 - len(data))
    return struct.pack(">II", mtype, len(data)) + data + bytes((-len(data)) % 8)


def be_matrix(name: str, values: np.ndarray, mx_class: int, mi_type: int, dtype: str) -> bytes:
    """An miMATRIX element (big-endian) of a 1 x n real numeric row vector."""
    body = element(6, struct.pack(">II", mx_class, 0))  # miUINT32 array flags: class, no flags
    body += element(5, struct.pack(">ii", 1, values.size))  # miINT32 dimensions
    body += element(1, name.encode(), small_ok=True)  # miINT8 name
    body += element(mi_type, values.astype(dtype).tobytes())
    return struct.pack(">II", 14, len(body)) + body


def write_big_endian(path: Path, x: np.ndarray, compress: bool = False) -> None:
    text = b"MATLAB 5.0 MAT-file, written by quiver's make_mat5_reference.py (big-endian)"
    header = text.ljust(116, b" ") + bytes(8) + struct.pack(">H", 0x0100) + b"MI"
    body = be_matrix("fs", np.array([float(RATE)]), 6, 9, ">f8")  # mxDOUBLE, miDOUBLE
    body += be_matrix("wheel_z", x[0], 6, 9, ">f8")
    counts = np.round(x[1] * 1e6).astype(np.int64)
    body += be_matrix("seat_z_counts", counts, 12, 5, ">i4")  # mxINT32, miINT32
    if compress:
        # Each variable's element deflated (zlib) inside an miCOMPRESSED element, not padded.
        parts = [body[:0]]
        at = 0
        while at < len(body):
            size = struct.unpack(">I", body[at + 4:at + 8])[0]
            z = zlib.compress(body[at:at + 8 + size])
            parts.append(struct.pack(">II", 15, len(z)) + z)
            at += 8 + size
        body = b"".join(parts)
    path.write_bytes(header + body)


def main() -> None:
    OUT.mkdir(parents=True, exist_ok=True)
    x = signals(3, 5)
    extras = {"setup": {"gain": 2.0, "site": "bench shaker rig"}, "operator": "B2 rig"}
    units = {"drive_force_unit": "N", "mount_acc_unit": "m/s^2"}
    base = {"drive_force": x[0] * 50, "mount_acc": x[1], "fs": float(RATE), **units, **extras}
    expected_rate = {}
    scipy.io.savemat(OUT / "shaker_f64.mat", base, do_compression=False)
    scipy.io.savemat(OUT / "shaker_f64_z.mat", base, do_compression=True)
    expected_rate["shaker_f64"] = expected_rate["shaker_f64_z"] = [RATE, 'the variable "fs"']
    t = np.arange(N) / RATE
    scipy.io.savemat(OUT / "shaker_f32_z.mat", {
        "t": t, "drive_force": (x[0] * 50).astype(np.float32),
        "mount_acc": x[1].astype(np.float32), **units}, do_compression=True)
    expected_rate["shaker_f32_z"] = [RATE, 'the time vector "t"']
    scipy.io.savemat(OUT / "shaker_i16.mat", {
        "sample_rate": float(RATE), "mic_counts": np.round(x[2] * 8000).astype(np.int16),
        "mount_counts": np.round(x[1] * 8000).astype(np.int16)},
        do_compression=False, oned_as="column")
    expected_rate["shaker_i16"] = [RATE, 'the variable "sample_rate"']
    scipy.io.savemat(OUT / "shaker_matrix_z.mat", {"acc": x.T.copy(), "fs": float(RATE),
                                                   "acc_unit": "m/s^2"}, do_compression=True)
    expected_rate["shaker_matrix_z"] = [RATE, 'the variable "fs"']
    write_big_endian(OUT / "shaker_be.mat", x)
    expected_rate["shaker_be"] = [RATE, 'the variable "fs"']
    write_big_endian(OUT / "shaker_be_z.mat", x, compress=True)
    expected_rate["shaker_be_z"] = [RATE, 'the variable "fs"']
    scipy.io.savemat(OUT / "mixed_lengths.mat", {"a": x[0], "b": x[1][:-1], "fs": float(RATE)})

    rows = ["time_s,drive_force [N],mount_acc [m/s^2]"] + [
        f"{i / RATE!r},{float(a)!r},{float(b)!r}" for i, (a, b) in enumerate(zip(x[0] * 50, x[1]))]
    (OUT / "shaker_f64_same.csv").write_text("\n".join(rows) + "\n")

    files = {}
    for name, (rate, rate_from) in expected_rate.items():
        m = scipy.io.loadmat(OUT / f"{name}.mat")
        channels = {}
        for key, value in m.items():
            if key.startswith("__") or not isinstance(value, np.ndarray):
                continue
            if value.dtype.kind not in "iuf" or value.size < 2 or key == "t" or value.ndim != 2:
                continue
            if min(value.shape) == 1:
                channels[key] = value.reshape(-1).astype(np.float64).tolist()
            else:
                for c in range(value.shape[1]):
                    channels[f"{key}_{c + 1}"] = value[:, c].astype(np.float64).tolist()
        not_read = [k for k, v in m.items() if not k.startswith("__")
                    and isinstance(v, np.ndarray) and v.dtype.kind not in "iufU"]
        not_read += [k for k, v in m.items() if isinstance(v, np.ndarray) and v.dtype.kind == "U"
                     and not k.endswith("_unit")]
        files[name] = {"rate": rate, "rate_from": rate_from, "channels": channels,
                       "units": {k[:-5]: str(v[0]) for k, v in m.items() if k.endswith("_unit")},
                       "not_read": sorted(not_read)}

    doc = {
        "provenance": {
            "generator": "tests/reference/make_mat5_reference.py",
            "writer": "scipy.io.savemat (do_compression False/True); shaker_be.mat by hand",
            "reference": "scipy.io.loadmat reading each file back; rates as written",
            "python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__,
        },
        "files": files,
    }
    (ROOT / "fixtures/reference/mat5_reference.json").write_text(json.dumps(doc) + "\n")


if __name__ == "__main__":
    main()
