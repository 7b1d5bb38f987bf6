#!/usr/bin/python3
"""Reference fixtures for lib/decomposition (PCA dimensionality and spatial FastICA).

Writes, with the Debian packages python3-sklearn (1.2.1), python3-numpy and python3-nibabel:
  tests/fixtures/decomposition/minka-mle.json   scikit-learn PCA(n_components='mle') choices and the
                                               full explained_variance_ spectra of generated data sets
                                               (one small data set is stored whole to check eigenvalues);
  tests/fixtures/decomposition/phantom-ica.json per true source of the tiny phantom (seed 1), the best
                                               spatial |r| over scikit-learn FastICA components.
The phantom is written by scripts/reference/write-decomposition-phantom.ts (needs node + tsx).
Run from the repository root:  /usr/bin/python3 scripts/reference/make-decomposition-fixtures.py
"""
import gzip
import hashlib
import json
import os
import subprocess
import tempfile

import nibabel as nib
import numpy as np
import sklearn
from sklearn.decomposition import PCA, FastICA

OUT = os.path.join("tests", "fixtures", "decomposition")


def header(what):
    return {
        "generator": "scripts/reference/make-decomposition-fixtures.py",
        "library": f"scikit-learn {sklearn.__version__}, numpy {np.__version__}, nibabel {nib.__version__}",
        "what": what,
    }


def low_rank(rng, n, p, rank, strength, noise=1.0):
    """n samples x p features: `rank` Gaussian factors with decaying strengths + white noise."""
    f = rng.standard_normal((n, rank))
    load = rng.standard_normal((rank, p)) * (strength * np.linspace(1.0, 0.4, rank))[:, None]
    return f @ load + noise * rng.standard_normal((n, p))


def minka_fixture():
    rng = np.random.default_rng(20240611)
    sets = [
        ("rank-3 of 12, 200 samples", low_rank(rng, 200, 12, 3, 3.0), True),
        ("rank-5 of 20, 500 samples", low_rank(rng, 500, 20, 5, 2.0), False),
        ("rank-8 of 40, 1000 samples", low_rank(rng, 1000, 40, 8, 1.5), False),
        ("weak rank-4 of 30, 300 samples", low_rank(rng, 300, 30, 4, 0.6), False),
        ("white noise 25 features, 400 samples", rng.standard_normal((400, 25)), False),
        ("decaying spectrum 30 features, 600 samples",
         rng.standard_normal((600, 30)) * np.exp(-np.arange(30) / 4.0)[None, :], False),
    ]
    out = header("PCA(n_components='mle').n_components_ and PCA().explained_variance_ (full, descending)")
    out["datasets"] = []
    for name, x, keep in sets:
        mle = PCA(n_components="mle", svd_solver="full").fit(x)
        full = PCA(svd_solver="full").fit(x)
        d = {
            "name": name,
            "nSamples": int(x.shape[0]),
            "nFeatures": int(x.shape[1]),
            "mleComponents": int(mle.n_components_),
            "explainedVariance": [float(v) for v in full.explained_variance_],
        }
        if keep:
            d["data"] = [[float(v) for v in row] for row in x]
        out["datasets"].append(d)
    with open(os.path.join(OUT, "minka-mle.json"), "w") as fh:
        json.dump(out, fh, indent=1)


def phantom_fixture():
    with tempfile.TemporaryDirectory() as tmp:
        info = json.loads(subprocess.check_output(
            ["node", "--import", "tsx", "scripts/reference/write-decomposition-phantom.ts", tmp, "1"]))
        raw = gzip.open(os.path.join(tmp, "phantom.nii.gz")).read()
        assert hashlib.sha256(raw).hexdigest() == info["sha256"]
        data = np.asarray(nib.load(os.path.join(tmp, "phantom.nii.gz")).get_fdata(), dtype=np.float64)
        mask = np.asarray(nib.load(os.path.join(tmp, "mask.nii.gz")).get_fdata()) > 0
        truth = np.asarray(nib.load(os.path.join(tmp, "truth.nii.gz")).get_fdata(), dtype=np.float64)
    x = data[mask]  # V x T (voxels are samples: spatial ICA)
    x = x - x.mean(axis=1, keepdims=True)
    sd = x.std(axis=1, keepdims=True)
    keep = sd[:, 0] > 0
    x = x[keep] / sd[keep]
    tmaps = truth[mask][keep]  # V x n_sources
    k = tmaps.shape[1]
    results = []
    for seed in (0, 1, 2):
        ica = FastICA(n_components=k, whiten="unit-variance", fun="logcosh", max_iter=200, tol=1e-4,
                      random_state=seed)
        s = ica.fit_transform(x)  # V x k spatial maps
        r = np.corrcoef(np.hstack([tmaps, s]).T)[:k, k:]
        results.append({"randomState": seed, "bestAbsR": [float(v) for v in np.abs(r).max(axis=1)],
                        "iterations": int(ica.n_iter_)})
    out = header("FastICA(n_components=#sources, whiten='unit-variance', fun='logcosh', max_iter=200, tol=1e-4) "
                 "on the tiny phantom's in-mask voxels (voxels = samples), each voxel demeaned and divided by its SD; "
                 "best |Pearson r| of each true map over the components")
    out.update({"phantom": {"size": "tiny", "seed": 1, "datatype": "int16", "sha256": info["sha256"],
                            "dims": info["dims"], "sources": info["sources"]},
                "voxels": int(x.shape[0]), "components": k, "runs": results})
    with open(os.path.join(OUT, "phantom-ica.json"), "w") as fh:
        json.dump(out, fh, indent=1)


if __name__ == "__main__":
    os.makedirs(OUT, exist_ok=True)
    minka_fixture()
    phantom_fixture()
