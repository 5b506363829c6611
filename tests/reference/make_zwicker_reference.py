"""Generates the reference for quiver's stationary loudness after Zwicker (lib/quality/zwicker_core.ts).

Run from the project root:  python3 tests/reference/make_zwicker_reference.py

Writes
  fixtures/reference/zwicker_reference.json

and prints, term by term, what a lone 1 kHz one-third-octave band gives at 30 ... 100 dB: the
excitation in its critical band, the core loudness N' there and its area over the band, the area
of the upper slope by range of the slope table, the total, and the sone scale's value.

What it checks, and what it cannot:
  * The steps of ISO 532-1:2017's stationary method (the method of DIN 45631:1991) are written
    here a second time, in another shape: the specific loudness is walked segment by segment
    with each segment's area kept by the range of the slope table it used. A slip in the
    TypeScript steps, or a later edit of a table there, shows as a mismatch.
  * The tables of level ranges, low-frequency weightings, threshold, a0, diffuse-field
    differences, band-width corrections and critical-band limits are typed here from memory,
    separately from lib/quality/zwicker_tables.ts (they agree).
  * The slope table (USL) and its ranges (RNS) are NOT typed independently: they are copied
    from lib/quality/zwicker_tables.ts, itself from memory and the least sure of the tables
    (README, "Not a certified meter"). This reference cannot tell whether they are the
    standard's; it only pins what quiver computes with them, and shows where the 1 kHz tone's
    loudness comes from.

Core loudness, ISO 532-1:2017 (and the DIN 45631:1991 program), from memory:
  N' = 0.0635 * 10^(0.025 L_TQ) * ((1 - s + s * 10^((L_E - L_TQ)/10))^0.25 - 1),  s = 0.25,
with L_E the critical band's excitation level less the band-width correction. Zwicker & Fastl,
Psychoacoustics (ch. 8), write the same law as
  N' = 0.08 * (E_TQ/E0)^0.23 * ((0.5 + 0.5 E/E_TQ)^0.23 - 1)
(exponent 0.23, s = 0.5); it is printed beside for comparison and is not what the standard uses.
"""
import json
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
NEG_INF = float("-inf")

# ISO 532-1:2017 Annex A / DIN 45631:1991, from memory (typed here, not copied).
RAP = [45, 55, 65, 71, 80, 90, 100, 120]
DLL = [
    [-32, -24, -16, -10, -5, 0, -7, -3, 0, -2, 0],
    [-29, -22, -15, -10, -4, 0, -7, -2, 0, -2, 0],
    [-27, -19, -14, -9, -4, 0, -6, -2, 0, -2, 0],
    [-25, -17, -12, -9, -3, 0, -5, -2, 0, -2, 0],
    [-23, -16, -11, -7, -3, 0, -4, -1, 0, -1, 0],
    [-20, -14, -10, -6, -3, 0, -4, -1, 0, -1, 0],
    [-18, -12, -9, -6, -2, 0, -3, -1, 0, -1, 0],
    [-15, -10, -8, -4, -2, 0, -3, -1, 0, -1, 0],
]
LTQ = [30, 18, 12, 8, 7, 6, 5, 4, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3]
A0 = [0, 0, 0, 0, 0, 0, 0, 0, 0, 0, -0.5, -1.6, -3.2, -5.4, -5.6, -4.0, -1.5, 2.0, 5.0, 12.0]
DDF = [0, 0, 0.5, 0.9, 1.2, 1.6, 2.3, 2.8, 3.0, 2.0, 0, -1.4, -2.0, -1.9, -1.0, 0.5, 3.0, 4.0, 4.3, 4.0]
DCB = [-0.25, -0.6, -0.8, -0.8, -0.5, 0, 0.5, 1.1, 1.5, 1.7, 1.8, 1.8, 1.7, 1.6, 1.4, 1.2, 0.8, 0.5, 0,
       -0.5]
ZUP = [0.9, 1.8, 2.8, 3.5, 4.4, 5.4, 6.6, 7.9, 9.2, 10.6, 12.3, 13.8, 15.2, 16.7, 18.1, 19.3, 20.6, 21.8,
       22.7, 23.6, 24.0]

