#!/usr/bin/python3
"""Reference fixtures for lib/decomposition/{spectrum,features}.ts.

Writes tests/fixtures/features/welch.json and tests/fixtures/features/moments.json with
scipy.signal.welch and scipy.stats.{skew,kurtosis}, using the Debian packages python3-scipy and
python3-numpy. Run from the repository root:  /usr/bin/python3 scripts/reference/make-feature-fixtures.py
"""
import json
import math
import os

import numpy as np
import scipy
from scipy import signal, stats

OUT = os.path.join("tests", "fixtures", "features")


def default_segment_length(t):
    """Mirror of defaultSegmentLength in spectrum.ts: smallest 2^k >= T/4, at least 32, at most T."""
    pow2 = 2 ** math.ceil(math.log2(max(t / 4, 1)))
    return min(t, max(32, pow2))


def header(what):
    return {
        "generator": "scripts/reference/make-feature-fixtures.py",
        "library": f"scipy {scipy.__version__}, numpy {np.__version__}",
        "what": what,
    }


def welch_cases(rng):
    cases = []
    specs = [
        ("white noise, T=200, TR=2 s, default segment", rng.standard_normal(200), 2.0, None),
        ("AR(1) 0.6 plus 0.12 Hz sinusoid, T=97, TR=0.8 s, default segment",
         None, 0.8, None),
        ("white noise plus offset and trend, T=150, TR=1.5 s, segment 50 (non power of two)",
         rng.standard_normal(150) + 5 + 0.01 * np.arange(150), 1.5, 50),
        ("white noise, T=20, TR=2 s, default segment (= T)", rng.standard_normal(20), 2.0, None),
        ("white noise, T=150, TR=1 s, odd segment 45", rng.standard_normal(150), 1.0, 45),
    ]
    for name, x, tr, seg in specs:
        if x is None:
            e = rng.standard_normal(97)
            x = np.zeros(97)
            for i in range(1, 97):
                x[i] = 0.6 * x[i - 1] + e[i]
            x += 2 * np.sin(2 * np.pi * 0.12 * 0.8 * np.arange(97))
        nperseg = seg if seg is not None else default_segment_length(len(x))
        f, p = signal.welch(x, fs=1.0 / tr, window="hann", nperseg=nperseg,
                            noverlap=nperseg // 2, nfft=nperseg, detrend="constant",
                            return_onesided=True, scaling="density", average="mean")
        cases.append({
            "name": name,
            "trSeconds": tr,
            "segmentLength": seg,
            "npersegUsed": int(nperseg),
            "signal": [float(v) for v in x],
            "frequencies": [float(v) for v in f],
            "power": [float(v) for v in p],
        })
    return cases


def moment_cases(rng):
    cases = []
    maps = [
        ("gaussian, n=500", rng.standard_normal(500)),
        ("gamma shape 2 (right-skewed), n=400", rng.gamma(2.0, size=400)),
        ("student t, 4 dof (heavy tails), n=600", rng.standard_t(4, size=600)),
    ]
    for name, x in maps:
        x = x.astype(np.float32).astype(np.float64)  # the map is float32 in the product
        cases.append({
            "name": name,
            "values": [float(v) for v in x],
            "skewness": float(stats.skew(x, bias=True)),
            "kurtosis": float(stats.kurtosis(x, fisher=True, bias=True)),
        })
    return cases


def main():
    rng = np.random.default_rng(20260101)
    os.makedirs(OUT, exist_ok=True)
    welch = header("scipy.signal.welch(x, fs=1/TR, window='hann', nperseg, noverlap=nperseg//2, "
                   "nfft=nperseg, detrend='constant', return_onesided=True, scaling='density', average='mean')")
    welch["cases"] = welch_cases(rng)
    with open(os.path.join(OUT, "welch.json"), "w") as fh:
        json.dump(welch, fh, indent=1)
        fh.write("\n")
    moments = header("scipy.stats.skew(x, bias=True) and scipy.stats.kurtosis(x, fisher=True, bias=True)")
    moments["cases"] = moment_cases(rng)
    with open(os.path.join(OUT, "moments.json"), "w") as fh:
        json.dump(moments, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
