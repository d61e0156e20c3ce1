"""Reference values for the Gompertz fit to interval-censored ages at death.

Seeded numpy draws 600 adult ages from a Gompertz hazard h(x) = alpha exp(beta (x - 18)),
alpha = 0.004, beta = 0.06 (invented values of the order of adult human mortality), and
records them as a lab would: 30% as points, 50% in the classes 18-25, 25-35, 35-50, 50+
(open), 20% in five-year intervals. The interval-censored log-likelihood (points: ln h - H;
intervals: ln(S(a) - S(b)); open: ln S(a)) is maximised with scipy.optimize.minimize
(Nelder-Mead to 1e-12, then BFGS polish); written: the ages to
tests/reference/fixtures/gompertz_ages.csv and ln alpha, beta and the maximum log-likelihood
to tests/reference/fixtures/gompertz_expected.csv.
Run: python tests/reference/gompertz.py [OUTDIR]
"""
import csv
import os
import sys

import numpy as np
from scipy.optimize import minimize

HERE = os.path.dirname(os.path.abspath(__file__))
X0 = 18.0


def cumulative(la, b, t):
    a = np.exp(la)
    return a * np.expm1(b * t) / b


def loglik(theta, ages):
    la, b = theta
    total = 0.0
    for lo, hi in ages:
        t0 = lo - X0
        ha = cumulative(la, b, t0)
        if hi is None:
            total += -ha
        elif hi == lo:
            total += la + b * t0 - ha
        else:
            d = cumulative(la, b, hi - X0) - ha
            total += -ha + np.log(-np.expm1(-d))
    return total


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    rng = np.random.default_rng(20261204)
    alpha, beta = 0.004, 0.06
    u = rng.uniform(size=600)
    t = np.log1p(beta * -np.log(u) / alpha) / beta
    x = X0 + t
    kind = rng.uniform(size=600)
    classes = [(18.0, 25.0), (25.0, 35.0), (35.0, 50.0), (50.0, None)]
    ages = []
    for xi, k in zip(x, kind):
        if k < 0.3:
            v = round(float(xi), 1)
            ages.append((v, v))
        elif k < 0.8:
            for lo, hi in classes:
                if hi is None or xi < hi:
                    ages.append((lo, hi))
                    break
        else:
            lo = 18.0 + 5.0 * np.floor((xi - 18.0) / 5.0)
            ages.append((float(lo), float(lo + 5.0)))
    f = lambda th: -loglik(th, ages)
    r = minimize(f, [np.log(0.01), 0.05], method="Nelder-Mead",
                 options={"xatol": 1e-12, "fatol": 1e-14, "maxiter": 20000, "maxfev": 40000})
    r = minimize(f, r.x, method="BFGS", options={"gtol": 1e-9})
    with open(os.path.join(out, "gompertz_ages.csv"), "w", newline="") as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(["low", "high"])
        for lo, hi in ages:
            w.writerow([repr(lo), "" if hi is None else repr(hi)])
    with open(os.path.join(out, "gompertz_expected.csv"), "w", newline="") as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(["quantity", "expected"])
        w.writerow(["ln_alpha", repr(float(r.x[0]))])
        w.writerow(["beta", repr(float(r.x[1]))])
        w.writerow(["log_likelihood", repr(float(-r.fun))])


if __name__ == "__main__":
    main()