# Copied from lib/quality/zwicker_tables.ts (SLOPE_RANGE, UPPER_SLOPE): see the docstring.
RNS = [18, 16, 14, 12, 10, 8, 6, 4, 3, 2.5, 2, 1.5, 1, 0.75, 0.5, 0.3, 0.2, 0.1]
USL = [
    [13.0, 8.2, 5.7, 5.0, 5.0, 5.0, 5.0, 5.0],
    [9.0, 7.5, 6.0, 5.1, 4.5, 4.5, 4.5, 4.5],
    [7.8, 6.7, 5.6, 4.9, 4.4, 3.9, 3.9, 3.9],
    [6.5, 6.0, 5.1, 4.5, 3.9, 3.2, 3.2, 3.2],
    [5.6, 5.0, 4.5, 3.9, 3.2, 2.7, 2.7, 2.7],
    [4.2, 3.8, 3.3, 2.8, 2.4, 2.0, 2.0, 2.0],
    [3.2, 2.9, 2.5, 2.2, 1.8, 1.5, 1.5, 1.5],
    [2.8, 2.5, 2.1, 1.9, 1.6, 1.3, 1.3, 1.3],
    [1.6, 1.5, 1.2, 1.1, 0.95, 0.85, 0.85, 0.85],
    [1.5, 1.4, 1.1, 1.0, 0.9, 0.75, 0.75, 0.75],
    [1.3, 1.2, 1.0, 0.9, 0.75, 0.65, 0.65, 0.65],
    [1.1, 1.0, 0.85, 0.75, 0.65, 0.55, 0.55, 0.55],
    [0.9, 0.8, 0.7, 0.6, 0.5, 0.45, 0.45, 0.45],
    [0.7, 0.6, 0.55, 0.45, 0.4, 0.35, 0.35, 0.35],
    [0.5, 0.45, 0.4, 0.35, 0.3, 0.25, 0.25, 0.25],
    [0.35, 0.3, 0.28, 0.25, 0.2, 0.17, 0.17, 0.17],
    [0.25, 0.22, 0.2, 0.18, 0.15, 0.12, 0.12, 0.12],
    [0.15, 0.13, 0.12, 0.1, 0.09, 0.08, 0.08, 0.08],
]
TAIL = len(RNS)  # the slope's last part, below the last range's floor, down to 0


def db_sum(levels):
    power = sum(10 ** (l / 10) for l in levels if l != NEG_INF)
    return 10 * __import__("math").log10(power) if power > 0 else NEG_INF


def critical_band_levels(levels):
    """The 20 critical-band levels: the 11 lowest third octaves weighted and grouped 6 + 3 + 2."""
    weighted = []
    for k in range(11):
        l = levels[k]
        r = 0
        # The range is chosen by the weighted level: the first range j with l + DLL[j][k] <= RAP[j].
        while r < len(RAP) - 1 and l + DLL[r][k] > RAP[r]:
            r += 1
        weighted.append(l + DLL[r][k])
    return [db_sum(weighted[0:6]), db_sum(weighted[6:9]), db_sum(weighted[9:11])] + list(levels[11:28])


def core_term(band, level, field):
    """(excitation L_E after the band-width correction or None, N') of one critical band."""
    le = level - A0[band] + (DDF[band] if field == "diffuse" else 0)
    if not le > LTQ[band]:
        return None, 0.0
    le -= DCB[band]
    n = 0.0635 * 10 ** (0.025 * LTQ[band]) * ((0.75 + 0.25 * 10 ** ((le - LTQ[band]) / 10)) ** 0.25 - 1)
    return le, max(n, 0.0)


def core_loudness(levels, field):
    cb = critical_band_levels(levels)
    core = [core_term(i, cb[i], field)[1] for i in range(20)]
    core[0] *= min(1.0, 0.4 + 0.32 * core[0] ** 0.2)
    return core


def specific_loudness(core):
    """Total loudness and its parts: area of the flat tops per band, area of the slopes per USL row.

    Walks z upward. In band i the pattern is the band's core value wherever the pattern coming
    from below is not above it; where it is above, it falls by USL[row][column] per Bark, row
    the range its value lies in (RNS[row] < N' <= the range above), column min(i - 1, 7).
    """
    flat = [0.0] * 21
    by_row = [0.0] * (TAIL + 1)
    n = 0.0  # the pattern's value at z
    z = 0.0
    for i in range(21):
        top = ZUP[i] + 1e-4
        value = core[i] if i < 20 else 0.0
        column = max(0, min(i - 1, 7))
        while z < top:
            if n <= value:  # the band's own core: flat to the band's top
                flat[i] += (top - z) * value
                n, z = value, top
                continue
            # falling: the row whose range holds n (its floor strictly below n), floor 0 past the last
            row = next((j for j, r in enumerate(RNS) if r < n), TAIL)
            slope = USL[min(row, TAIL - 1)][column]
            floor = max(RNS[row] if row < TAIL else 0.0, value)
            z_end = z + (n - floor) / slope
            if z_end > top:
                z_end = top
                floor = n - (top - z) * slope
            by_row[row] += (z_end - z) * (n + floor) / 2
            n, z = floor, z_end
    return sum(flat) + sum(by_row), flat, by_row


