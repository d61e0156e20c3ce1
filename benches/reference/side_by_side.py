"""Reference implementations, in numpy and scipy, of what `cargo bench --bench side_by_side`
times in tessera; run by that bench on the inputs it writes to DIR.

1. Single-assemblage posterior of the proportion female pi under each prior of DIR/priors.csv,
   from the ln LR(F:M) in DIR/ln_lr.txt: p(pi | D) proportional to prior(pi) times
   prod_i (pi LR_i + 1 - pi), on the grid tessera uses (t in (0, 1), pi = sin^2(pi t / 2),
   a coarse pass of 1000 cells to find where the posterior lives, 4000 cells there),
   vectorised with numpy (logaddexp over an individuals-by-cells array, in blocks); posterior
   mean and 2.5% / 97.5% quantiles, and each individual's P(female) under the first prior.
2. Latent-block likelihood of each case in DIR/cases.csv under the block in DIR/block.csv:
   scipy.stats.multivariate_normal.logpdf for the measurements, and the box probability of
   the ordinal latents given the measurements (Schur complement) by
   scipy.stats.multivariate_normal.cdf with lower_limit (Genz's MVNDST), releps = 1e-3 and
   abseps = 0, i.e. the relative accuracy tessera asks of its own integration.

Writes reference_times.txt (seconds: posterior, likelihoods), reference_posterior.csv,
reference_p_female.txt, reference_latent.csv.
"""
import csv
import math
import os
import sys
import time

import numpy as np
from scipy.special import betaln
from scipy.stats import multivariate_normal, norm

COARSE, FINE, CUTOFF = 1000, 4000, 60.0


def ln_data(t, l):
    """Sum over individuals of ln(pi e^l + 1 - pi) at each t (blocks of 500 cells)."""
    out = np.empty_like(t)
    for s in range(0, len(t), 500):
        pi = np.sin(0.5 * np.pi * t[s : s + 500]) ** 2
        lp, lq = np.log(pi), np.log1p(-pi)
        out[s : s + 500] = np.logaddexp(lp[:, None] + l[None, :], lq[:, None]).sum(axis=1)
    return out


def posterior(l, a, b):
    def ln_w(t):
        pi = np.sin(0.5 * np.pi * t) ** 2
        prior = (a - 1) * np.log(pi) + (b - 1) * np.log1p(-pi) - betaln(a, b)
        return prior + ln_data(t, l) + np.log(0.5 * np.pi * np.sin(np.pi * t))

    tc = (np.arange(COARSE) + 0.5) / COARSE
    wc = ln_w(tc)
    keep = np.nonzero(wc > wc.max() - CUTOFF)[0]
    lo = max(keep[0] - 1, 0) / COARSE
    hi = min(keep[-1] + 2, COARSE) / COARSE
    width = (hi - lo) / FINE
    t = lo + (np.arange(FINE) + 0.5) * width
    w = ln_w(t)
    mass = np.exp(w - w.max())
    mass /= mass.sum()
    grid = np.sin(0.5 * np.pi * t) ** 2
    edges = np.sin(0.5 * np.pi * (lo + np.arange(FINE + 1) * width)) ** 2
    return grid, mass, edges


def quantile(mass, edges, q):
    c = np.cumsum(mass)
    i = int(np.searchsorted(c, q))
    before = c[i - 1] if i > 0 else 0.0
    frac = (q - before) / mass[i] if mass[i] > 0 else 0.5
    return edges[i] + frac * (edges[i + 1] - edges[i])


def p_female(grid, mass, l):
    out = np.empty_like(l)
    logit = np.log(grid) - np.log1p(-grid)
    for s in range(0, len(l), 1000):
        x = l[s : s + 1000, None] + logit[None, :]
        out[s : s + 1000] = (mass[None, :] / (1.0 + np.exp(-x))).sum(axis=1)
    return out


