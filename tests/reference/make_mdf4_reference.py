"""Generates ASAM MDF 4 fixtures and their expected physical values for quiver's reader tests.

Run from the project root:  python3 tests/reference/make_mdf4_reference.py

The block layout below is typed in from the standard's block structure as recalled
(from memory), independently of quiver's reader: every block is a 24-byte header
("##" + two letters, 4 reserved bytes, u64 length, u64 link count), its links (u64
file offsets) and its data section. numpy writes the records (structured dtypes at
the channels' byte offsets) and computes the physical values (the conversions
applied in float64); zlib deflates the DZ blocks.

Files (fixtures/recordings/mdf4/):
- sorted_dt.mf4: one sorted data group, one DT block; a float64 time master at
  1000 Hz, int16 with a linear conversion, uint32 with a rational one, float32,
  big-endian float64, a signed 12-bit value at bit offset 4, an invalidation byte.
- unsorted_dl.mf4: one unsorted data group (1-byte record ids) in a DL of two DT
  blocks split inside a record: group "fast" (virtual time master, 2000 Hz, int16
  big endian and float32), group "slow" (float64 time master, 100 Hz), a group
  "notes" whose channel is a variable-length signal, and its VLSD records.
- zipped_hl.mf4: an HL, a DL of equal-length blocks: DZ deflate, DZ transposition
  then deflate, and a DT; a virtual time master at 512 Hz; uint8 and int32 channels;
  and a second data group holding a bus-frame channel group (CAN frames).
- no_master.mf4: one sorted group without a time master (its rate is given: 100 Hz), a
  big-endian uint16 whose unit is in an MD block, and a big-endian unsigned 20-bit value at
  bit offset 3 of three bytes.
The JSON (fixtures/reference/mdf4_reference.json) holds each group's rate, start,
channels with units and values, and every block's offset and fields as written.
"""
import json
import struct
import sys
import zlib
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
OUT = ROOT / "fixtures/recordings/mdf4"
REF = ROOT / "fixtures/reference/mdf4_reference.json"


class MdfFile:
    """Blocks by name, links by name, offsets assigned in order (8-byte aligned)."""

    def __init__(self):
        self.blocks = []  # (name, id, links, data, fields)

    def add(self, name, block_id, links, data, fields=None):
        self.blocks.append((name, block_id, links, data, fields or {}))

    def build(self):
        offsets, at = {}, 64
        for name, block_id, links, data, _ in self.blocks:
            offsets[name] = at
            at += 24 + 8 * len(links) + len(data)
            at += (-at) % 8
        # ID block (from memory): file id, version text, program, reserved, id_ver, reserved,
        # unfinalised flags, custom unfinalised flags.
        out = bytearray(b"MDF     " + b"4.10    " + b"qvrgen  " + bytes(4) + struct.pack("<H", 410)
                        + bytes(30) + struct.pack("<HH", 0, 0))
        assert len(out) == 64
        described = []
        for name, block_id, links, data, fields in self.blocks:
            assert len(out) == offsets[name]
            resolved = [0 if link is None else offsets[link] if isinstance(link, str) else link
                        for link in links]
            length = 24 + 8 * len(links) + len(data)
            out += b"##" + block_id.encode() + bytes(4) + struct.pack("<QQ", length, len(links))
            out += struct.pack(f"<{len(links)}Q", *resolved) + data
            out += bytes((-len(out)) % 8)
            described.append({"name": name, "id": block_id, "offset": offsets[name],
                              "length": length, "links": resolved, **fields})
        return bytes(out), described


def tx(f, name, text):
    raw = text.encode() + b"\0"
    f.add(name, "TX", [], raw + bytes((-len(raw)) % 8), {"text": text})


def hd(f, first_dg):
    # HD: dg_first, fh_first, ch_first, at_first, ev_first, md_comment; start time (ns),
    # tz and dst offsets (min), time flags, time class, flags, reserved, start angle, distance.
    f.add("hd", "HD", [first_dg, None, None, None, None, None],
          struct.pack("<QhhBBBBdd", 1_700_000_000_000_000_000, 0, 0, 0, 0, 0, 0, 0.0, 0.0))


def dg(f, name, next_dg, first_cg, data, rec_id_size):
    f.add(name, "DG", [next_dg, first_cg, data, None], struct.pack("<B7x", rec_id_size),
          {"rec_id_size": rec_id_size})


