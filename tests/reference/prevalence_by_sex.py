"""Exact posterior moments of the prevalences by sex for a small assemblage.

Ten individuals with a fixed ln likelihood ratio of female against male and a 0/1 condition
(one not recorded, one left out of the table as a subadult whose DNA still sexes it, one with
no evidence). The joint posterior of (pi, p_F, p_M), with uniform priors on all three, is

    p(pi, p_F, p_M | D) ∝ prod_i [pi LR_i f_F(y_i) + (1 - pi) f_M(y_i)],

f_S(y) = p_S^y (1 - p_S)^(1 - y), and f = 1 where y is not in the table. Every factor is
linear in each of pi, p_F and p_M, so the integrand is a polynomial of degree at most 12 in
each variable and a 16-point Gauss-Legendre rule per axis (exact to degree 31) integrates it
exactly up to rounding. P(p_F > p_M) is the same integral over the triangle p_M < p_F,
mapped onto the square by p_M = u p_F (Jacobian p_F), still polynomial.

Writes tests/reference/fixtures/prevalence_by_sex.csv (inputs) and
prevalence_by_sex_expected.csv. Run: python tests/reference/prevalence_by_sex.py [OUTDIR]
"""
import csv
import os
import sys

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))

# (ln LR, estimable, in the table, condition: 1, 0 or None)
PEOPLE = [
    (2.3, True, True, 1),
    (1.1, True, True, 1),
    (0.4, True, True, 0),
    (-0.7, True, True, 1),
    (-1.9, True, True, 0),
    (-2.8, True, True, 0),
    (3.0, True, True, None),
    (-0.2, True, True, 0),
    (4.5, True, False, 1),   # a subadult sexed by DNA: in pi, not in the table
    (0.0, False, False, 1),  # no evidence: left out
]


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    x, w = np.polynomial.legendre.leggauss(16)
    x, w = (x + 1) / 2, w / 2
    pi, pf, pm = np.meshgrid(x, x, x, indexing="ij")
    wt = w[:, None, None] * w[None, :, None] * w[None, None, :]

    def posterior(pi, pf, pm):
        dens = np.ones_like(pi)
        for l, est, table, y in PEOPLE:
            if not est:
                continue
            ff = np.ones_like(pf) if (y is None or not table) else (pf if y else 1 - pf)
            fm = np.ones_like(pm) if (y is None or not table) else (pm if y else 1 - pm)
            dens = dens * (pi * np.exp(l) * ff + (1 - pi) * fm)
        return dens

    dens = posterior(pi, pf, pm) * wt
    z = dens.sum()
    e = lambda f: (f * dens).sum() / z
    rows = [
        ("mean_p_female", e(pf)),
        ("sd_p_female", np.sqrt(e(pf**2) - e(pf) ** 2)),
        ("mean_p_male", e(pm)),
        ("sd_p_male", np.sqrt(e(pm**2) - e(pm) ** 2)),
        ("mean_difference", e(pf - pm)),
        ("sd_difference", np.sqrt(e((pf - pm) ** 2) - e(pf - pm) ** 2)),
        ("mean_pi", e(pi)),
    ]
    # P(p_F > p_M): p_M = u p_F over the unit square, Jacobian p_F.
    u = pm
    tri = posterior(pi, pf, u * pf) * pf * wt
    rows.append(("p_female_higher", tri.sum() / z))
    with open(os.path.join(out, "prevalence_by_sex.csv"), "w", newline="") as f:
        wr = csv.writer(f, lineterminator="\n")
        wr.writerow(["ln_lr", "estimable", "in_table", "condition"])
        for l, est, table, y in PEOPLE:
            wr.writerow([repr(l), int(est), int(table), "NA" if y is None else y])
    with open(os.path.join(out, "prevalence_by_sex_expected.csv"), "w", newline="") as f:
        wr = csv.writer(f, lineterminator="\n")
        wr.writerow(["quantity", "expected"])
        for k, v in rows:
            wr.writerow([k, repr(float(v))])


if __name__ == "__main__":
    main()
