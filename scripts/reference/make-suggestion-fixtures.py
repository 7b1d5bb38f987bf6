#!/usr/bin/python3
"""Reference fixtures for the L2 logistic regression in lib/suggestions/logistic-regression.ts.

Writes tests/fixtures/suggestions/logistic.json: a seeded two-class data set (120 rows, 4 columns,
overlapping classes so the fit is finite) and the intercept and coefficients of scikit-learn's
LogisticRegression(penalty='l2', C, solver='newton-cg', tol=1e-9, max_iter=10000) for several C,
using the Debian package python3-sklearn (version recorded in the file).
Run from the repository root:  /usr/bin/python3 scripts/reference/make-suggestion-fixtures.py
"""
import json
import os

import numpy as np
import sklearn
from sklearn.linear_model import LogisticRegression

OUT = os.path.join("tests", "fixtures", "suggestions", "logistic.json")

rng = np.random.default_rng(20261202)
n = 120
X = rng.normal(size=(n, 4))
X[:, 3] = 0.6 * X[:, 0] + 0.4 * rng.normal(size=n)  # a correlated column
logit = 0.8 + 1.5 * X[:, 0] - 1.0 * X[:, 1] + 0.3 * X[:, 2]
y = (rng.uniform(size=n) < 1 / (1 + np.exp(-logit))).astype(int)

fits = []
for C in (0.1, 1.0, 10.0):
    m = LogisticRegression(penalty="l2", C=C, solver="newton-cg", tol=1e-9, max_iter=10000).fit(X, y)
    fits.append({
        "C": C,
        "intercept": float(m.intercept_[0]),
        "coefficients": [float(v) for v in m.coef_[0]],
        "probabilities": [float(v) for v in m.predict_proba(X[:5])[:, 1]],
    })

os.makedirs(os.path.dirname(OUT), exist_ok=True)
with open(OUT, "w") as f:
    json.dump({"source": f"scikit-learn {sklearn.__version__} LogisticRegression(penalty='l2', solver='newton-cg')",
               "X": X.tolist(), "y": y.tolist(), "fits": fits}, f)
print("wrote", OUT)
