"""Generates the Welch reference fixtures for quiver's spectral tests.

Run from the project root:  python3 tests/reference/make_welch_reference.py

Writes
  fixtures/recordings/bench_shaker_2ch.csv   a generated 2-channel recording
  fixtures/reference/welch_reference.json    scipy.signal spectra of it

The recording is invented (seeded noise through a resonance, a tone, a DC
offset and a drift); the spectra are computed by scipy.signal.welch /
scipy.signal.csd / scipy.signal.spectrogram, the general-purpose reference.
quiver's test suite reads both files and never needs Python.
"""
import json
import sys
from pathlib import Path

import numpy as np
import scipy
import scipy.signal as sig

ROOT = Path(__file__).resolve().parents[2]
FS = 1024.0
N = 4096

# HFT95 flat-top, periodic, peak-normalised: Heinzel, Ruediger & Schilling 2002, appendix D.
HFT95 = [1.0, 1.9383379, 1.3045202, 0.4028270, 0.0350665]


def hft95(n: int) -> np.ndarray:
    z = 2.0 * np.pi * np.arange(n) / n
    w = sum(((-1) ** k) * a * np.cos(k * z) for k, a in enumerate(HFT95))
    return w / sum(HFT95)


def make_recording() -> tuple[np.ndarray, np.ndarray]:
    rng = np.random.default_rng(20261201)
    t = np.arange(N) / FS
    force = rng.standard_normal(N) * 12.0 + 3.5 + 0.8 * t  # N, with offset and drift
    b, a = sig.iirpeak(87.0, 6.0, fs=FS)  # a 87 Hz resonance of our invented rig
    acc = 0.04 * sig.lfilter(b, a, force) * 25.0
    acc += 0.9 * np.sin(2 * np.pi * 137.3 * t + 0.4)  # a tone between lines
    acc += 0.05 * rng.standard_normal(N)
    return force, acc


CASES = [
    # name, nperseg, overlap fraction, window, detrend, kind, average
    ("hann_psd", 256, 0.5, "hann", "mean", "psd", "linear"),
    ("hann_power", 256, 0.5, "hann", "mean", "power", "linear"),
    ("hann_rms", 256, 0.5, "hann", "mean", "rms", "linear"),
    ("hann_peak", 256, 0.5, "hann", "mean", "peak", "linear"),
    ("hamming_no_overlap_no_detrend", 512, 0.0, "hamming", "none", "psd", "linear"),
    ("blackman_harris_75_linear_detrend", 256, 0.75, "blackman-harris", "linear", "psd", "linear"),
    ("rectangular_power", 128, 0.0, "rectangular", "mean", "power", "linear"),
    ("flattop_peak", 512, 0.5, "flattop", "mean", "peak", "linear"),
    ("hann_block_250", 250, 0.5, "hann", "mean", "psd", "linear"),
    ("hann_block_255_odd", 255, 0.5, "hann", "mean", "rms", "linear"),
    ("hann_max_hold", 256, 0.5, "hann", "mean", "psd", "max"),
    ("hann_exponential", 256, 0.5, "hann", "mean", "power", "exponential"),
]
TAU = 0.5  # s, for the exponential case

SCIPY_WINDOW = {
    "hann": "hann",
    "hamming": "hamming",
    "blackman-harris": "blackmanharris",
    "rectangular": "boxcar",
}
SCIPY_DETREND = {"none": False, "mean": "constant", "linear": "linear"}


def window_for(name: str, n: int):
    return hft95(n) if name == "flattop" else sig.get_window(SCIPY_WINDOW[name], n)


def density_to_kind(f, pxx_density, win, nperseg, kind):
    """Converts a one-sided density to quiver's kinds by their definitions."""
    enbw_hz = FS * np.sum(win**2) / np.sum(win) ** 2
    power = pxx_density * enbw_hz
    if kind == "psd":
        return pxx_density
    if kind == "power":
        return power
    if kind == "rms":
        return np.sqrt(power)
    doubled = np.full(len(f), 2.0)
    doubled[0] = 1.0
    if nperseg % 2 == 0:
        doubled[-1] = 1.0
    return np.sqrt(power * doubled)


def one_case(x, name, nperseg, overlap, window, detrend, kind, average):
    win = window_for(window, nperseg)
    noverlap = int(np.floor(overlap * nperseg))
    common = dict(fs=FS, window=win, nperseg=nperseg, noverlap=noverlap,
                  detrend=SCIPY_DETREND[detrend], return_onesided=True)
    if average == "linear":
        f, p = sig.welch(x, scaling="density", axis=-1, **common)
        segments = len(range(0, x.shape[-1] - nperseg + 1, nperseg - noverlap))
    else:
        f, _, s = sig.spectrogram(x, scaling="density", mode="psd", axis=-1, **common)
        segments = s.shape[-1]
        if average == "max":
            p = s.max(axis=-1)
        else:
            hop = nperseg - noverlap
            alpha = 1.0 - np.exp(-hop / (FS * TAU))
            p = s[..., 0].copy()
            for k in range(1, s.shape[-1]):
                p += alpha * (s[..., k] - p)
    values = density_to_kind(f, p, win, nperseg, kind)
    out = {
        "name": name, "block": nperseg, "overlap": overlap, "noverlap": noverlap,
        "window": window, "detrend": detrend, "kind": kind, "average": average,
        "averages": segments, "frequencies": f.tolist(),
        "channels": {"drive_force": values[0].tolist(), "mount_acc": values[1].tolist()},
    }
    if average == "exponential":
        out["tau_s"] = TAU
    return out


def cross_case(x):
    win = sig.get_window("hann", 256)
    f, pxy = sig.csd(x[0], x[1], fs=FS, window=win, nperseg=256, noverlap=128,
                     detrend="constant", scaling="density")
    return {"name": "hann_csd_force_to_acc", "block": 256, "overlap": 0.5, "window": "hann",
            "detrend": "mean", "frequencies": f.tolist(), "re": pxy.real.tolist(),
            "im": pxy.imag.tolist(),
            "note": "scipy.signal.csd(x=drive_force, y=mount_acc) = E[conj(X)·Y]"}


def main() -> None:
    force, acc = make_recording()
    x = np.vstack([force, acc])
    t = np.arange(N) / FS
    csv = ROOT / "fixtures/recordings/bench_shaker_2ch.csv"
    with csv.open("w") as fh:
        fh.write("time_s,drive_force [N],mount_acc [m/s^2]\n")
        for i in range(N):
            fh.write(f"{float(t[i])!r},{float(force[i])!r},{float(acc[i])!r}\n")
    result = {
        "provenance": {
            "generator": "tests/reference/make_welch_reference.py",
            "reference": "scipy.signal.welch / csd / spectrogram",
            "python": sys.version.split()[0],
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "recording": "fixtures/recordings/bench_shaker_2ch.csv",
            "rate_hz": FS,
            "samples": N,
            "note": "kinds power/rms/peak are derived from scipy's density by their definitions "
                    "(power = density * fs*sum(w^2)/sum(w)^2; rms = sqrt(power); peak = sqrt(2*power) "
                    "except DC and Nyquist); max and exponential averages combine scipy.signal.spectrogram segments",
        },
        "cases": [one_case(x, *c) for c in CASES],
        "cross": cross_case(x),
    }
    (ROOT / "fixtures/reference/welch_reference.json").write_text(json.dumps(result) + "\n")


if __name__ == "__main__":
    main()
