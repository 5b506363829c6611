"""Generates RF64 and BW64 fixtures (WAV beyond 4 GB, small here) and their expected samples.

Run from the project root:  python3 tests/reference/make_rf64_reference.py

The headers are written by hand with struct from the specifications:
- EBU Tech 3306 (RF64): "RF64", a RIFF size of 0xFFFFFFFF, "WAVE", then the ds64 chunk first
  (riffSize, dataSize, sampleCount as 64-bit little-endian integers, tableLength, table of
  {chunkId, 64-bit size}), then fmt and data; the data chunk's 32-bit size is 0xFFFFFFFF,
  meaning "take ds64's dataSize".
- ITU-R BS.2088 (BW64): the same ds64 layout under the id "BW64".
numpy writes the samples (integer codes or floats, little-endian, interleaved). The expected
values are those codes divided by 2^(bits-1) (8-bit: (code - 128)/128), i.e. fractions of full
scale, as tests/reference/make_wav_reference.py states them for RIFF files; and a CSV holding the
same values (repr, exact) for the spectrum check against the CSV path.
"""
import json
import struct
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
OUT = ROOT / "fixtures/recordings/rf64"
RATE = 4096
FRAMES = 512
ALL_ONES = 0xFFFFFFFF


def signals(channels: int) -> np.ndarray:
    rng = np.random.default_rng(33 + channels)
    t = np.arange(FRAMES) / RATE
    rows = [0.6 * np.sin(2 * np.pi * (200 + 150 * c) * t) + 0.1 * rng.standard_normal(FRAMES)
            for c in range(channels)]
    return np.clip(np.vstack(rows).T, -0.99, 0.99)


def fmt_chunk(channels: int, bits: int, code: int) -> bytes:
    block = channels * bits // 8
    body = struct.pack("<HHIIHH", code, channels, RATE, RATE * block, block, bits)
    return b"fmt " + struct.pack("<I", len(body)) + body


def write_64(path: Path, container: bytes, data: bytes, channels: int, bits: int, code: int,
             junk: bool = False, table: bool = False) -> None:
    fmt = fmt_chunk(channels, bits, code)
    pad = b"\x00" if len(data) % 2 else b""
    extra = b""
    entries = b""
    if junk:
        extra += b"JUNK" + struct.pack("<I", 8) + bytes(8)  # a chunk a reader must skip
    if table:
        # A chunk whose 32-bit size is 0xFFFFFFFF, its size given in ds64's table.
        extra += b"LIST" + struct.pack("<I", ALL_ONES) + b"INFO"
        entries = b"LIST" + struct.pack("<Q", 4)
    ds64_len = 28 + len(entries)
    after_riff = 4 + 8 + ds64_len + len(fmt) + len(extra) + 8 + len(data) + len(pad)
    frames = len(data) // (channels * bits // 8)
    ds64 = b"ds64" + struct.pack("<IQQQI", ds64_len, after_riff, len(data), frames,
                                 len(entries) // 12) + entries
    body = container + struct.pack("<I", ALL_ONES) + b"WAVE" + ds64 + fmt + extra
    body += b"data" + struct.pack("<I", ALL_ONES) + data + pad
    assert len(body) == 8 + after_riff
    path.write_bytes(body)


def main() -> None:
    OUT.mkdir(parents=True, exist_ok=True)
    x = signals(2)
    cases = {}

    def add(name: str, container: bytes, bits: int, code: int, **kw) -> None:
        if code == 3:
            arr = x.astype(np.float32 if bits == 32 else np.float64)
            raw, frac = arr.astype("<f%d" % (bits // 8)).tobytes(), arr.astype(np.float64)
        elif bits == 8:
            codes = (np.round(x * 127) + 128).astype(np.uint8)
            raw, frac = codes.tobytes(), (codes.astype(np.float64) - 128) / 128
        elif bits == 24:
            codes = np.round(x * 8388607).astype(np.int64)
            raw = b"".join(int(v).to_bytes(4, "little", signed=True)[:3] for v in codes.reshape(-1))
            frac = codes / 8388608.0
        else:
            full = 2 ** (bits - 1)
            codes = np.round(x * (full - 1)).astype("<i%d" % (bits // 8))
            raw, frac = codes.tobytes(), codes.astype(np.float64) / full
        write_64(OUT / f"{name}.wav", container, raw, 2, bits, code, **kw)
        cases[name] = {"container": container.decode(), "rate": RATE,
                       "channels": frac.T.tolist()}

    add("rf64_pcm8", b"RF64", 8, 1)
    add("rf64_pcm16", b"RF64", 16, 1, table=True)
    add("rf64_pcm24", b"RF64", 24, 1)
    add("rf64_pcm32", b"RF64", 32, 1)
    add("rf64_float32", b"RF64", 32, 3)
    add("rf64_float64", b"RF64", 64, 3)
    add("bw64_pcm24", b"BW64", 24, 1, junk=True)
    add("bw64_float32", b"BW64", 32, 3)

    # The float64 file's samples as CSV: the same numbers (repr round-trips a float64 exactly).
    rows = ["time_s,ch1,ch2"] + [f"{i / RATE!r},{float(a)!r},{float(b)!r}" for i, (a, b) in enumerate(x)]
    (OUT / "rf64_float64_same.csv").write_text("\n".join(rows) + "\n")

    doc = {
        "provenance": {
            "generator": "tests/reference/make_rf64_reference.py",
            "reference": "headers by hand from EBU Tech 3306 (RF64) and ITU-R BS.2088 (BW64); "
                         "samples written by numpy; expected values = codes / 2^(bits-1)",
            "python": sys.version.split()[0], "numpy": np.__version__,
        },
        "files": cases,
    }
    (ROOT / "fixtures/reference/rf64_reference.json").write_text(json.dumps(doc) + "\n")


if __name__ == "__main__":
    main()
