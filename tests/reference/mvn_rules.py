"""Reference box probabilities for the deterministic rules of src/numeric/box_rules.rs.

Pure mpmath at 30 significant digits, from inputs written as exact decimals (no BLAS, no
SIMD: the values are the same on every processor):

- three-dimensional boxes by nested integration of the separation of variables (Genz 1992):
  with the Cholesky factor L of the covariance, X = L z and
  P = int phi(z1) int phi(z2) [Phi(u3(z1, z2)) - Phi(l3(z1, z2))] dz2 dz1 over the limits
  the box sets for z1 and, given z1, for z2. This route uses neither the one-factor reduction
  nor the bivariate normal routine, so it checks both rules in three dimensions;
- four to six dimensions with a one-factor covariance (Sigma = lambda lambda' + diag(d)): the
  one-factor integral P = int phi(z) prod_i [Phi((b_i - lambda_i z)/sqrt(d_i))
  - Phi((a_i - lambda_i z)/sqrt(d_i))] dz (Curnow & Dunnett 1962), and, to check that
  reduction itself, scipy's multivariate normal CDF on the same box (Genz's randomised
  algorithm, abseps 1e-9): the script stops if the two differ by more than scipy's
  tolerance.

The boxes are those of ordinal grades in the shipped model (thresholds minus a sex's means,
models/default.yaml), tail boxes of extreme grades, and covariances of our own choosing.
Written to tests/reference/fixtures/mvn_rules.csv: dimension, covariance (row-major,
';'-separated), lower, upper, ln P.
Run: python tests/reference/mvn_rules.py [OUTDIR]
"""
import csv
import os
import sys

import mpmath as mp
import numpy as np
from scipy.stats import multivariate_normal

HERE = os.path.dirname(os.path.abspath(__file__))
mp.mp.dps = 30
INF = "inf"

CRANIUM_T = ["-1.3", "-0.45", "0.45", "1.3"]
PELVIS_T = ["-1.2", "-0.4", "0.4", "1.2"]


def num(s):
    if s == INF:
        return mp.inf
    if s == "-" + INF:
        return -mp.inf
    return mp.mpf(s)


def grade_box(thresholds, means, grades):
    """Bounds of the latent variables for grades (low, high) 1..5, less each trait's mean."""
    lower, upper = [], []
    for (lo, hi), m in zip(grades, means):
        a = "-inf" if lo == 1 else thresholds[lo - 2]
        b = INF if hi == 5 else thresholds[hi - 1]
        lower.append(a if a == "-inf" else mp.nstr(mp.mpf(a) - mp.mpf(m), 20))
        upper.append(b if b == INF else mp.nstr(mp.mpf(b) - mp.mpf(m), 20))
    return lower, upper


def equicorrelated(n, rho):
    return [["1" if i == j else rho for j in range(n)] for i in range(n)]


def one_factor_cov(loadings, own):
    n = len(loadings)
    return [[mp.nstr(mp.mpf(loadings[i]) * mp.mpf(loadings[j]) + (mp.mpf(own[i]) if i == j else 0), 25)
             for j in range(n)] for i in range(n)]


def sov3(cov, lower, upper):
    """Three dimensions: nested separation of variables."""
    s = mp.matrix([[num(x) for x in row] for row in cov])
    l = mp.cholesky(s)
    a = [num(x) for x in lower]
    b = [num(x) for x in upper]

    def inner(z1):
        lo2 = (a[1] - l[1, 0] * z1) / l[1, 1]
        hi2 = (b[1] - l[1, 0] * z1) / l[1, 1]

        def f(z2):
            m = l[2, 0] * z1 + l[2, 1] * z2
            return mp.npdf(z2) * (mp.ncdf((b[2] - m) / l[2, 2]) - mp.ncdf((a[2] - m) / l[2, 2]))

        return mp.npdf(z1) * mp.quad(f, [lo2, hi2])

    return mp.quad(inner, [a[0] / l[0, 0], b[0] / l[0, 0]])


def one_factor(loadings, own, lower, upper):
    lam = [mp.mpf(x) for x in loadings]
    sd = [mp.sqrt(mp.mpf(x)) for x in own]
    a = [num(x) for x in lower]
    b = [num(x) for x in upper]

    def f(z):
        p = mp.npdf(z)
        for i in range(len(lam)):
            p *= mp.ncdf((b[i] - lam[i] * z) / sd[i]) - mp.ncdf((a[i] - lam[i] * z) / sd[i])
        return p

    return mp.quad(f, [-mp.inf, -4, 0, 4, mp.inf])


