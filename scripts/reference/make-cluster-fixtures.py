"""Reference clusters for lib/desk/clusters.ts, made with scipy.ndimage.label (26-connectivity:
generate_binary_structure(3, 3)) on a seeded random smoothed volume. Writes
tests/fixtures/desk/clusters.json: the volume (x fastest), the threshold, and per sign the cluster
sizes (largest first) and each cluster's peak voxel and value.

Run: python3 scripts/reference/make-cluster-fixtures.py   (Debian python3-scipy)
"""
import json
import numpy as np
import scipy
from scipy import ndimage

rng = np.random.default_rng(14)
shape = (13, 11, 9)  # x, y, z
vol = ndimage.gaussian_filter(rng.standard_normal(shape), 1.2) * 6.0
threshold = 1.5
structure = ndimage.generate_binary_structure(3, 3)
clusters = []
for sign in (1, -1):
    mask = sign * vol >= threshold
    labels, n = ndimage.label(mask, structure=structure)
    for lab in range(1, n + 1):
        idx = np.argwhere(labels == lab)
        vals = np.abs(vol[labels == lab])
        peak = idx[int(np.argmax(vals))]
        clusters.append({"size": int(len(idx)), "peak": [int(v) for v in peak], "peakZ": float(vol[tuple(peak)])})
clusters.sort(key=lambda c: (-c["size"], -abs(c["peakZ"])))
out = {
    "source": f"scipy {scipy.__version__} ndimage.label, structure generate_binary_structure(3, 3)",
    "dims": list(shape),
    "threshold": threshold,
    # NIfTI order: x fastest
    "values": [float(v) for v in vol.transpose(2, 1, 0).ravel()],
    "clusters": clusters,
    "maxAbs": float(np.abs(vol).max()),
}
with open("tests/fixtures/desk/clusters.json", "w") as f:
    json.dump(out, f)
print(len(clusters), "clusters; largest", clusters[0])