def one_band(index, db):
    levels = [NEG_INF] * 28
    levels[index] = db
    return levels


def textbook_core(le, ltq):
    """Zwicker & Fastl's form, for comparison only: 0.08 (E_TQ/E0)^0.23 ((0.5 + 0.5 E/E_TQ)^0.23 - 1)."""
    return 0.08 * 10 ** (0.023 * ltq) * ((0.5 + 0.5 * 10 ** ((le - ltq) / 10)) ** 0.23 - 1)


def report_1khz():
    print("A lone 1 kHz one-third octave (critical band 9, 7.9 ... 9.2 Bark), free field:")
    print(" L/dB  L_E/dB  N'core  N'(Z&F)  core area  slope area  total   sone scale  excess  L_N-L/phon")
    for db in range(30, 101, 10):
        le, n = core_term(8, db, "free")
        core = core_loudness(one_band(16, db), "free")
        total, flat, by_row = specific_loudness(core)
        scale = 2 ** ((db - 40) / 10)
        ln = 40 + 10 * __import__("math").log2(total) if total >= 1 else 40 * (total + 0.0005) ** 0.35
        print(f" {db:4d}  {le:6.2f}  {n:6.4f}  {textbook_core(le, 3):7.4f}  {flat[8]:9.4f}  {sum(by_row):10.4f}"
              f"  {total:7.4f}  {scale:8.3f}  {total - scale:+7.3f}  {ln - db:+6.2f}")
        parts = ", ".join(f"{'<' + str(RNS[-1]) if j == TAIL else RNS[j]}: {a:.3f}" for j, a in enumerate(by_row) if a)
        print(f"        slope area by range floor (sone/Bark): {parts}")


def cases():
    def c(name, levels, field="free"):
        core = core_loudness(levels, field)
        total, flat, by_row = specific_loudness(core)
        return {
            "name": name,
            "field": field,
            "levels": [None if l == NEG_INF else l for l in levels],
            "core": core,
            "total": total,
            "slopeAreaByRange": by_row,
        }

    out = [c(f"1 kHz band at {db} dB", one_band(16, db)) for db in range(30, 101, 10)]
    out += [
        c("4 kHz band at 60 dB", one_band(22, 60)),
        c("1 kHz band at 60 dB, diffuse", one_band(16, 60), "diffuse"),
        c("125 Hz band at 70 dB", one_band(7, 70)),
        c("25 Hz band at 80 dB", one_band(0, 80)),
        c("80 Hz band at 100 dB", one_band(5, 100)),
        c("12.5 kHz band at 70 dB", one_band(27, 70)),
        c("all bands at 60 dB", [60.0] * 28),
        c("all bands at 60 dB, diffuse", [60.0] * 28, "diffuse"),
        c("falling 3 dB per band from 90 dB", [90.0 - 3 * k for k in range(28)]),
        c("rising 2 dB per band from 20 dB", [20.0 + 2 * k for k in range(28)]),
        c("1 kHz at 85 dB, 2 kHz at 50 dB, 160 Hz at 75 dB",
          [75.0 if k == 8 else 85.0 if k == 16 else 50.0 if k == 19 else NEG_INF for k in range(28)]),
    ]
    return out


if __name__ == "__main__":
    report_1khz()
    data = {
        "about": "tests/reference/make_zwicker_reference.py: ISO 532-1 stationary steps written a second time; "
                 "slope table copied from lib/quality/zwicker_tables.ts (not an independent check of it)",
        "cases": cases(),
    }
    path = ROOT / "fixtures" / "reference" / "zwicker_reference.json"
    path.write_text(json.dumps(data, indent=1) + "\n")
    print(f"wrote {path.relative_to(ROOT)}")