def scipy_check(cov, lower, upper, p):
    c = np.array([[float(x) for x in row] for row in cov])
    lo = np.array([float(num(x)) for x in lower])
    hi = np.array([float(num(x)) for x in upper])
    q = multivariate_normal.cdf(hi, mean=np.zeros(len(lo)), cov=c, lower_limit=lo,
                                maxpts=20_000_000, abseps=1e-9, releps=1e-7,
                                rng=np.random.default_rng(11))
    if not abs(q - float(p)) <= 5e-9 + 1e-6 * float(p):
        sys.exit(f"one-factor reduction disagrees with scipy: {mp.nstr(p, 15)} vs {q}")


def cases():
    cran_f = ["-0.99", "-0.94", "-0.78", "-0.78", "-0.73"]
    cran_m = [x[1:] for x in cran_f]
    pelv_f = ["-1.45", "-1.25", "-1.15", "-0.9"]
    # Three dimensions (nested separation of variables).
    three = []
    lo, hi = grade_box(PELVIS_T, pelv_f[:3], [(2, 3), (1, 1), (4, 4)])
    three.append((equicorrelated(3, "0.45"), lo, hi))
    lo, hi = grade_box(CRANIUM_T, cran_f[:3], [(5, 5), (5, 5), (5, 5)])
    three.append((equicorrelated(3, "0.35"), lo, hi))
    # Not of one-factor form: l2^2 = r12 r23 / r13 > 1, and a sign pattern with no factor.
    three.append(([["1", "1", "0.05"], ["1", "4", "0.3"], ["0.05", "0.3", "0.25"]],
                  ["-1", "-inf", "0"], ["0.5", "0.2", "inf"]))
    three.append(([["1", "-0.4", "-0.3"], ["-0.4", "1", "-0.2"], ["-0.3", "-0.2", "1"]],
                  ["-0.5", "-2", "0.1"], ["0.5", "3", "0.2"]))
    three.append(([["2", "0.6", "-0.3"], ["0.6", "1", "0.4"], ["-0.3", "0.4", "0.5"]],
                  ["1.5", "-inf", "0.8"], ["inf", "-1", "inf"]))
    # Four to six dimensions, one-factor (mpmath integral, checked by scipy).
    factor = []
    rho_c, rho_p = "0.35", "0.45"
    lam_c = [mp.nstr(mp.sqrt(mp.mpf(rho_c)), 25)] * 5
    own_c = [mp.nstr(1 - mp.mpf(rho_c), 25)] * 5
    lam_p = [mp.nstr(mp.sqrt(mp.mpf(rho_p)), 25)] * 4
    own_p = [mp.nstr(1 - mp.mpf(rho_p), 25)] * 4
    lo, hi = grade_box(CRANIUM_T, cran_f, [(1, 1), (3, 3), (5, 5), (2, 2), (4, 4)])
    factor.append((equicorrelated(5, rho_c), lam_c, own_c, lo, hi))
    lo, hi = grade_box(CRANIUM_T, cran_m, [(1, 1)] * 5)
    factor.append((equicorrelated(5, rho_c), lam_c, own_c, lo, hi))
    lo, hi = grade_box(PELVIS_T, pelv_f, [(5, 5)] * 4)
    factor.append((equicorrelated(4, rho_p), lam_p, own_p, lo, hi))
    lo, hi = grade_box(PELVIS_T, pelv_f, [(1, 2), (2, 2), (1, 1), (3, 4)])
    factor.append((equicorrelated(4, rho_p), lam_p, own_p, lo, hi))
    lam = ["0.9", "-0.4", "1.3", "0.2", "0.7", "-0.8"]
    own = ["0.5", "1", "0.3", "2", "0.6", "0.4"]
    factor.append((one_factor_cov(lam, own), lam, own,
                   ["-1", "-inf", "0", "-0.5", "-inf", "-2"], ["0.5", "0.2", "inf", "1.5", "1", "0"]))
    return three, factor


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    three, factor = cases()
    rows = []
    for cov, lo, hi in three:
        p = sov3(cov, lo, hi)
        rows.append((3, cov, lo, hi, p))
    for cov, lam, own, lo, hi in factor:
        p = one_factor(lam, own, lo, hi)
        scipy_check(cov, lo, hi, p)
        rows.append((len(lo), cov, lo, hi, p))
    with open(os.path.join(out, "mvn_rules.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["dim", "cov", "lower", "upper", "ln_p"])
        for d, cov, lo, hi, p in rows:
            w.writerow([d, ";".join(x for row in cov for x in row), ";".join(lo), ";".join(hi),
                        mp.nstr(mp.log(p), 17)])


if __name__ == "__main__":
    main()
