"""Reference values for age as a covariate in `tessera fit` (blocks with `age_slope: true`).

Ordinal: grades drawn with a seeded numpy generator from
x = shift * male + slope_f * female * (age - c) + slope_m * male * (age - c) + N(0, 1), cut at
known thresholds, ages uniform whole years 20..80, c = 50; statsmodels' OrderedModel
(distr="probit", exog = [male, female*(age-c), male*(age-c)], no intercept) fitted by BFGS and
polished by Newton steps. Metric: y = mean_s + slope_s (age - c) + N(0, sd_s^2) per sex;
statsmodels' OLS of y on [1, age - c] per sex gives the mean at c and the slope; their
standard errors are converted from OLS's divisor n - 2 to the maximum-likelihood divisor n
that tessera uses (multiplied by sqrt((n - 2) / n)).

Data: tests/reference/fixtures/age_probit_data.csv; expected values:
tests/reference/fixtures/age_probit_expected.csv.
Run: python tests/reference/age_probit.py [OUTDIR]
"""
import csv
import os
import sys
import warnings

import numpy as np
import pandas as pd
import statsmodels.api as sm
from statsmodels.miscmodels.ordinal_model import OrderedModel

HERE = os.path.dirname(os.path.abspath(__file__))
CENTRE = 50.0

ORDINAL = [
    # name, n, thresholds, shift, female slope, male slope (per year)
    ("ordinal_female_masculinises", 600, [-1.0, -0.2, 0.6, 1.4], 1.2, 0.02, 0.004),
    ("ordinal_three_grades", 300, [-0.3, 0.9], 1.5, 0.015, -0.01),
]
METRIC = [
    # name, n, female mean at c, male mean at c, female slope, male slope, sd f, sd m
    ("metric_femur_head_like", 400, 42.0, 47.0, 0.03, 0.01, 2.5, 2.8),
]


def main():
    warnings.simplefilter("ignore")
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    rng = np.random.default_rng(20261205)
    data, expected = [], []
    for name, n, tau, shift, bf, bm in ORDINAL:
        male = (np.arange(n) % 2).astype(float)
        age = rng.integers(20, 81, size=n).astype(float)
        d = age - CENTRE
        x = shift * male + bf * (1 - male) * d + bm * male * d + rng.standard_normal(n)
        grade = 1 + np.searchsorted(np.array(tau), x)
        k = len(tau) + 1
        for m, a, g in zip(male, age, grade):
            data.append((name, k, int(m), int(a), int(g)))
        y = pd.Series(pd.Categorical(grade, categories=list(range(1, k + 1)), ordered=True))
        exog = np.column_stack([male, (1 - male) * d, male * d])
        model = OrderedModel(y, exog, distr="probit")
        res = model.fit(method="bfgs", maxiter=10000, gtol=1e-10, disp=False)
        res = model.fit(start_params=np.asarray(res.params), method="newton", maxiter=100, tol=1e-12, disp=False)
        assert np.abs(model.score(np.asarray(res.params))).max() < 1e-6, name
        params, bse = np.asarray(res.params), np.asarray(res.bse)
        th = model.transform_threshold_params(params)[1:-1]
        for j, q in enumerate(["shift", "slope_female", "slope_male"]):
            expected.append((name, q, params[j]))
            expected.append((name, q + "_se", bse[j]))
        for j, t in enumerate(th):
            expected.append((name, f"threshold_{j + 1}", t))
    for name, n, mf, mm, bf, bm, sf, sm_ in METRIC:
        male = (np.arange(n) % 2).astype(float)
        age = rng.integers(20, 81, size=n).astype(float)
        d = age - CENTRE
        mean = np.where(male == 1, mm + bm * d, mf + bf * d)
        sd = np.where(male == 1, sm_, sf)
        y = np.round(mean + sd * rng.standard_normal(n), 1)
        for m, a, v in zip(male, age, y):
            data.append((name, 0, int(m), int(a), repr(float(v))))
        for s, word in ((0, "female"), (1, "male")):
            keep = male == s
            res = sm.OLS(y[keep], sm.add_constant(d[keep])).fit()
            k = keep.sum()
            ml = np.sqrt((k - 2) / k)
            expected.append((name, f"mean_{word}", res.params[0]))
            expected.append((name, f"mean_{word}_se", res.bse[0] * ml))
            expected.append((name, f"slope_{word}", res.params[1]))
            expected.append((name, f"slope_{word}_se", res.bse[1] * ml))
            expected.append((name, f"sd_{word}", np.sqrt(res.ssr / k)))
    with open(os.path.join(out, "age_probit_data.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "n_grades", "male", "age", "value"])
        w.writerows(data)
    with open(os.path.join(out, "age_probit_expected.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "quantity", "expected"])
        for c, q, v in expected:
            w.writerow([c, q, repr(float(v))])


if __name__ == "__main__":
    main()
