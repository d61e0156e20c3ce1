"""The group hierarchy fitted the way a statistician would without tessera: PyMC with NUTS.
A comparison of methods (a deterministic nested grid against Markov chain Monte Carlo), not of
implementations of one algorithm.

Same model as tessera's (src/assemblage/hierarchy.rs), sex marginalised:
    mu ~ Beta(1, 1) (the flat prior), ln kappa ~ Uniform(ln 1, ln 1000),
    pi_g ~ Beta(mu kappa, (1 - mu) kappa),
    each individual of group g adds ln(pi_g LR_i + 1 - pi_g) to the log density.
For each size N given on the command line, reads DIR/ln_lr_N.txt and DIR/groups_N.txt (one
line per individual, as written by `cargo bench --bench side_by_side`), samples 2 chains x
(1000 tuning + 1000 kept) draws, and appends to DIR/pymc.csv one row per group:
N, total seconds (model build + compile + sampling), sampling seconds (PyMC's own
`sampling_time`: compilation excluded), group, posterior mean of pi, its Monte Carlo standard
error (arviz mcse), the largest R-hat. Run by the bench when TESSERA_PYMC_PYTHON names a Python
with pymc installed.
Run: python hierarchy_pymc.py DIR N [N ...]
"""
import os
import sys
import time

import numpy as np


def fit(d, n):
    import arviz as az
    import pymc as pm
    import pytensor.tensor as pt

    start = time.perf_counter()
    l = np.array([float(x) for x in open(os.path.join(d, f"ln_lr_{n}.txt"))])
    g = [x.strip() for x in open(os.path.join(d, f"groups_{n}.txt"))]
    names = sorted(set(g))
    idx = np.array([names.index(x) for x in g])
    keep = (l != 0) & np.isfinite(l)
    l, idx = l[keep], idx[keep]
    with pm.Model():
        mu = pm.Beta("mu", 1.0, 1.0)
        ln_kappa = pm.Uniform("ln_kappa", 0.0, np.log(1000.0))
        kappa = pt.exp(ln_kappa)
        pi = pm.Beta("pi", mu * kappa, (1 - mu) * kappa, shape=len(names))
        p = pi[idx]
        pm.Potential("data", pt.sum(pt.logaddexp(pt.log(p) + l, pt.log1p(-p))))
        trace = pm.sample(1000, tune=1000, chains=2, cores=2, random_seed=1, progressbar=False)
    total = time.perf_counter() - start
    sampling = float(trace.posterior.attrs.get("sampling_time", float("nan")))
    means = trace.posterior["pi"].mean(dim=("chain", "draw")).values
    mcse = az.mcse(trace, var_names=["pi"])["pi"].values
    rhat = float(az.rhat(trace, var_names=["pi"])["pi"].values.max())
    return [(n, total, sampling, name, float(m), float(e), rhat) for name, m, e in zip(names, means, mcse)]


def main():
    d = sys.argv[1]
    rows = []
    for n in sys.argv[2:]:
        rows += fit(d, int(n))
    with open(os.path.join(d, "pymc.csv"), "w") as f:
        f.write("n,total_seconds,sampling_seconds,group,mean,mcse,rhat_max\n")
        for r in rows:
            f.write(",".join(repr(x) if isinstance(x, float) else str(x) for x in r) + "\n")


if __name__ == "__main__":
    main()
