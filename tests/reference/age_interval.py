"""Reference values for the likelihood averaged over an age interval (a latent block with
`age:` and `age_slope`): the closed forms, evaluated with mpmath at 40 significant digits.

For a measurement y with mean mu + beta (t - c) and SD sigma, age uniform on [a, b]:
  (1/(b - a)) * integral_a^b phi((y - mu(t))/sigma)/sigma dt
    = [Phi(u(a)) - Phi(u(b))] / (beta (b - a)),   u(t) = (y - mu(t)) / sigma.
For an ordinal grade between thresholds tau1 < tau2 (latent SD 1):
  (1/(b - a)) * integral_a^b [Phi(tau2 - mu(t)) - Phi(tau1 - mu(t))] dt, with
  integral Phi(v) dv = v Phi(v) + phi(v).
Double precision loses up to ~1e-9 to cancellation in these differences (seen with statrs's
normal CDF), hence arbitrary precision here. The parameters are those of the test model in
tests/age_covariate.rs (invented numbers, centre 50).
Written to tests/reference/fixtures/age_interval_expected.csv.
Run: python tests/reference/age_interval.py [OUTDIR]
"""
import csv
import os
import sys

import mpmath as mp

HERE = os.path.dirname(os.path.abspath(__file__))
mp.mp.dps = 40
C = 50
# trait -> per sex (female, male): parameters
METRIC = {"female": (42, "2.5", "0.05"), "male": (47, "2.8", "0.01")}
ORDINAL = {"female": (-1, "0.03"), "male": (1, "-0.01")}
INTERVALS = [(40, 60), (50, 80), (20, 80), (20, 30)]


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "fixtures")
    rows = []
    y = mp.mpf(45)
    for a, b in INTERVALS:
        a, b = mp.mpf(a), mp.mpf(b)
        for sex, (mu, sd, beta) in METRIC.items():
            sd, beta = mp.mpf(sd), mp.mpf(beta)
            u = lambda t: (y - mu - beta * (t - C)) / sd
            value = (mp.ncdf(u(a)) - mp.ncdf(u(b))) / (beta * (b - a))
            rows.append(("femur_head_diameter", "45", sex, int(a), int(b), mp.log(value)))
        for sex, (mu, beta) in ORDINAL.items():
            beta = mp.mpf(beta)
            big_g = lambda v: v * mp.ncdf(v) + mp.npdf(v)

            def part(tau):
                v = lambda t: tau - mu - beta * (t - C)
                return (big_g(v(a)) - big_g(v(b))) / beta

            value = (part(mp.mpf("0.45")) - part(mp.mpf("-0.45"))) / (b - a)
            rows.append(("glabella", "3", sex, int(a), int(b), mp.log(value)))
    with open(os.path.join(out, "age_interval_expected.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["trait", "value", "sex", "low", "high", "expected"])
        for r in rows:
            w.writerow(list(r[:5]) + [mp.nstr(r[5], 17)])


if __name__ == "__main__":
    main()
