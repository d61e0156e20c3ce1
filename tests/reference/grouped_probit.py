"""Reference values for `tessera fit --from-summary` on ordinal traits: grade counts by sex, as
a paper publishes them, against statsmodels' OrderedModel fitted to the same table expanded to
one row per individual (distr="probit", exog = male indicator, no intercept).

The tables are invented for this check (they are no publication's values): a five-grade table
with an empty cell for one sex, a four-grade table, and a three-grade table given as shares
of n. The expected thresholds (transform_threshold_params), male coefficient and its standard
error are written to tests/reference/fixtures/grouped_probit_expected.csv, the tables to
tests/reference/fixtures/grouped_probit_tables.csv.
Run: python tests/reference/grouped_probit.py [OUTDIR]
"""
import csv
import os
import sys
import warnings

import numpy as np
import pandas as pd
from statsmodels.miscmodels.ordinal_model import OrderedModel

HERE = os.path.dirname(os.path.abspath(__file__))

# name -> (female counts, male counts), lowest grade first
TABLES = {
    "five_grades_empty_cell": ([14, 31, 40, 12, 3], [0, 9, 27, 38, 21]),
    "four_grades": ([22, 18, 9, 5], [6, 11, 19, 24]),
    # shares 0.35/0.45/0.20 of 40 females and 0.10/0.40/0.50 of 50 males
    "three_grades_from_shares": ([14, 18, 8], [5, 20, 25]),
}


def main():
    warnings.simplefilter("ignore")
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    tables, expected = [], []
    for name, (female, male) in TABLES.items():
        k = len(female)
        grade, is_male = [], []
        for sex, counts in ((0, female), (1, male)):
            for g, n in enumerate(counts):
                tables.append((name, sex, g + 1, n))
                grade += [g + 1] * n
                is_male += [float(sex)] * n
        y = pd.Series(pd.Categorical(grade, categories=list(range(1, k + 1)), ordered=True))
        x = np.array(is_male)[:, None]
        model = OrderedModel(y, x, distr="probit")
        res = model.fit(method="bfgs", maxiter=10000, gtol=1e-10, disp=False)
        res = model.fit(start_params=np.asarray(res.params), method="newton", maxiter=100, tol=1e-12, disp=False)
        score = np.abs(model.score(np.asarray(res.params))).max()
        # statsmodels scores by numerical differentiation: ~1e-7 is its floor here; with
        # SEs about 0.1 the estimates are then within ~1e-9 of the optimum.
        assert score < 1e-6, (name, score)
        params, bse = np.asarray(res.params), np.asarray(res.bse)
        th = model.transform_threshold_params(params)[1:-1]
        expected.append((name, "shift", params[0]))
        expected.append((name, "shift_se", bse[0]))
        for j, t in enumerate(th):
            expected.append((name, f"threshold_{j + 1}", t))
    with open(os.path.join(out, "grouped_probit_tables.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "male", "grade", "count"])
        w.writerows(tables)
    with open(os.path.join(out, "grouped_probit_expected.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "quantity", "expected"])
        for c, q, v in expected:
            w.writerow([c, q, repr(float(v))])


if __name__ == "__main__":
    main()
