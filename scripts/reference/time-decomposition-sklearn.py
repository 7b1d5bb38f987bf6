#!/usr/bin/python3
"""Times scikit-learn on the same decomposition as `quorum decompose` (for the benchmark only).

Reads a 4D NIfTI and a mask with nibabel, demeans and variance-normalises each in-mask voxel,
estimates the dimension with PCA(n_components='mle') (full SVD) and runs
FastICA(n_components=K, whiten='unit-variance', fun='logcosh') with voxels as samples (spatial ICA).
Prints one JSON line of seconds per step. Debian python3-sklearn 1.2.1, python3-nibabel 5.0.0.
Usage: /usr/bin/python3 scripts/reference/time-decomposition-sklearn.py DATA MASK K
       /usr/bin/python3 scripts/reference/time-decomposition-sklearn.py --ica DATA MASK K
--ica: one FastICA end to end only (no PCA 'mle'): read, preprocess, FastICA to K maps; also reports
iterations, convergence, peak RSS and the BLAS that numpy runs (threadpoolctl, when installed).
"""
import json
import sys
import time

import nibabel as nib
import numpy as np
import sklearn
from sklearn.decomposition import PCA, FastICA


def ica_only(data_path, mask_path, k):
    import resource
    import warnings
    from sklearn.exceptions import ConvergenceWarning
    t0 = time.perf_counter()
    img = nib.load(data_path)
    data = np.asarray(img.dataobj, dtype=np.float32)
    mask = np.asarray(nib.load(mask_path).dataobj) > 0
    t1 = time.perf_counter()
    x = data[mask].astype(np.float64)  # V x T
    del data
    x -= x.mean(axis=1, keepdims=True)
    x /= x.std(axis=1, keepdims=True)
    t2 = time.perf_counter()
    ica = FastICA(n_components=k, whiten="unit-variance", fun="logcosh", max_iter=200, tol=1e-4, random_state=0)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        maps = ica.fit_transform(x)  # V x K spatial maps
    t3 = time.perf_counter()
    converged = not any(issubclass(w.category, ConvergenceWarning) for w in caught)
    blas = "unknown (threadpoolctl not installed)"
    try:
        from threadpoolctl import threadpool_info
        infos = [i for i in threadpool_info() if i.get("user_api") == "blas"]
        blas = ", ".join(f"{i.get('internal_api')} {i.get('version')} {i.get('architecture')} kernels, {i.get('num_threads')} threads" for i in infos)
    except ImportError:
        pass
    print(json.dumps({
        "library": f"scikit-learn {sklearn.__version__}, numpy {np.__version__}, nibabel {nib.__version__}",
        "blas": blas, "read": t1 - t0, "preprocess": t2 - t1, "fastica": t3 - t2, "total": t3 - t0,
        "icaIterations": int(ica.n_iter_), "converged": converged, "V": int(x.shape[0]), "T": int(x.shape[1]),
        "k": int(maps.shape[1]), "maxRssMb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
    }))


def main():
    if sys.argv[1] == "--ica":
        ica_only(sys.argv[2], sys.argv[3], int(sys.argv[4]))
        return
    data_path, mask_path, k = sys.argv[1], sys.argv[2], int(sys.argv[3])
    t0 = time.perf_counter()
    img = nib.load(data_path)
    data = np.asarray(img.dataobj, dtype=np.float32)
    mask = np.asarray(nib.load(mask_path).dataobj) > 0
    t1 = time.perf_counter()
    x = data[mask].astype(np.float64)  # V x T
    del data
    x -= x.mean(axis=1, keepdims=True)
    x /= x.std(axis=1, keepdims=True)
    t2 = time.perf_counter()
    mle = PCA(n_components="mle", svd_solver="full").fit(x).n_components_
    t3 = time.perf_counter()
    ica = FastICA(n_components=k, whiten="unit-variance", fun="logcosh", max_iter=200, tol=1e-4, random_state=0)
    ica.fit_transform(x)
    t4 = time.perf_counter()
    print(json.dumps({
        "library": f"scikit-learn {sklearn.__version__}, numpy {np.__version__}, nibabel {nib.__version__}",
        "read": t1 - t0, "preprocess": t2 - t1, "pcaMle": t3 - t2, "fastica": t4 - t3, "total": t4 - t0,
        "mleComponents": int(mle), "icaIterations": int(ica.n_iter_),
    }))


if __name__ == "__main__":
    main()
