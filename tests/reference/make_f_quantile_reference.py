"""Generates the reference for quiver diff's distributions (lib/history/confidence_distributions.ts).

Run from the project root:  python3 tests/reference/make_f_quantile_reference.py

Writes
  fixtures/reference/f_quantile_reference.json

Contents: scipy.stats.f.ppf(p, d1, d2) and scipy.stats.f.cdf at the quantile's neighbours
for the probabilities and degrees of freedom quiver diff meets (2n for n averages, small and
large, equal and unequal, non-integer ones from overlap corrections), and
scipy.stats.norm.ppf at the usual two-sided confidences.
"""
import json
import platform
from pathlib import Path

import numpy as np
import scipy
from scipy import stats

ROOT = Path(__file__).resolve().parents[2]
PROBABILITIES = [0.0005, 0.005, 0.025, 0.05, 0.1, 0.5, 0.9, 0.95, 0.975, 0.995, 0.9995]
DOFS = [(2, 2), (2, 60), (4, 6), (10, 10), (28.5, 28.5), (30, 158), (158, 30), (200, 200),
        (1, 1), (1, 7), (3.3, 11.7), (2000, 1500), (22, 2)]

f_rows = []
for d1, d2 in DOFS:
    for p in PROBABILITIES:
        f_rows.append({"p": p, "d1": d1, "d2": d2, "ppf": float(stats.f.ppf(p, d1, d2))})
cdf_rows = []
for d1, d2 in DOFS:
    for x in [0.05, 0.5, 1.0, 1.7, 4.0, 25.0]:
        cdf_rows.append({"x": x, "d1": d1, "d2": d2, "cdf": float(stats.f.cdf(x, d1, d2))})
norm_rows = [{"p": p, "ppf": float(stats.norm.ppf(p))}
             for p in [0.0005, 0.005, 0.025, 0.05, 0.1, 0.3, 0.5, 0.8, 0.95, 0.975, 0.995, 0.9995]]

out = {
    "generator": "tests/reference/make_f_quantile_reference.py",
    "reference_functions": ["scipy.stats.f.ppf", "scipy.stats.f.cdf", "scipy.stats.norm.ppf"],
    "python": platform.python_version(),
    "numpy": np.__version__,
    "scipy": scipy.__version__,
    "f_ppf": f_rows,
    "f_cdf": cdf_rows,
    "norm_ppf": norm_rows,
}
path = ROOT / "fixtures/reference/f_quantile_reference.json"
path.write_text(json.dumps(out, indent=1) + "\n")
print(f"wrote {path.relative_to(ROOT)}: {len(f_rows)} F quantiles, {len(cdf_rows)} F cdf, {len(norm_rows)} normal")
