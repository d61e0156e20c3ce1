"""Reference values for the posterior of pi (proportion female) in small assemblages.

p(pi | D) ∝ Beta(pi; a, b) prod_i (pi LR_i + 1 - pi), integrated directly with
scipy.integrate.quad (adaptive Gauss-Kronrod, an outside library from PyPI), quantiles by
scipy.optimize.brentq on the integrated CDF, and P(F | D) per individual by quadrature.
Writes tests/reference/fixtures/pi_posterior.csv.
Run: python tests/reference/pi_posterior.py [OUTDIR]
"""
import csv
import math
import os
import sys

import numpy as np
from scipy import integrate, optimize
from scipy.special import betaln

HERE = os.path.dirname(os.path.abspath(__file__))

CASES = [
    # (a, b, ln LR of each individual)
    (1.0, 1.0, [2.3, -1.1, 0.4, 5.0, -3.2]),
    (2.0, 5.0, [0.7, 0.9, -0.2]),
    (48.78, 51.22, [3.0, -3.0, 1.0, -1.0, 6.0, -6.0, 0.1]),
    (0.5, 0.5, [8.0, 7.5, 9.1, -0.3]),
    (9.0, 1.0, [-4.0, -2.0, 1.0, -5.5, -3.3, 0.2]),
    # Extreme evidence: the posterior is then Beta(a + n_F, b + n_M) = Beta(5, 8).
    (1.0, 2.0, [40.0, 40.0, 40.0, 40.0, -40.0, -40.0, -40.0, -40.0, -40.0, -40.0]),
]


def log_unnorm(pi, a, b, l):
    lp, lq = math.log(pi), math.log1p(-pi)
    s = (a - 1) * lp + (b - 1) * lq - betaln(a, b)
    for x in l:
        s += np.logaddexp(lp + x, lq)
    return s


def main():
    rows = []
    opts = dict(limit=500, epsabs=1e-13, epsrel=1e-11)
    for k, (a, b, l) in enumerate(CASES):
        # Scale by the density at a central point so nothing under- or overflows.
        ref = log_unnorm(0.5, a, b, l)
        dens = lambda p: math.exp(log_unnorm(p, a, b, l) - ref)
        z = integrate.quad(dens, 0, 1, **opts)[0]
        mean = integrate.quad(lambda p: p * dens(p), 0, 1, **opts)[0] / z
        cdf = lambda x: integrate.quad(dens, 0, x, **opts)[0] / z
        q = lambda t: optimize.brentq(lambda x: cdf(x) - t, 1e-12, 1 - 1e-12, xtol=1e-13)
        lrs = ";".join(repr(x) for x in l)
        vals = [("mean", mean), ("median", q(0.5)), ("q025", q(0.025)), ("q975", q(0.975)), ("p_below_half", cdf(0.5))]
        for i, x in enumerate(l):
            pf = integrate.quad(lambda p: p * math.exp(x) / (p * math.exp(x) + 1 - p) * dens(p), 0, 1, **opts)[0] / z
            vals.append((f"p_female_{i}", pf))
        for name, v in vals:
            rows.append([k, repr(a), repr(b), lrs, name, repr(float(v))])
    out = os.path.join(sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures"), "pi_posterior.csv")
    with open(out, "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "a", "b", "ln_lrs", "quantity", "expected"])
        w.writerows(rows)


if __name__ == "__main__":
    main()
