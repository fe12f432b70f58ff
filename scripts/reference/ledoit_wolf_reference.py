#!/usr/bin/python3
"""Ledoit-Wolf reference numbers from scikit-learn, for eigencov's LedoitWolfReferenceTest.

Run once (Debian: apt-get install -y python3-sklearn; then /usr/bin/python3):

    scripts/reference/ledoit_wolf_reference.py > src/test/resources/reference/ledoit_wolf/sklearn.json

For two outside datasets already among the test resources (hedgefund2005: K = 16 > T = 12;
smallcap: K = 20 < T = 60) it writes scikit-learn's shrunk covariance and intensity
(sklearn.covariance.ledoit_wolf, which centres by the sample mean and uses divisor T, as
docs/methods.md section 5 does), the sample covariance with divisor T
(sklearn.covariance.empirical_covariance), and numpy's log-determinant, a quadratic form
x' Sigma^-1 x and the fully invested minimum-variance weights of each, so that the Java
inverses (Woodbury or Cholesky) are checked too. Nothing here is tuned to eigencov.
"""
import csv
import json
import os
import sys

import numpy as np
import sklearn
from sklearn.covariance import empirical_covariance, ledoit_wolf

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "src", "test", "resources", "reference")


def panel(name):
    """T x K matrix in the order the CSV first names dates and assets."""
    dates, assets, values = [], [], {}
    with open(os.path.join(ROOT, name, "returns.csv"), newline="") as f:
        for row in csv.DictReader(f):
            if row["date"] not in values:
                dates.append(row["date"])
                values[row["date"]] = {}
            if row["asset"] not in assets:
                assets.append(row["asset"])
            values[row["date"]][row["asset"]] = float(row["return"])
    x = np.array([[values[d][a] for a in assets] for d in dates])
    return assets, x


def inverse_figures(sigma, x):
    sign, logdet = np.linalg.slogdet(sigma)
    ones = np.ones(sigma.shape[0])
    v = np.linalg.solve(sigma, ones)
    return {
        "logDeterminant": float(logdet) if sign > 0 else None,
        "quadraticForm": float(x @ np.linalg.solve(sigma, x)),
        "minimumVarianceWeights": (v / v.sum()).tolist(),
        "minimumVariance": float(1.0 / v.sum()),
    }


def main():
    out = {
        "generator": "scripts/reference/ledoit_wolf_reference.py",
        "software": {"scikit-learn": sklearn.__version__, "numpy": np.__version__, "python": sys.version.split()[0]},
        "conventions": "rows = dates, columns = assets in the order of first appearance in returns.csv; "
                       "ledoit_wolf(X, assume_centered=False): mean removed, divisor T; "
                       "quadraticForm uses x_i = 0.01 * (-1)^i * (1 + i / K), i = 0..K-1",
        "datasets": {},
    }
    for name in ("hedgefund2005", "smallcap"):
        assets, x = panel(name)
        t, k = x.shape
        shrunk, shrinkage = ledoit_wolf(x)
        sample = empirical_covariance(x)
        probe = np.array([0.01 * (-1) ** i * (1 + i / k) for i in range(k)])
        entry = {
            "T": t, "K": k, "assets": assets,
            "shrinkage": float(shrinkage),
            "shrunkCovariance": shrunk.tolist(),
            "sampleCovariance": sample.tolist(),
            "ledoitWolfInverse": inverse_figures(shrunk, probe),
        }
        if k < t:
            entry["sampleInverse"] = inverse_figures(sample, probe)
        out["datasets"][name] = entry
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
