"""The reference peer for quiver's benchmark: what a practitioner would write
instead of quiver. pandas.read_csv (C parser), scipy.signal.welch,
DataFrame.to_csv. Run with Debian's /usr/bin/python3 (python3-pandas,
python3-scipy).

  /usr/bin/python3 tests/bench/peer_welch.py IN.csv OUT.csv BLOCK
  /usr/bin/python3 tests/bench/peer_welch.py --core SAMPLES BLOCK   (in-memory welch throughput)
  /usr/bin/python3 tests/bench/peer_welch.py --wav IN.wav OUT.csv BLOCK  (scipy.io.wavfile + welch)
"""
import sys
import time

import numpy as np
import pandas as pd
import scipy.signal as sig


def main() -> None:
    if sys.argv[1] == "--core":
        n, block = int(sys.argv[2]), int(sys.argv[3])
        rng = np.random.default_rng(1)
        x = rng.standard_normal((2, n))
        best = float("inf")
        for _ in range(5):
            t0 = time.perf_counter()
            sig.welch(x, fs=51200.0, window="hann", nperseg=block, noverlap=block // 2, detrend="constant", axis=-1)
            best = min(best, time.perf_counter() - t0)
        print(f"{2 * n / best:.6e}")
        return
    if sys.argv[1] == "--wav":
        import scipy.io.wavfile as wavfile
        path, out, block = sys.argv[2], sys.argv[3], int(sys.argv[4])
        fs, data = wavfile.read(path)
        f, p = sig.welch(data.T, fs=float(fs), window="hann", nperseg=block, noverlap=block // 2, detrend="constant", axis=-1)
        result = pd.DataFrame({"frequency_hz": f})
        for i, row in enumerate(p):
            result[f"ch{i + 1}"] = row
        result.to_csv(out, index=False)
        return
    path, out, block = sys.argv[1], sys.argv[2], int(sys.argv[3])
    df = pd.read_csv(path)
    fs = 1.0 / float(df["time_s"].iloc[1] - df["time_s"].iloc[0])
    data = df.drop(columns=["time_s"]).to_numpy().T
    f, p = sig.welch(data, fs=fs, window="hann", nperseg=block, noverlap=block // 2, detrend="constant", axis=-1)
    result = pd.DataFrame({"frequency_hz": f})
    for name, row in zip(df.columns.drop("time_s"), p):
        result[name] = row
    result.to_csv(out, index=False)


if __name__ == "__main__":
    main()
