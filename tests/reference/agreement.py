"""Reference values for observer agreement.

Pairs of grades (1-5) and of measurements are drawn with a seeded numpy generator and written
to tests/reference/fixtures/agreement_pairs.csv; expected linear- and quadratic-weighted kappa
come from scikit-learn's cohen_kappa_score (an outside library from PyPI, with
labels=[1..5] so that unused grades still count), TEM from its definition sqrt(sum d^2 / 2n),
and ICC(2,1) from the two-way ANOVA mean squares of Shrout & Fleiss (1979), computed with
numpy. Written to tests/reference/fixtures/agreement_expected.csv.
Run: python tests/reference/agreement.py [OUTDIR]
"""
import csv
import os
import sys

import numpy as np
from sklearn.metrics import cohen_kappa_score

HERE = os.path.dirname(os.path.abspath(__file__))


def icc21(x):
    n, k = x.shape
    grand = x.mean()
    msr = k * ((x.mean(axis=1) - grand) ** 2).sum() / (n - 1)
    msc = n * ((x.mean(axis=0) - grand) ** 2).sum() / (k - 1)
    sse = ((x - x.mean(axis=1, keepdims=True) - x.mean(axis=0, keepdims=True) + grand) ** 2).sum()
    mse = sse / ((n - 1) * (k - 1))
    return (msr - mse) / (msr + (k - 1) * mse + k * (msc - mse) / n)


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    rng = np.random.default_rng(7)
    n = 40
    true = rng.integers(1, 6, n)
    a = np.clip(true + rng.choice([-1, 0, 0, 0, 1], n), 1, 5)
    b = np.clip(true + rng.choice([-2, -1, 0, 0, 1], n), 1, 5)
    size = rng.normal(45, 3, n)
    ma = np.round(size + rng.normal(0, 0.4, n), 1)
    mb = np.round(size + rng.normal(0.2, 0.4, n), 1)
    with open(os.path.join(out, "agreement_pairs.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["grade_a", "grade_b", "measure_a", "measure_b"])
        for i in range(n):
            w.writerow([int(a[i]), int(b[i]), repr(float(ma[i])), repr(float(mb[i]))])
    labels = [1, 2, 3, 4, 5]
    rows = [
        ("kappa_linear", cohen_kappa_score(a, b, labels=labels, weights="linear")),
        ("kappa_quadratic", cohen_kappa_score(a, b, labels=labels, weights="quadratic")),
        ("tem", np.sqrt(((ma - mb) ** 2).sum() / (2 * n))),
        ("icc_2_1", icc21(np.column_stack([ma, mb]))),
    ]
    with open(os.path.join(out, "agreement_expected.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["quantity", "expected"])
        for k, v in rows:
            w.writerow([k, repr(float(v))])


if __name__ == "__main__":
    main()
