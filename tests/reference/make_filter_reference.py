"""Generates the filter-response fixtures for quiver's filter bank and weighting-filter tests.

Run from the project root:  python3 tests/reference/make_filter_reference.py

Writes
  fixtures/reference/filter_reference.json

Contents, every response in dB at stated frequencies:
  bandpass   scipy.signal.butter(3, [lower, upper], btype="bandpass", fs=fs, output="sos")
             through scipy.signal.sosfreqz, for IEC 61260-1 one-third-octave bands
             (edges fm*G**(-1/6), fm*G**(1/6), G = 10**0.3, fm = 1000*G**(n/3)) at the
             rates the filter bank uses them.
  lowpass    scipy.signal.butter(8, 0.2*fs, fs=fs, output="sos"), the bank's anti-alias
             low-pass before each halving of the rate.
  weighting  the A and C weightings as digital filters by the bilinear transform of the
             analog poles of IEC 61672-1:2013 Annex E (f1 = 20.598997, f2 = 107.65265,
             f3 = 737.86223, f4 = 12194.217 Hz): scipy.signal.bilinear_zpk, normalised to
             0 dB at 1 kHz, evaluated with scipy.signal.freqz_zpk. Plain bilinear departs
             from the analog curve at high frequencies (frequency warping), so the
             fixture also records the analog value at each frequency for the reader.
"""
import json
import sys
from pathlib import Path

import numpy as np
import scipy
import scipy.signal as sig

ROOT = Path(__file__).resolve().parents[2]
G = 10 ** 0.3
F1, F2, F3, F4 = 20.598997, 107.65265, 737.86223, 12194.217


def db(h):
    return (20 * np.log10(np.abs(h))).tolist()


def band(n):
    fm = 1000 * G ** (n / 3)
    return fm * G ** (-1 / 6), fm * G ** (1 / 6)


def bandpass_cases():
    cases = []
    for n, fs in [(0, 48000.0), (10, 48000.0), (-15, 6000.0), (-5, 12000.0), (-20, 1500.0)]:
        lo, hi = band(n)
        sos = sig.butter(3, [lo, hi], btype="bandpass", fs=fs, output="sos")
        freqs = np.geomspace(lo / 4, min(hi * 4, 0.49 * fs), 80)
        _, h = sig.sosfreqz(sos, worN=freqs, fs=fs)
        cases.append({"band_index": n, "lower_hz": lo, "upper_hz": hi, "rate": fs,
                      "frequencies": freqs.tolist(), "db": db(h)})
    return cases


def lowpass_cases():
    cases = []
    for fs in [48000.0, 8000.0]:
        sos = sig.butter(8, 0.2 * fs, fs=fs, output="sos")
        freqs = np.geomspace(fs / 1000, 0.49 * fs, 80)
        _, h = sig.sosfreqz(sos, worN=freqs, fs=fs)
        cases.append({"cutoff_hz": 0.2 * fs, "rate": fs, "order": 8,
                      "frequencies": freqs.tolist(), "db": db(h)})
    return cases


def analog_zpk(weighting):
    w = lambda f: 2 * np.pi * f
    if weighting == "A":
        z = [0, 0, 0, 0]
        p = [-w(F1), -w(F1), -w(F2), -w(F3), -w(F4), -w(F4)]
    else:
        z = [0, 0]
        p = [-w(F1), -w(F1), -w(F4), -w(F4)]
    return np.array(z, float), np.array(p, float), 1.0


def weighting_cases():
    cases = []
    for weighting in ["A", "C"]:
        for fs in [48000.0, 51200.0]:
            z, p, k = analog_zpk(weighting)
            zd, pd, kd = sig.bilinear_zpk(z, p, k, fs)
            _, h1k = sig.freqz_zpk(zd, pd, kd, worN=[1000.0], fs=fs)
            kd = kd / abs(h1k[0])
            freqs = np.geomspace(10, 20000, 120)
            _, h = sig.freqz_zpk(zd, pd, kd, worN=freqs, fs=fs)
            _, ha = sig.freqs_zpk(z, p, k, worN=2 * np.pi * np.concatenate([[1000.0], freqs]))
            analog = 20 * np.log10(np.abs(ha[1:]) / np.abs(ha[0]))
            cases.append({"weighting": weighting, "rate": fs, "frequencies": freqs.tolist(),
                          "db": db(h), "analog_db": analog.tolist()})
    return cases


def main() -> None:
    out = {
        "generator": "tests/reference/make_filter_reference.py",
        "python": sys.version.split()[0],
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "bandpass": bandpass_cases(),
        "lowpass": lowpass_cases(),
        "weighting": weighting_cases(),
    }
    path = ROOT / "fixtures/reference/filter_reference.json"
    path.write_text(json.dumps(out) + "\n")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
