"""Reference values for the univariate cumulative probit (tessera fit's ordinal margins).

Grades are drawn with a seeded numpy generator from x = shift * male + N(0, 1) cut at known
thresholds (three cases) and written to tests/reference/fixtures/ordered_probit_data.csv.
statsmodels' OrderedModel (distr="probit", exog = male indicator, no intercept: an outside
library from PyPI) is fitted to each case by BFGS, then polished by Newton steps; its
thresholds (transform_threshold_params), the male coefficient and their standard errors are
written to tests/reference/fixtures/ordered_probit_expected.csv.
Run: python tests/reference/ordered_probit.py [OUTDIR]
"""
import csv
import os
import sys
import warnings

import numpy as np
from statsmodels.miscmodels.ordinal_model import OrderedModel

HERE = os.path.dirname(os.path.abspath(__file__))

CASES = [
    # name, n, thresholds, shift
    ("five_grades", 300, [-1.2, -0.4, 0.4, 1.2], 1.0),
    ("four_grades_small", 60, [-0.5, 0.3, 1.1], 0.8),
    ("three_grades_strong", 150, [-0.2, 1.5], 2.2),
]


def main():
    # BFGS stops on its own tolerance before the Newton polish; the gradient check below is
    # what decides convergence.
    warnings.simplefilter("ignore")
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    rng = np.random.default_rng(2026)
    data, expected = [], []
    for name, n, tau, shift in CASES:
        male = (np.arange(n) % 2).astype(float)
        x = shift * male + rng.standard_normal(n)
        grade = 1 + np.searchsorted(np.array(tau), x)
        for m, g in zip(male, grade):
            data.append((name, len(tau) + 1, int(m), int(g)))
        y = pandas_ordered(grade, len(tau) + 1)
        model = OrderedModel(y, male[:, None], distr="probit")
        start = np.concatenate([[0.0], [tau[0]], np.log(np.diff(tau))])
        res = model.fit(start_params=start, method="bfgs", maxiter=10000, gtol=1e-9, disp=False)
        # Polish with Newton steps from the BFGS answer.
        res = model.fit(start_params=np.asarray(res.params), method="newton", maxiter=100, tol=1e-10, disp=False)
        assert np.abs(model.score(np.asarray(res.params))).max() < 1e-6, name
        params, bse = np.asarray(res.params), np.asarray(res.bse)
        th = model.transform_threshold_params(params)[1:-1]
        expected.append((name, "shift", params[0]))
        expected.append((name, "shift_se", bse[0]))
        for k, t in enumerate(th):
            expected.append((name, f"threshold_{k + 1}", t))
    with open(os.path.join(out, "ordered_probit_data.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "n_grades", "male", "grade"])
        w.writerows(data)
    with open(os.path.join(out, "ordered_probit_expected.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "quantity", "expected"])
        for c, q, v in expected:
            w.writerow([c, q, repr(float(v))])


def pandas_ordered(grade, k):
    import pandas as pd

    return pd.Series(pd.Categorical(grade, categories=list(range(1, k + 1)), ordered=True))


if __name__ == "__main__":
    main()
