"""Reference box probabilities of multivariate normals in 2 to 6 dimensions.

scipy.stats.multivariate_normal.cdf (Genz's algorithm as implemented in scipy, an outside
library from PyPI) with tight tolerances (abseps = releps = 1e-8, maxpts = 5e6, seeded rng).
Writes tests/reference/fixtures/mvn_boxes.csv: one row per case with the dimension, the
covariance (row-major, ';'-separated), lower and upper bounds, and ln P.
Run: python tests/reference/mvn_boxes.py
"""
import csv
import os
import sys

import numpy as np
from scipy.stats import multivariate_normal

HERE = os.path.dirname(os.path.abspath(__file__))


def random_corr(rng, d):
    a = rng.normal(size=(d, d + 2))
    s = a @ a.T
    dinv = np.diag(1 / np.sqrt(np.diag(s)))
    return dinv @ s @ dinv


def main():
    rng = np.random.default_rng(20261201)
    rows = []
    for d in [2, 2, 2, 3, 3, 3, 4, 4, 5, 5, 6, 6]:
        cov = random_corr(rng, d) * np.outer(sd := rng.uniform(0.5, 2.0, d), sd)
        lower = rng.uniform(-2.5, 0.5, d)
        upper = lower + rng.uniform(0.3, 3.0, d)
        # Some open ends, as ordinal boxes at the first and last grade have.
        for i in range(d):
            if rng.uniform() < 0.2:
                lower[i] = -np.inf
            elif rng.uniform() < 0.2:
                upper[i] = np.inf
        p = multivariate_normal.cdf(upper, mean=np.zeros(d), cov=cov, lower_limit=lower,
                                    maxpts=5_000_000, abseps=1e-8, releps=1e-8,
                                    rng=np.random.default_rng(7))
        rows.append([d, ";".join(repr(float(x)) for x in cov.ravel()),
                     ";".join(repr(float(x)) for x in lower),
                     ";".join(repr(float(x)) for x in upper), repr(float(np.log(p)))])
    out = os.path.join(sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures"), "mvn_boxes.csv")
    with open(out, "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["dim", "cov", "lower", "upper", "ln_p"])
        w.writerows(rows)


if __name__ == "__main__":
    main()
