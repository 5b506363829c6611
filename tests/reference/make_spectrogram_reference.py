"""Generates the spectrogram fixture for quiver's spectrogram tests.

Run from the project root:  python3 tests/reference/make_spectrogram_reference.py

Writes
  fixtures/recordings/runup_mic_1ch.csv          a generated recording (time_s + one channel, 1024 Hz)
  fixtures/reference/spectrogram_reference.json  scipy.signal.spectrogram of it

The recording is invented: a cabin microphone in our run-up, a chirp from 50 to 300 Hz plus
seeded noise. The CSV is written first and read back, so the reference is computed from
exactly the numbers quiver reads. scipy.signal.spectrogram: window "hann", nperseg 256,
noverlap 128, detrend "constant", scaling "density", mode "psd".
"""
import json
import sys
from pathlib import Path

import numpy as np
import scipy
import scipy.signal as sig

ROOT = Path(__file__).resolve().parents[2]
FS = 1024.0
N = 6144


def main() -> None:
    rng = np.random.default_rng(11)
    t = np.arange(N) / FS
    x = 0.5 * sig.chirp(t, f0=50, t1=t[-1], f1=300) + 0.05 * rng.standard_normal(N)
    path = ROOT / "fixtures/recordings/runup_mic_1ch.csv"
    with path.open("w") as fh:
        fh.write("time_s,cabin_mic [Pa]\n")
        for ti, xi in zip(t, x):
            fh.write(f"{float(ti)!r},{float(xi)!r}\n")
    back = np.loadtxt(path, delimiter=",", skiprows=1)
    f, tt, sxx = sig.spectrogram(back[:, 1], fs=FS, window="hann", nperseg=256, noverlap=128,
                                 detrend="constant", scaling="density", mode="psd")
    out = {
        "generator": "tests/reference/make_spectrogram_reference.py",
        "function": "scipy.signal.spectrogram(window='hann', nperseg=256, noverlap=128, detrend='constant', scaling='density', mode='psd')",
        "python": sys.version.split()[0],
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "frequencies": f.tolist(),
        "times": tt.tolist(),
        "psd": sxx.T.tolist(),
    }
    (ROOT / "fixtures/reference/spectrogram_reference.json").write_text(json.dumps(out) + "\n")
    print("wrote the fixtures")


if __name__ == "__main__":
    main()