def cg(f, name, next_cg, first_cn, acq_name, source, record_id, cycles, flags, data_bytes,
       inval_bytes):
    f.add(name, "CG", [next_cg, first_cn, acq_name, source, None, None],
          struct.pack("<QQHH4xII", record_id, cycles, flags, 0, data_bytes, inval_bytes),
          {"record_id": record_id, "cycle_count": cycles, "flags": flags,
           "data_bytes": data_bytes, "inval_bytes": inval_bytes})


def cn(f, name, next_cn, tx_name, cc, unit, cn_type, sync, data_type, bit_offset, byte_offset,
       bit_count, flags=0, inval_pos=0, data=None):
    # CN links: next, composition, name, source, conversion, data, unit, comment.
    f.add(name, "CN", [next_cn, None, tx_name, None, cc, data, unit, None],
          struct.pack("<BBBBIIIIBBH6d", cn_type, sync, data_type, bit_offset, byte_offset,
                      bit_count, flags, inval_pos, 0, 0, 0, 0, 0, 0, 0, 0, 0),
          {"type": cn_type, "sync_type": sync, "data_type": data_type, "bit_offset": bit_offset,
           "byte_offset": byte_offset, "bit_count": bit_count, "flags": flags})


def cc(f, name, cc_type, values, unit=None):
    # CC links: name, unit, comment, inverse; data type, precision, flags, ref count,
    # value count, physical range min and max, then the values.
    f.add(name, "CC", [None, unit, None, None],
          struct.pack("<BBHHH2d", cc_type, 0, 0, 0, len(values), 0.0, 0.0)
          + struct.pack(f"<{len(values)}d", *values),
          {"type": cc_type, "values": list(values)})


def dz(f, name, raw, transpose_columns=0):
    data = raw
    if transpose_columns:
        rows = len(raw) // transpose_columns
        body = np.frombuffer(raw[: rows * transpose_columns], np.uint8)
        data = body.reshape(rows, transpose_columns).T.tobytes() + raw[rows * transpose_columns:]
    z = zlib.compress(data)
    f.add(name, "DZ", [], b"DT" + struct.pack("<BxIQQ", 1 if transpose_columns else 0,
                                             transpose_columns, len(raw), len(z)) + z,
          {"zip_type": 1 if transpose_columns else 0, "zip_parameter": transpose_columns,
           "org_data_length": len(raw), "data_length": len(z)})


def values(x):
    return [float(v) for v in np.asarray(x, dtype=np.float64)]


