"""Reference implementations, in numpy and scipy, of what `cargo bench --bench side_by_side`
times in tessera; run by that bench on the inputs it writes to DIR. Every comparison states
what work each side does and measures each side's achieved error against a tighter answer
(nothing is assumed).

1. Single-assemblage posterior of the proportion female pi under each prior of DIR/priors.csv,
   from the ln LR(F:M) in DIR/ln_lr.txt: p(pi | D) proportional to prior(pi) times
   prod_i (pi LR_i + 1 - pi), on tessera's grid in t (pi = sin^2(pi t / 2)): a coarse pass
   of 1000 cells to find where the posterior lives, 4000 cells there; posterior mean and
   2.5% / 97.5% quantiles, and each individual's P(female) under the first prior. Twice:
   a. full grid (the direct method): the data term summed over individuals at all 1000 + 4000
      cells, P(female) on the 4000 cells;
   b. same algorithm as tessera (src/assemblage/posterior.rs): where the region is narrow
      (t-width <= 0.25, 0.05 from either end) the data term is evaluated at the 1000 coarse
      cells, 64 Chebyshev points of the second kind and 16 check points, interpolated
      barycentrically (Berrut & Trefethen 2004) at the 4000 cells, and P(female) is
      integrated at the 128 nodes of a 16-panel, 8-point Gauss-Legendre rule
      (numpy.polynomial.legendre.leggauss); elsewhere as (a).
   Untimed, the answer both are measured against: scipy.integrate.quad (epsabs 1e-14,
   epsrel 1e-12) for the mean, brentq on the quad CDF for the quantiles.
2. Latent-block likelihood of each case in DIR/cases.csv under the block in DIR/block.csv:
   scipy.stats.multivariate_normal.logpdf for the measurements, and the box probability of
   the ordinal latents given the measurements (Schur complement) by scipy's randomised
   quasi-Monte Carlo (the routine behind multivariate_normal.cdf in scipy 1.16,
   scipy.stats._qmvnt._qauto with _qmvn, called directly so that its own error estimate is
   read, not assumed). In that routine only `abseps` stops the loop (`releps` is ignored), so
   the relative target tessera uses, 1e-3 of p, is given as abseps = 1e-3 * p after a rough
   pass (abseps 1e-2, then 1e-3 * p_rough), both timed. 1-D boxes by norm.cdf, 2-D by
   scipy's exact bivariate routine, as tessera does. Untimed, an accurate pass (abseps
   1e-5 * p, up to 4 million points) gives the answer both sides are measured against.

Writes reference_times.txt (seconds: posterior full grid, posterior same algorithm,
likelihoods), reference_posterior.csv, reference_posterior_same.csv, reference_posterior_quad.csv
(prior, mean, q025, q975), reference_p_female.txt, reference_p_female_same.txt,
reference_latent.csv (ln LR, scipy's reported error on ln LR), reference_latent_accurate.csv.
"""
import csv
import math
import os
import sys
import time

import numpy as np
from scipy import integrate, optimize
from scipy.special import betaln
from scipy.stats import multivariate_normal, norm
from scipy.stats._qmvnt import _bvn, _qauto, _qmvn

COARSE, FINE, CUTOFF = 1000, 4000, 60.0


def ln_data(t, l):
    """Sum over individuals of ln(pi e^l + 1 - pi) at each t (blocks of 500 cells)."""
    out = np.empty_like(t)
    for s in range(0, len(t), 500):
        pi = np.sin(0.5 * np.pi * t[s : s + 500]) ** 2
        lp, lq = np.log(pi), np.log1p(-pi)
        out[s : s + 500] = np.logaddexp(lp[:, None] + l[None, :], lq[:, None]).sum(axis=1)
    return out


NARROW, EDGE, CHEB, PANELS = 0.25, 0.05, 64, 16


def pi_of(t):
    return np.sin(0.5 * np.pi * t) ** 2


def ln_prior_jac(t, a, b):
    pi = pi_of(t)
    return (a - 1) * np.log(pi) + (b - 1) * np.log1p(-pi) - betaln(a, b) + np.log(
        0.5 * np.pi * np.sin(np.pi * t)
    )


