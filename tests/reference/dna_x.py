"""Reference values for the X:autosome block (`type: dna_x`): ln P(k X reads | n reads on X and
the autosomes, sex) under the beta-binomial with the contamination mixture, computed with
scipy.stats.betabinom.logpmf and scipy.special.logsumexp (outside libraries from PyPI).

Parameters are those of models/dna-reads.yaml: x_share p_F = 0.0511 (XX), p_M = p_F / (2 - p_F)
(half the X dosage), concentration 7400 (Beta(k p, k (1 - p))), contamination 0.01:
P(k | s) = (1 - e) BB_s + e/2 (BB_F + BB_M). Cases: typical XX and XY counts, a small library,
a count between the sexes, and a count of 10^8 reads.
Run: python tests/reference/dna_x.py [OUTDIR]
"""
import csv
import math
import os
import sys

from scipy.special import logsumexp
from scipy.stats import betabinom

HERE = os.path.dirname(os.path.abspath(__file__))
P_F = 0.0511
KAPPA = 7400.0
EPS = 0.01
CASES = [(5200, 101000), (2600, 99500), (12, 380), (3900, 99000), (5_110_000, 94_890_000)]


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    p_m = P_F / (2.0 - P_F)
    rows = []
    for x, a in CASES:
        n = x + a
        own = [betabinom.logpmf(x, n, KAPPA * p, KAPPA * (1.0 - p)) for p in (P_F, p_m)]
        other = math.log(0.5 * EPS) + logsumexp(own)
        mixed = [logsumexp([math.log(1.0 - EPS) + l, other]) for l in own]
        for sex, value in zip(("female", "male"), mixed):
            rows.append((x, a, sex, repr(float(value))))
    with open(os.path.join(out, "dna_x_expected.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["x_reads", "autosome_reads", "sex", "expected"])
        w.writerows(rows)


if __name__ == "__main__":
    main()