def sorted_dt():
    n, rate = 600, 1000.0
    rng = np.random.default_rng(33)
    t = 0.25 + np.arange(n) / rate
    dt = np.dtype({"names": ["t", "acc", "pres", "volt", "force", "bits", "inval"],
                   "formats": ["<f8", "<i2", "<u4", "<f4", ">f8", "<u2", "u1"],
                   "offsets": [0, 8, 10, 14, 18, 26, 28], "itemsize": 29})
    rec = np.zeros(n, dt)
    rec["t"] = t
    rec["acc"] = np.round(20000 * np.sin(2 * np.pi * 50 * t) + 500 * rng.standard_normal(n)).astype(np.int16)
    rec["pres"] = rng.integers(0, 2**32, n, dtype=np.uint64).astype(np.uint32)
    rec["volt"] = (3 * np.cos(2 * np.pi * 120 * t) + 0.1 * rng.standard_normal(n)).astype(np.float32)
    rec["force"] = 250 * np.sin(2 * np.pi * 75 * t) + rng.standard_normal(n)
    raw12 = rng.integers(-2048, 2048, n)
    raw12[:3] = [-2048, 2047, -1]  # the extremes of a signed 12-bit value, and −1
    rec["pres"][:2] = [0, 2**32 - 1]  # the extremes of a uint32
    rec["bits"] = ((raw12 & 0xFFF) << 4 | 0b1010).astype(np.uint16)  # low 4 bits: another signal
    lin = (0.5, 0.001)  # phys = 0.001·raw + 0.5
    rat = (0.0, 2.0, 100.0, 0.0, 0.0, 4.0)  # phys = (2·raw + 100) / 4
    f = MdfFile()
    hd(f, "dg")
    dg(f, "dg", None, "cg", "dt", 0)
    tx(f, "cg_name", "engine_bay")
    cg(f, "cg", None, "cn_t", "cg_name", None, 0, n, 0, 28, 1)
    for name in ["t", "acc", "pres", "volt", "force", "bits"]:
        tx(f, f"tx_{name}", name)
    tx(f, "u_s", "s")
    tx(f, "u_acc", "m/s^2")
    tx(f, "u_pa", "Pa")
    tx(f, "u_v", "V")
    tx(f, "u_n", "N")
    tx(f, "u_a", "A")
    cc(f, "cc_lin", 1, lin, "u_acc")  # the unit from the conversion
    cc(f, "cc_rat", 2, rat)
    cn(f, "cn_t", "cn_acc", "tx_t", None, "u_s", 2, 1, 4, 0, 0, 64)
    cn(f, "cn_acc", "cn_pres", "tx_acc", "cc_lin", None, 0, 0, 2, 0, 8, 16, flags=2, inval_pos=0)
    cn(f, "cn_pres", "cn_volt", "tx_pres", "cc_rat", "u_pa", 0, 0, 0, 0, 10, 32)
    cn(f, "cn_volt", "cn_force", "tx_volt", None, "u_v", 0, 0, 4, 0, 14, 32)
    cn(f, "cn_force", "cn_bits", "tx_force", None, "u_n", 0, 0, 5, 0, 18, 64)
    cn(f, "cn_bits", None, "tx_bits", None, "u_a", 0, 0, 2, 4, 26, 12)
    f.add("dt", "DT", [], rec.tobytes(), {"records": n})
    data, blocks = f.build()
    x = rec["acc"].astype(np.float64)
    p = rec["pres"].astype(np.float64)
    channels = [
        {"name": "acc", "unit": "m/s^2", "values": values(lin[1] * x + lin[0])},
        {"name": "pres", "unit": "Pa",
         "values": values((rat[0] * p * p + rat[1] * p + rat[2]) / (rat[3] * p * p + rat[4] * p + rat[5]))},
        {"name": "volt", "unit": "V", "values": values(rec["volt"])},
        {"name": "force", "unit": "N", "values": values(rec["force"])},
        {"name": "bits", "unit": "A", "values": values(raw12)},
    ]
    groups = [{"name": "engine_bay", "rate": rate, "start": 0.25, "records": n, "channels": channels}]
    return data, blocks, groups


