#!/usr/bin/python3
"""Reference fixtures for trendR2 and stepScore in lib/decomposition/features.ts.

Writes tests/fixtures/features/trend.json: for a few series, the R² of numpy.polyfit(t, x, 2)
(least-squares constant + linear + quadratic trend) and a brute-force step score (largest
|mean(after) - mean(before)| / pooled within-side SD over every split with at least
max(5, ceil(0.05 T)) volumes per side), using the Debian packages python3-numpy.
Run from the repository root:  /usr/bin/python3 scripts/reference/make-trend-fixtures.py
"""
import json
import math
import os

import numpy as np

OUT = os.path.join("tests", "fixtures", "features", "trend.json")


def trend_r2(x):
    t = np.arange(len(x), dtype=float)
    fit = np.polyval(np.polyfit(t, x, 2), t)
    return 1 - np.sum((x - fit) ** 2) / np.sum((x - x.mean()) ** 2)


def step_score(x):
    n = len(x)
    m = max(5, math.ceil(0.05 * n))
    best = None
    for k in range(m, n - m + 1):
        a, b = x[:k], x[k:]
        pooled = math.sqrt((np.sum((a - a.mean()) ** 2) + np.sum((b - b.mean()) ** 2)) / (n - 2))
        if pooled > 0:
            s = abs(b.mean() - a.mean()) / pooled
            best = s if best is None or s > best else best
    return best


rng = np.random.default_rng(20261202)
T = 156
t = np.arange(T)
series = {
    "white noise": rng.standard_normal(T),
    "linear trend plus noise": 0.02 * t + rng.standard_normal(T),
    "quadratic drift plus noise": 1e-4 * (t - 40) ** 2 + 0.3 * rng.standard_normal(T),
    "step at volume 60 plus noise": np.where(t >= 60, 2.0, 0.0) + 0.5 * rng.standard_normal(T),
    "0.05 Hz sinusoid at TR 2 s": np.sin(2 * np.pi * 0.05 * 2 * t + 0.3),
}
cases = [{"name": k, "values": v.tolist(), "trendR2": float(trend_r2(v)), "stepScore": step_score(v)} for k, v in series.items()]
os.makedirs(os.path.dirname(OUT), exist_ok=True)
with open(OUT, "w") as f:
    json.dump({"generator": "scripts/reference/make-trend-fixtures.py", "library": f"numpy {np.__version__}", "cases": cases}, f)
    f.write("\n")
print(OUT, [(c["name"], round(c["trendR2"], 3), round(c["stepScore"], 3)) for c in cases])
