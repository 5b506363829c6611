"""Generates the reference for quiver's human-vibration weighting filters (lib/comfort/).

Run from the project root:  python3 tests/reference/make_vibration_weighting_reference.py

Writes
  fixtures/reference/vibration_weighting_reference.json

Contents: for each weighting of ISO 2631-1:1997 Annex A (Table A.2: Wk, Wd, Wf, Wc, We, Wj)
and ISO 5349-1:2001 Annex A (Wh), at a few sample rates, the digital filter made here with
scipy alone from the analog sections
  band high-pass  s^2 / (s^2 + w1/Q s + w1^2),           Q = 1/sqrt(2)
  band low-pass   w2^2 / (s^2 + w2/Q s + w2^2)
  transition      (1 + s/w3) / (1 + s/(Q4 w4) + s^2/w4^2)  (f3 = inf: no zero; f4 = inf: none)
  upward step     (1 + s/(Q5 w5) + s^2/w5^2) / (1 + s/(Q6 w6) + s^2/w6^2) * (w5/w6)^2
each mapped by scipy.signal.bilinear with pre-warping at its own frequency (f1, f2, f4,
sqrt(f5 f6)): bilinear(b, a, fs=c/2) with c = w/tan(w/(2 fs)), so that s = c (z-1)/(z+1).
The sections, stacked as second-order sections, filter one seeded random signal
(numpy default_rng(31), standard normal) with scipy.signal.sosfilt; the fixture holds the
signal, each case's sections and its output.

The parameters are typed here from the standards (from memory), independently of the
TypeScript code.
"""
import json
import math
from pathlib import Path

import numpy as np
import scipy
import scipy.signal as sig

ROOT = Path(__file__).resolve().parents[2]
INF = math.inf
Q = 1 / math.sqrt(2)

# name: (f1, f2, f3, f4, Q4, f5, Q5, f6, Q6, K)
PARAMETERS = {
    "wk": (0.4, 100, 12.5, 12.5, 0.63, 2.37, 0.91, 3.35, 0.91, 1),
    "wd": (0.4, 100, 2.0, 2.0, 0.63, INF, 1, INF, 1, 1),
    "wf": (0.08, 0.63, INF, 0.25, 0.86, 0.0625, 0.80, 0.1, 0.80, 1),
    "wc": (0.4, 100, 8.0, 8.0, 0.63, INF, 1, INF, 1, 1),
    "we": (0.4, 100, 1.0, 1.0, 0.63, INF, 1, INF, 1, 1),
    "wj": (0.4, 100, INF, INF, 1, 3.75, 0.91, 5.32, 0.91, 1),
    "wh": (6.310, 1258.9, 15.915, 15.915, 0.64, INF, 1, INF, 1, 1),
}
CASES = [("wk", 400.0), ("wk", 1000.0), ("wd", 512.0), ("wf", 10.0), ("wc", 1000.0),
         ("we", 1000.0), ("wj", 2000.0), ("wh", 5120.0), ("wh", 20000.0)]


def analog_sections(p):
    f1, f2, f3, f4, q4, f5, q5, f6, q6, k = p
    w = lambda f: 2 * math.pi * f
    out = [([k, 0, 0], [1, w(f1) / Q, w(f1) ** 2], f1),
           ([0, 0, w(f2) ** 2], [1, w(f2) / Q, w(f2) ** 2], f2)]
    if f4 != INF:
        # numerator 1 + s/w3, denominator 1 + s/(Q4 w4) + s^2/w4^2: highest power first
        b = [0, 1 / w(f3), 1] if f3 != INF else [0, 0, 1]
        a = [1 / w(f4) ** 2, 1 / (q4 * w(f4)), 1]
        out.append((b, a, f4))
    if f5 != INF:
        g = (w(f5) / w(f6)) ** 2
        b = [g / w(f5) ** 2, g / (q5 * w(f5)), g]
        a = [1 / w(f6) ** 2, 1 / (q6 * w(f6)), 1]
        out.append((b, a, math.sqrt(f5 * f6)))
    return out


def digital_sos(p, fs):
    rows = []
    for b, a, warp in analog_sections(p):
        wp = 2 * math.pi * warp
        c = wp / math.tan(wp / (2 * fs))
        bz, az = sig.bilinear(b, a, fs=c / 2)
        bz = np.concatenate([np.zeros(3 - len(bz)), bz]) if len(bz) < 3 else bz
        rows.append(np.concatenate([bz / az[0], az / az[0]]))
    return np.array(rows)


def main():
    x = np.random.default_rng(31).standard_normal(1500)
    cases = []
    for name, fs in CASES:
        sos = digital_sos(PARAMETERS[name], fs)
        y = sig.sosfilt(sos, x)
        cases.append({"weighting": name, "rate": fs, "sos": sos.tolist(), "output": y.tolist()})
    out = {
        "provenance": {
            "generator": "tests/reference/make_vibration_weighting_reference.py",
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "method": "scipy.signal.bilinear per analog section, pre-warped at its frequency; "
                      "scipy.signal.sosfilt on numpy default_rng(31) standard normal",
        },
        "input": x.tolist(),
        "cases": cases,
    }
    path = ROOT / "fixtures/reference/vibration_weighting_reference.json"
    path.write_text(json.dumps(out) + "\n")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