def unsorted_dl():
    rng = np.random.default_rng(34)
    nf, ns = 400, 20  # fast 2000 Hz, slow 100 Hz: 0.2 s each
    fast = np.zeros(nf, np.dtype({"names": ["id", "a", "b"], "formats": ["u1", ">i2", "<f4"],
                                  "offsets": [0, 1, 3], "itemsize": 7}))
    fast["id"] = 1
    fast["a"] = rng.integers(-30000, 30000, nf).astype(np.int16)
    fast["b"] = rng.standard_normal(nf).astype(np.float32)
    slow = np.zeros(ns, np.dtype({"names": ["id", "t", "c"], "formats": ["u1", "<f8", "<f8"],
                                  "offsets": [0, 1, 9], "itemsize": 17}))
    slow["id"] = 2
    slow["t"] = np.arange(ns) / 100.0
    slow["c"] = rng.standard_normal(ns)
    # Interleave in time order; every 5th slow record is followed by a VLSD record and a
    # "notes" record (id 4: time and the note's offset).
    parts, notes = [], 0
    for k in range(nf):
        parts.append(fast[k : k + 1].tobytes())
        if k % 20 == 0:
            j = k // 20
            parts.append(slow[j : j + 1].tobytes())
            if j % 5 == 0:
                text = f"note {j}".encode()
                parts.append(struct.pack("<BI", 3, len(text)) + text)
                parts.append(struct.pack("<Bdq", 4, j / 100.0, notes))
                notes += 1
    raw = b"".join(parts)
    cut = len(raw) // 2 + 3  # inside a record
    lin_fast = (0.0, 1 / 2000)
    f = MdfFile()
    hd(f, "dg")
    dg(f, "dg", None, "cg_fast", "dl", 1)
    tx(f, "n_fast", "fast")
    tx(f, "n_slow", "slow")
    tx(f, "n_notes", "notes")
    cg(f, "cg_fast", "cg_slow", "cn_ft", "n_fast", None, 1, nf, 0, 6, 0)
    cg(f, "cg_slow", "cg_vlsd", "cn_st", "n_slow", None, 2, ns, 0, 16, 0)
    cg(f, "cg_vlsd", "cg_notes", None, None, None, 3, notes, 1, 0, 0)  # flags bit 0: VLSD
    cg(f, "cg_notes", None, "cn_nt", "n_notes", None, 4, notes, 0, 16, 0)
    for name in ["time", "a", "b", "t", "c", "note"]:
        tx(f, f"tx_{name}", name)
    tx(f, "u_s", "s")
    tx(f, "u_pa", "Pa")
    tx(f, "u_g", "N")
    cc(f, "cc_ft", 1, lin_fast)
    cc(f, "cc_a", 1, (0.0, 0.01))
    cn(f, "cn_ft", "cn_a", "tx_time", "cc_ft", "u_s", 3, 1, 0, 0, 0, 0)  # virtual master
    cn(f, "cn_a", "cn_b", "tx_a", "cc_a", "u_pa", 0, 0, 3, 0, 0, 16)  # int16 big endian
    cn(f, "cn_b", None, "tx_b", None, "u_g", 0, 0, 4, 0, 2, 32)
    cn(f, "cn_st", "cn_c", "tx_t", None, "u_s", 2, 1, 4, 0, 0, 64)
    cn(f, "cn_c", None, "tx_c", None, "u_pa", 0, 0, 4, 0, 8, 64)
    cn(f, "cn_nt", "cn_note", "tx_t", None, "u_s", 2, 1, 4, 0, 0, 64)
    cn(f, "cn_note", None, "tx_note", None, None, 1, 0, 7, 0, 8, 64, data="cg_vlsd")
    f.add("dl", "DL", [None, "dt1", "dt2"], struct.pack("<B3xIQQ", 0, 2, 0, cut),
          {"flags": 0, "count": 2, "offsets": [0, cut]})
    f.add("dt1", "DT", [], raw[:cut])
    f.add("dt2", "DT", [], raw[cut:])
    data, blocks = f.build()
    groups = [
        {"name": "fast", "rate": 2000.0, "start": 0.0, "records": nf, "channels": [
            {"name": "a", "unit": "Pa", "values": values(0.01 * fast["a"].astype(np.float64))},
            {"name": "b", "unit": "N", "values": values(fast["b"])}]},
        {"name": "slow", "rate": 100.0, "start": 0.0, "records": ns, "channels": [
            {"name": "c", "unit": "Pa", "values": values(slow["c"])}]},
    ]
    return data, blocks, groups


def zipped_hl():
    rng = np.random.default_rng(35)
    n, rate = 1000, 512.0
    rec = np.zeros(n, np.dtype({"names": ["u", "i"], "formats": ["u1", "<i4"],
                                "offsets": [0, 1], "itemsize": 5}))
    rec["u"] = rng.integers(0, 256, n)
    rec["i"] = rng.integers(-2**31, 2**31, n, dtype=np.int64).astype(np.int32)
    raw = rec.tobytes()
    size = 2000  # equal length of each block's data (not a whole number of records)
    f = MdfFile()
    hd(f, "dg")
    dg(f, "dg", "dg_bus", "cg", "hl", 0)
    tx(f, "n_cg", "rig")
    cg(f, "cg", None, "cn_t", "n_cg", None, 0, n, 0, 5, 0)
    tx(f, "tx_t", "time")
    tx(f, "tx_u", "level")
    tx(f, "tx_i", "count")
    tx(f, "u_s", "s")
    tx(f, "u_v", "V")
    cc(f, "cc_t", 1, (0.5, 1 / rate))
    cc(f, "cc_u", 1, (-1.0, 1 / 128))
    cc(f, "cc_i", 2, (0.0, 1.0, 0.0, 0.0, 0.0, 2.0**31))
    cn(f, "cn_t", "cn_u", "tx_t", "cc_t", "u_s", 3, 1, 0, 0, 0, 0)
    cn(f, "cn_u", "cn_i", "tx_u", "cc_u", "u_v", 0, 0, 0, 0, 0, 8)
    cn(f, "cn_i", None, "tx_i", "cc_i", "u_v", 0, 0, 2, 0, 1, 32)
    f.add("hl", "HL", ["dl"], struct.pack("<HB5x", 0, 0))
    f.add("dl", "DL", [None, "dz1", "dz2", "dt3"], struct.pack("<B3xIQ", 1, 3, size),
          {"flags": 1, "count": 3, "equal_length": size})
    dz(f, "dz1", raw[:size])
    dz(f, "dz2", raw[size : 2 * size], transpose_columns=5)
    f.add("dt3", "DT", [], raw[2 * size :])
    # A second data group: CAN frames logged as bus events (cg_flags bit 1), source a bus.
    frames = np.zeros(8, np.dtype([("t", "<f8"), ("id", "<u4"), ("payload", "u1", 8)]))
    frames["t"] = np.arange(8) / 100
    dg(f, "dg_bus", None, "cg_bus", "dt_bus", 0)
    tx(f, "n_bus", "CAN1")
    tx(f, "n_frame", "CAN_DataFrame")
    f.add("si_bus", "SI", ["n_bus", None, None], struct.pack("<BBB5x", 2, 2, 0))  # bus, CAN
    cg(f, "cg_bus", None, "cn_bt", None, "si_bus", 0, 8, 0b10, 20, 0)
    cn(f, "cn_bt", "cn_frame", "tx_t", None, "u_s", 2, 1, 4, 0, 0, 64)
    cn(f, "cn_frame", None, "n_frame", None, None, 0, 0, 10, 0, 8, 96, flags=1 << 10)
    f.add("dt_bus", "DT", [], frames.tobytes())
    data, blocks = f.build()
    i = rec["i"].astype(np.float64)
    groups = [{"name": "rig", "rate": rate, "start": 0.5, "records": n, "channels": [
        {"name": "level", "unit": "V", "values": values(rec["u"].astype(np.float64) / 128 - 1.0)},
        {"name": "count", "unit": "V", "values": values((0.0 * i * i + 1.0 * i + 0.0) / (0.0 * i * i + 0.0 * i + 2.0**31))},
    ]}, {"name": "CAN1", "unsupported": "a bus-frame channel group (bus events)"}]
    return data, blocks, groups


