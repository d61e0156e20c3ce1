"""Reference values for the univariate normal in log space.

Computes ln Phi(x) and ln(Phi(b) - Phi(a)) with scipy.special.log_ndtr (Cephes-based, an
outside library from PyPI) and writes tests/reference/fixtures/normal_tails.csv.
Run: python tests/reference/normal_tails.py
"""
import csv
import os
import sys

import numpy as np
from scipy.special import log_ndtr

HERE = os.path.dirname(os.path.abspath(__file__))


def ln_interval(a, b):
    # ln(Phi(b) - Phi(a)) = ln Phi(b) + ln(1 - exp(ln Phi(a) - ln Phi(b))); upper tail by symmetry.
    if a > 0:
        a, b = -b, -a
    lb, la = log_ndtr(b), log_ndtr(a)
    return lb + np.log1p(-np.exp(la - lb))


def main():
    rows = []
    for x in np.concatenate([np.linspace(-60, -5, 56), np.linspace(-5, 8, 53)]):
        rows.append(("ln_cdf", repr(float(x)), "", repr(float(log_ndtr(x)))))
    for a, b in [(-40, -39), (-12, -11.5), (-8, -7), (-3, -2), (-1, 1), (0.5, 0.6), (7, 8), (9, 10), (20, 21)]:
        rows.append(("ln_interval", repr(float(a)), repr(float(b)), repr(float(ln_interval(a, b)))))
    out = os.path.join(sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures"), "normal_tails.csv")
    with open(out, "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["function", "a", "b", "expected"])
        w.writerows(rows)


if __name__ == "__main__":
    main()