def region(l, a, b):
    tc = (np.arange(COARSE) + 0.5) / COARSE
    wc = ln_prior_jac(tc, a, b) + ln_data(tc, l)
    keep = np.nonzero(wc > wc.max() - CUTOFF)[0]
    return max(keep[0] - 1, 0) / COARSE, min(keep[-1] + 2, COARSE) / COARSE


def chebyshev(l, lo, hi):
    """Barycentric interpolant of the data term at 64 Chebyshev points of the second kind,
    or None where it misses direct evaluation at 16 check points (as tessera)."""
    j = np.arange(CHEB)
    x = 0.5 * (lo + hi) + 0.5 * (hi - lo) * np.cos(np.pi * j / (CHEB - 1))
    level = ln_data(np.array([0.5 * (lo + hi)]), l)[0]
    f = ln_data(x, l) - level
    w = np.where(j % 2 == 0, 1.0, -1.0)
    w[0] *= 0.5
    w[-1] *= 0.5

    def ev(t):
        d = t[:, None] - x[None, :]
        exact = d == 0
        d[exact] = 1.0
        q = w[None, :] / d
        out = (q @ f) / q.sum(axis=1) + level
        hit = exact.any(axis=1)
        out[hit] = f[exact.argmax(axis=1)[hit]] + level
        return out

    check = lo + (np.arange(16) + 0.37) / 16 * (hi - lo)
    if np.all(np.abs(ev(check) - ln_data(check, l)) <= 1e-9 + 1e-12 * len(l)):
        return ev
    return None


def posterior(l, a, b, same):
    lo, hi = region(l, a, b)
    width = (hi - lo) / FINE
    t = lo + (np.arange(FINE) + 0.5) * width
    narrow = same and hi - lo <= NARROW and lo >= EDGE and hi <= 1 - EDGE
    ev = chebyshev(l, lo, hi) if narrow else None
    data = ev if ev is not None else (lambda u: ln_data(u, l))
    w = ln_prior_jac(t, a, b) + data(t)
    mass = np.exp(w - w.max())
    mass /= mass.sum()
    grid = pi_of(t)
    edges = pi_of(lo + np.arange(FINE + 1) * width)
    if narrow:
        x, wt = np.polynomial.legendre.leggauss(8)
        h = (hi - lo) / PANELS
        c = lo + (np.arange(PANELS) + 0.5) * h
        tn = (c[:, None] + 0.5 * h * x[None, :]).ravel()
        wn = np.tile(0.5 * h * wt, PANELS)
        g = ln_prior_jac(tn, a, b) + data(tn) + np.log(wn)
        node_mass = np.exp(g - g.max())
        nodes, node_mass = pi_of(tn), node_mass / node_mass.sum()
    else:
        nodes, node_mass = grid, mass
    return grid, mass, edges, nodes, node_mass


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


def read_priors(d):
    l_all = np.array([float(x) for x in open(os.path.join(d, "ln_lr.txt"))])
    informative = l_all[(l_all != 0) & np.isfinite(l_all)]
    return l_all, informative, list(csv.DictReader(open(os.path.join(d, "priors.csv"))))


def run_posterior(d, same):
    l_all, informative, priors = read_priors(d)
    rows, first_pf = [], None
    start = time.perf_counter()
    for k, p in enumerate(priors):
        if p["kind"] == "fixed":
            pi = float(p["pi"])
            nodes, node_mass = np.array([pi]), np.array([1.0])
            mean = lo_q = hi_q = pi
        else:
            grid, mass, edges, nodes, node_mass = posterior(informative, float(p["a"]), float(p["b"]), same)
            mean = float((grid * mass).sum())
            lo_q, hi_q = quantile(mass, edges, 0.025), quantile(mass, edges, 0.975)
        pf = p_female(nodes, node_mass, l_all)
        pf[l_all == 0] = np.nan  # individuals without evidence are reported as such
        if k == 0:
            first_pf = pf
        rows.append((p["name"], mean, lo_q, hi_q))
    elapsed = time.perf_counter() - start
    suffix = "_same" if same else ""
    write_rows(os.path.join(d, f"reference_posterior{suffix}.csv"), rows)
    with open(os.path.join(d, f"reference_p_female{suffix}.txt"), "w") as f:
        for v in first_pf:
            f.write(f"{float(v)!r}\n")
    return elapsed