def no_master():
    rng = np.random.default_rng(36)
    n = 50
    u16 = rng.integers(0, 2**16, n).astype(np.uint16)
    raw20 = rng.integers(0, 2**20, n)
    raw20[:2] = [0, 2**20 - 1]
    word = (raw20 << 3) | 0b101  # bits 0–2: another signal
    rec = np.zeros(n, np.dtype({"names": ["u", "w0", "w1", "w2"], "formats": [">u2", "u1", "u1", "u1"],
                                "offsets": [0, 2, 3, 4], "itemsize": 5}))
    rec["u"] = u16
    rec["w0"], rec["w1"], rec["w2"] = (word >> 16) & 0xFF, (word >> 8) & 0xFF, word & 0xFF
    f = MdfFile()
    hd(f, "dg")
    dg(f, "dg", None, "cg", "dt", 0)
    cg(f, "cg", None, "cn_u", None, None, 0, n, 0, 5, 0)
    tx(f, "tx_u", "strain")
    tx(f, "tx_w", "counter")
    unit = "<CNunit><TX>m/s^2</TX></CNunit>".encode() + b"\0"
    f.add("md_u", "MD", [], unit + bytes((-len(unit)) % 8))
    cn(f, "cn_u", "cn_w", "tx_u", None, "md_u", 0, 0, 1, 0, 0, 16)
    cn(f, "cn_w", None, "tx_w", None, None, 0, 0, 1, 3, 2, 20)
    f.add("dt", "DT", [], rec.tobytes())
    data, blocks = f.build()
    return data, blocks, [{"name": "1", "rate": 100.0, "rate_given": True, "start": 0.0, "records": n, "channels": [
        {"name": "strain", "unit": "m/s^2", "values": values(u16)},
        {"name": "counter", "unit": "", "values": values(raw20)},
    ]}]


def main() -> None:
    OUT.mkdir(parents=True, exist_ok=True)
    files = {}
    for name, make in [("sorted_dt.mf4", sorted_dt), ("unsorted_dl.mf4", unsorted_dl),
                       ("zipped_hl.mf4", zipped_hl), ("no_master.mf4", no_master)]:
        data, blocks, groups = make()
        (OUT / name).write_bytes(data)
        files[name] = {"bytes": len(data), "blocks": blocks, "groups": groups}
    REF.write_text(json.dumps({
        "provenance": {
            "script": "tests/reference/make_mdf4_reference.py",
            "layout": "ASAM MDF 4.1 block structure, typed in from memory",
            "python": sys.version.split()[0],
            "numpy": np.__version__,
            "values": "physical values: numpy float64 of the raw values through each conversion",
        },
        "files": files,
    }, indent=1) + "\n")


if __name__ == "__main__":
    main()
