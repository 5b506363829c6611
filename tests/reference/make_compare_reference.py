"""Generates the test-versus-simulation fixtures for quiver's compare tests.

Run from the project root:  python3 tests/reference/make_compare_reference.py

Writes
  fixtures/recordings/bracket_test_frf.csv   "test" FRF, frequency_hz,re,im on a 0.25 Hz grid
  fixtures/recordings/bracket_sim_frf.csv    "simulation" FRF, frequency_hz,mag,phase_deg on a 0.1 Hz grid,
                                             every mode 3 % lower in frequency
  fixtures/reference/compare_reference.json  FRAC evaluated independently with numpy

Both FRFs are closed-form modal superpositions (receptance) of our invented
bracket. The FRAC reference follows the documented alignment: the coarser
(test) grid over the overlap, the simulation interpolated linearly in real
and imaginary parts (numpy.interp), then |sum(conj(Ht)*Hs)|^2/(sum|Ht|^2 sum|Hs|^2).
"""
import json
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
MODES = [(42.5, 0.02, 4.0e4), (117.3, 0.015, -2.5e4), (205.0, 0.012, 3.0e4)]  # fn, zeta, residue
SHIFT = 0.97


def receptance(f, modes):
    w = 2 * np.pi * f
    h = np.zeros_like(f, dtype=complex)
    for fn, z, a in modes:
        wn = 2 * np.pi * fn
        h += a / (wn**2 - w**2 + 2j * z * wn * w)
    return h


def main() -> None:
    ft = np.arange(10.0, 300.0 + 1e-9, 0.25)
    fs = np.arange(5.0, 320.0 + 1e-9, 0.1)
    ht = receptance(ft, MODES)
    sim_modes = [(fn * SHIFT, z * 1.1, a) for fn, z, a in MODES]
    hs = receptance(fs, sim_modes)
    with (ROOT / "fixtures/recordings/bracket_test_frf.csv").open("w") as fh:
        fh.write("frequency_hz,re [m/N],im [m/N]\n")
        for f, h in zip(ft, ht):
            fh.write(f"{float(f)!r},{float(h.real)!r},{float(h.imag)!r}\n")
    with (ROOT / "fixtures/recordings/bracket_sim_frf.csv").open("w") as fh:
        fh.write("frequency_hz,mag [m/N],phase_deg\n")
        for f, h in zip(fs, hs):
            fh.write(f"{float(f)!r},{float(abs(h))!r},{float(np.degrees(np.angle(h)))!r}\n")
    # Independent FRAC: what quiver reads back from the files, aligned as documented.
    t = np.loadtxt(ROOT / "fixtures/recordings/bracket_test_frf.csv", delimiter=",", skiprows=1)
    s = np.loadtxt(ROOT / "fixtures/recordings/bracket_sim_frf.csv", delimiter=",", skiprows=1)
    ht_read = t[:, 1] + 1j * t[:, 2]
    hs_read = s[:, 1] * np.exp(1j * np.radians(s[:, 2]))
    grid = t[:, 0]
    hs_on = np.interp(grid, s[:, 0], hs_read.real) + 1j * np.interp(grid, s[:, 0], hs_read.imag)
    frac = abs(np.sum(np.conj(ht_read) * hs_on)) ** 2 / (np.sum(abs(ht_read) ** 2) * np.sum(abs(hs_on) ** 2))
    doc = {
        "provenance": {
            "generator": "tests/reference/make_compare_reference.py",
            "reference": "numpy FRAC on the test grid with numpy.interp in re/im",
            "python": sys.version.split()[0], "numpy": np.__version__,
        },
        "modes": MODES, "simulation_frequency_factor": SHIFT, "frac": float(frac),
        "expected_shift_percent": -3.0,
    }
    (ROOT / "fixtures/reference/compare_reference.json").write_text(json.dumps(doc, indent=1) + "\n")


if __name__ == "__main__":
    main()