def run_posterior(d):
    l_all = np.array([float(x) for x in open(os.path.join(d, "ln_lr.txt"))])
    informative = l_all[(l_all != 0) & np.isfinite(l_all)]
    priors = list(csv.DictReader(open(os.path.join(d, "priors.csv"))))
    rows, first_pf = [], None
    start = time.perf_counter()
    for k, p in enumerate(priors):
        if p["kind"] == "fixed":
            pi = float(p["pi"])
            grid, mass = np.array([pi]), np.array([1.0])
            mean = lo_q = hi_q = pi
        else:
            grid, mass, edges = posterior(informative, float(p["a"]), float(p["b"]))
            mean = float((grid * mass).sum())
            lo_q, hi_q = quantile(mass, edges, 0.025), quantile(mass, edges, 0.975)
        pf = p_female(grid, mass, l_all)
        pf[l_all == 0] = np.nan  # individuals without evidence are reported as such
        if k == 0:
            first_pf = pf
        rows.append((p["name"], mean, lo_q, hi_q))
    elapsed = time.perf_counter() - start
    with open(os.path.join(d, "reference_posterior.csv"), "w") as f:
        f.write("prior,mean,q025,q975\n")
        for r in rows:
            f.write(f"{r[0]},{float(r[1])!r},{float(r[2])!r},{float(r[3])!r}\n")
    with open(os.path.join(d, "reference_p_female.txt"), "w") as f:
        for v in first_pf:
            f.write(f"{float(v)!r}\n")
    return elapsed


def run_latent(d):
    mean, cov = {}, {0: [], 1: []}
    for row in csv.reader(open(os.path.join(d, "block.csv"))):
        s = int(row[1])
        if row[0] == "mean":
            mean[s] = np.array([float(x) for x in row[2:]])
        else:
            cov[s].append([float(x) for x in row[2:]])
    cov = {s: np.array(v) for s, v in cov.items()}
    cases = {}
    for r in csv.DictReader(open(os.path.join(d, "cases.csv"))):
        cases.setdefault(int(r["case"]), []).append(r)
    n_cases = max(cases) + 1 if cases else 0
    out = []
    start = time.perf_counter()
    for k in range(n_cases):
        rows = cases.get(k, [])
        m = [int(r["trait"]) for r in rows if r["kind"] == "m"]
        y = np.array([float(r["value"]) for r in rows if r["kind"] == "m"])
        o = [int(r["trait"]) for r in rows if r["kind"] == "o"]
        lo = np.array([float(r["lower"]) for r in rows if r["kind"] == "o"])
        hi = np.array([float(r["upper"]) for r in rows if r["kind"] == "o"])
        if not rows:
            out.append((0.0, 0.0))
            continue
        ln_l = []
        for s in (0, 1):
            mu, S = mean[s], cov[s]
            total = 0.0
            cm, cc = mu[o], S[np.ix_(o, o)]
            if m:
                Smm = S[np.ix_(m, m)]
                total += multivariate_normal(mu[m], Smm).logpdf(y)
                if o:
                    Som = S[np.ix_(o, m)]
                    cm = cm + Som @ np.linalg.solve(Smm, y - mu[m])
                    cc = cc - Som @ np.linalg.solve(Smm, Som.T)
            if len(o) == 1:
                sd = math.sqrt(cc[0, 0])
                total += math.log(norm.cdf(hi[0], cm[0], sd) - norm.cdf(lo[0], cm[0], sd))
            elif o:
                p = multivariate_normal.cdf(
                    hi, mean=cm, cov=cc, lower_limit=lo, abseps=0.0, releps=1e-3
                )
                total += math.log(p)
            ln_l.append(total)
        # MVNDST meets releps = 1e-3 on each sex's box from three dimensions up.
        out.append((ln_l[0] - ln_l[1], 2e-3 if len(o) >= 3 else 0.0))
    elapsed = time.perf_counter() - start
    with open(os.path.join(d, "reference_latent.csv"), "w") as f:
        for v, e in out:
            f.write(f"{float(v)!r},{float(e)!r}\n")
    return elapsed


def main():
    d = sys.argv[1]
    t1 = run_posterior(d)
    t2 = run_latent(d)
    with open(os.path.join(d, "reference_times.txt"), "w") as f:
        f.write(f"{float(t1)!r}\n{float(t2)!r}\n")


if __name__ == "__main__":
    main()
