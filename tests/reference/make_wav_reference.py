"""Generates WAV fixtures and their expected samples for quiver's reader tests.

Run from the project root:  python3 tests/reference/make_wav_reference.py

The files are written by scipy.io.wavfile.write where it can (16- and 32-bit
integer PCM, 32- and 64-bit float) and by hand with struct for 8-bit, 24-bit and a
WAVE_FORMAT_EXTENSIBLE header. The expected values are what scipy.io.wavfile.read
returns, divided by 2^(bits-1) (2^31 for 24-bit, which scipy left-justifies
into int32), i.e. fractions of digital full scale.
"""
import json
import struct
import sys
from pathlib import Path

import numpy as np
import scipy
from scipy.io import wavfile

ROOT = Path(__file__).resolve().parents[2]
OUT = ROOT / "fixtures/recordings/wav"
RATE = 8000
FRAMES = 64


def signals(channels: int) -> np.ndarray:
    rng = np.random.default_rng(7 + channels)
    t = np.arange(FRAMES) / RATE
    rows = [0.7 * np.sin(2 * np.pi * (440 + 110 * c) * t) + 0.05 * rng.standard_normal(FRAMES)
            for c in range(channels)]
    x = np.vstack(rows).T
    x[0, 0] = -1.0  # most negative full-scale code
    return x


def write_manual(path: Path, data: bytes, channels: int, bits: int, fmt_code: int,
                 extensible: bool = False) -> None:
    block_align = channels * bits // 8
    if extensible:
        # KSDATAFORMAT_SUBTYPE_*: the format code, then the fixed GUID tail.
        guid = struct.pack("<H", fmt_code) + bytes.fromhex("000000001000800000aa00389b71")
        fmt = struct.pack("<HHIIHHHHI", 0xFFFE, channels, RATE, RATE * block_align, block_align,
                          bits, 22, bits, 0) + guid
    else:
        fmt = struct.pack("<HHIIHH", fmt_code, channels, RATE, RATE * block_align, block_align, bits)
    pad = b"\x00" if len(data) % 2 else b""
    chunks = b"fmt " + struct.pack("<I", len(fmt)) + fmt
    chunks += b"LIST" + struct.pack("<I", 4) + b"INFO"  # an extra chunk a reader must skip
    chunks += b"data" + struct.pack("<I", len(data)) + data + pad
    path.write_bytes(b"RIFF" + struct.pack("<I", 4 + len(chunks)) + b"WAVE" + chunks)


def main() -> None:
    OUT.mkdir(parents=True, exist_ok=True)
    cases = {}
    x2 = signals(2)
    x3 = signals(3)

    i16 = np.round(x2 * 32767).astype(np.int16)
    i16[0, 0] = -32768
    wavfile.write(OUT / "pcm16_stereo.wav", RATE, i16)
    i32 = np.round(x3 * 2147483647).astype(np.int64)
    i32[0, 0] = -2147483648
    wavfile.write(OUT / "pcm32_3ch.wav", RATE, i32.astype(np.int32))
    wavfile.write(OUT / "float32_stereo.wav", RATE, x2.astype(np.float32))
    wavfile.write(OUT / "float64_3ch.wav", RATE, x3)

    i24 = np.round(x2 * 8388607).astype(np.int64)
    i24[0, 0] = -8388608
    raw = b"".join(int(v).to_bytes(4, "little", signed=True)[:3] for v in i24.reshape(-1))
    write_manual(OUT / "pcm24_stereo.wav", raw, 2, 24, 1)
    write_manual(OUT / "pcm24_stereo_extensible.wav", raw, 2, 24, 1, extensible=True)

    u8 = (np.round(x2 * 127) + 128).astype(np.uint8)
    u8[0, 0] = 0
    write_manual(OUT / "pcm8_stereo.wav", u8.tobytes(), 2, 8, 1)

    for name in ["pcm16_stereo", "pcm32_3ch", "float32_stereo", "float64_3ch", "pcm24_stereo",
                 "pcm24_stereo_extensible", "pcm8_stereo"]:
        rate, data = wavfile.read(OUT / f"{name}.wav")
        if data.dtype == np.int16:
            frac = data / 32768.0
        elif data.dtype == np.int32:
            frac = data / 2147483648.0  # 32-bit, and 24-bit left-justified by scipy
        elif data.dtype == np.uint8:
            frac = (data.astype(np.float64) - 128.0) / 128.0
        else:
            frac = data.astype(np.float64)
        cases[name] = {"rate": int(rate), "channels": frac.T.tolist()}

    doc = {
        "provenance": {
            "generator": "tests/reference/make_wav_reference.py",
            "reference": "scipy.io.wavfile.read, scaled to fractions of full scale",
            "python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__,
        },
        "files": cases,
    }
    (ROOT / "fixtures/reference/wav_reference.json").write_text(json.dumps(doc) + "\n")


if __name__ == "__main__":
    main()
