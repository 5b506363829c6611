"""Generates the FRF reference fixtures for quiver's frf tests.

Run from the project root:  python3 tests/reference/make_frf_reference.py

Writes
  fixtures/recordings/shaker_random_3ch.csv  a generated shaker run (no time column; 1024 Hz)
  fixtures/reference/frf_reference.json       H1, H2, Hv and coherence by their definitions,
                                              evaluated with scipy.signal.csd / welch / coherence

The recording is invented: random force on our bench rig, two responses
through resonances, with uncorrelated noise on both responses and a little
on the force. The CSV is written first and read back, so the reference is
computed from exactly the numbers quiver reads.
"""
import json
import sys
from pathlib import Path

import numpy as np
import scipy
import scipy.signal as sig

ROOT = Path(__file__).resolve().parents[2]
FS = 1024.0
N = 8192
BLOCK = 256


def make() -> np.ndarray:
    rng = np.random.default_rng(3)
    force = 20.0 * rng.standard_normal(N)
    b1, a1 = sig.iirpeak(61.0, 8.0, fs=FS)
    b2, a2 = sig.iirpeak(143.0, 12.0, fs=FS)
    arm = 0.05 * sig.lfilter(b1, a1, force) + 0.02 * sig.lfilter(b2, a2, force)
    bracket = 0.03 * sig.lfilter(b2, a2, force) - 0.01 * sig.lfilter(b1, a1, force)
    arm += 0.05 * rng.standard_normal(N)
    bracket += 0.2 * rng.standard_normal(N)  # poor coherence on this one
    force_measured = force + 0.5 * rng.standard_normal(N)
    return np.vstack([force_measured, arm, bracket])


def main() -> None:
    x = make()
    csv = ROOT / "fixtures/recordings/shaker_random_3ch.csv"
    with csv.open("w") as fh:
        fh.write("table_force [N],arm_acc [m/s^2],bracket_acc [m/s^2]\n")
        for i in range(N):
            fh.write(",".join(f"{v:.10g}" for v in x[:, i]) + "\n")
    data = np.loadtxt(csv, delimiter=",", skiprows=1).T  # exactly what quiver reads
    win = sig.get_window("hann", BLOCK)
    common = dict(fs=FS, window=win, nperseg=BLOCK, noverlap=BLOCK // 2, detrend="constant")
    _, gxx = sig.welch(data[0], **common)
    responses = {}
    for name, y in [("arm_acc", data[1]), ("bracket_acc", data[2])]:
        f, gxy = sig.csd(data[0], y, **common)  # E[conj(X)·Y]
        _, gyx = sig.csd(y, data[0], **common)
        _, gyy = sig.welch(y, **common)
        _, coh = sig.coherence(data[0], y, **common)
        h1 = gxy / gxx
        h2 = gyy / gyx
        hv = (gyy - gxx + np.sqrt((gxx - gyy) ** 2 + 4 * np.abs(gxy) ** 2)) / (2 * gyx)
        responses[name] = {
            "h1_re": h1.real.tolist(), "h1_im": h1.imag.tolist(),
            "h2_re": h2.real.tolist(), "h2_im": h2.imag.tolist(),
            "hv_re": hv.real.tolist(), "hv_im": hv.imag.tolist(),
            "coherence": coh.tolist(),
        }
    doc = {
        "provenance": {
            "generator": "tests/reference/make_frf_reference.py",
            "reference": "H1 = csd(x,y)/welch(x); H2 = welch(y)/csd(y,x); "
                         "Hv = (Gyy-Gxx+sqrt((Gxx-Gyy)^2+4|Gxy|^2))/(2 Gyx); coherence = scipy.signal.coherence",
            "python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__,
            "recording": "fixtures/recordings/shaker_random_3ch.csv",
        },
        "rate_hz": FS, "block": BLOCK, "overlap": 0.5, "window": "hann", "detrend": "mean",
        "input": "table_force", "frequencies": f.tolist(), "responses": responses,
    }
    (ROOT / "fixtures/reference/frf_reference.json").write_text(json.dumps(doc) + "\n")


if __name__ == "__main__":
    main()