def write_rows(path, rows):
    with open(path, "w") as f:
        f.write("prior,mean,q025,q975\n")
        for r in rows:
            f.write(f"{r[0]},{float(r[1])!r},{float(r[2])!r},{float(r[3])!r}\n")


def run_quad(d):
    """The answer the grids are measured against: adaptive quadrature in t over the region
    (outside it the density is below e^-60 of its peak)."""
    _, l, priors = read_priors(d)
    rows = []
    for p in priors:
        if p["kind"] == "fixed":
            pi = float(p["pi"])
            rows.append((p["name"], pi, pi, pi))
            continue
        a, b = float(p["a"]), float(p["b"])
        lo, hi = region(l, a, b)
        tt = np.linspace(lo, hi, 2001)
        peak = (ln_prior_jac(tt, a, b) + ln_data(tt, l)).max()

        def dens(t):
            t = np.array([t])
            return float(np.exp(ln_prior_jac(t, a, b) + ln_data(t, l) - peak)[0])

        opts = dict(epsabs=1e-14, epsrel=1e-12, limit=400)
        z = integrate.quad(dens, lo, hi, **opts)[0]
        mean = integrate.quad(lambda t: pi_of(t) * dens(t), lo, hi, **opts)[0] / z

        def cdf(t):
            return integrate.quad(dens, lo, t, **opts)[0] / z

        qs = [pi_of(optimize.brentq(lambda t: cdf(t) - q, lo, hi, xtol=1e-14)) for q in (0.025, 0.975)]
        rows.append((p["name"], mean, qs[0], qs[1]))
    write_rows(os.path.join(d, "reference_posterior_quad.csv"), rows)


def box(cm, cc, lo, hi, target, limit):
    """P(lo < X <= hi) for X ~ N(cm, cc) and scipy's reported error: exact in 1-D and 2-D,
    otherwise randomised QMC to an absolute error `target(p)` (a function of the rough p)."""
    n = len(cm)
    if n == 1:
        sd = math.sqrt(cc[0, 0])
        return norm.cdf(hi[0], cm[0], sd) - norm.cdf(lo[0], cm[0], sd), 0.0
    a, b = lo - cm, hi - cm
    if n == 2:
        return float(_bvn(a, b, cc)), 0.0
    rng = np.random.default_rng(7)
    p, e, _ = _qauto(_qmvn, cc, a, b, rng, error=1e-2, limit=limit * n)
    p, e, _ = _qauto(_qmvn, cc, a, b, rng, error=target(max(p, 1e-300)), limit=limit * n)
    return float(p), float(e)


def run_latent(d, target, limit, out_name):
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
        ln_l, err = [], 0.0
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
            if o:
                p, e = box(cm, cc, lo, hi, target, limit)
                total += math.log(p)
                # scipy's error (3 standard errors of its batches) on ln p, to first order.
                err += e / p
            ln_l.append(total)
        out.append((ln_l[0] - ln_l[1], err))
    elapsed = time.perf_counter() - start
    with open(os.path.join(d, out_name), "w") as f:
        for v, e in out:
            f.write(f"{float(v)!r},{float(e)!r}\n")
    return elapsed


def main():
    d = sys.argv[1]
    t_full = run_posterior(d, same=False)
    t_same = run_posterior(d, same=True)
    run_quad(d)
    # Point caps per dimension: scipy's default (1e6 * d, as in multivariate_normal.cdf) for
    # the timed pass; for the accurate pass, 1e6 * d as well (it stops on its target first
    # where it can, and reports its error either way).
    t_lik = run_latent(d, lambda p: 1e-3 * p, 1_000_000, "reference_latent.csv")
    run_latent(d, lambda p: 1e-5 * p, 1_000_000, "reference_latent_accurate.csv")
    with open(os.path.join(d, "reference_times.txt"), "w") as f:
        f.write(f"{float(t_full)!r}\n{float(t_same)!r}\n{float(t_lik)!r}\n")


if __name__ == "__main__":
    main()
