"""Reference values for age at death by sex over joint draws.

A small set of joint draws of sex (seeded numpy), point ages and a 0/1 condition are written to
tests/reference/fixtures/by_sex_draws.csv; the expected results — mean age by sex over draws
with 2.5%/97.5% order statistics, and the share of draws in which females die younger — are
written to tests/reference/fixtures/by_sex_expected.csv, computed independently with numpy.
(Prevalence by sex comes from the joint posterior, not from these draws: see
prevalence_by_sex.py.)
Run: python tests/reference/by_sex.py [OUTDIR]
"""
import csv
import os
import sys

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))


def order_stat(v, p):
    s = np.sort(np.asarray(v))
    return s[min(int(round(p * (len(s) - 1))), len(s) - 1)]


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    rng = np.random.default_rng(20261201)
    n, m = 14, 60
    p_female = rng.uniform(0.05, 0.95, n)
    ages = rng.integers(18, 75, n).astype(float)
    cond = rng.integers(0, 2, n)
    cond_missing = rng.uniform(size=n) < 0.15
    draws = rng.uniform(size=(m, n)) < p_female
    with open(os.path.join(out, "by_sex_draws.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["draw"] + [f"i{i}" for i in range(n)])
        w.writerow(["age"] + [repr(float(a)) for a in ages])
        w.writerow(["condition"] + ["NA" if cond_missing[i] else str(cond[i]) for i in range(n)])
        for d in range(m):
            w.writerow([d + 1] + ["F" if x else "M" for x in draws[d]])
    mf, mm, diff = [], [], []
    younger = 0
    for d in range(m):
        fem = draws[d]
        x, y = ages[fem].mean(), ages[~fem].mean()
        mf.append(x); mm.append(y); diff.append(x - y)
        younger += x < y
    rows = []
    for name, v in {"mean_age_female": mf, "mean_age_male": mm, "age_difference": diff}.items():
        rows += [(name, np.mean(v)), (name + "_lo", order_stat(v, 0.025)), (name + "_hi", order_stat(v, 0.975))]
    rows.append(("p_females_die_younger", younger / m))
    with open(os.path.join(out, "by_sex_expected.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["quantity", "expected"])
        for k, v in rows:
            w.writerow([k, repr(float(v))])


if __name__ == "__main__":
    main()
