"""The group hierarchy fitted the way a statistician would without tessera: PyMC with NUTS.

Same model as tessera's (src/assemblage/hierarchy.rs), sex marginalised:
    mu ~ Beta(1, 1) (the flat prior), ln kappa ~ Uniform(ln 1, ln 1000),
    pi_g ~ Beta(mu kappa, (1 - mu) kappa),
    each individual of group g adds ln(pi_g LR_i + 1 - pi_g) to the log density.
Reads DIR/ln_lr.txt and DIR/groups.txt (one line per individual, as written by
`cargo bench --bench side_by_side`), samples 2 chains x (1000 tuning + 1000 kept) draws, and
writes DIR/pymc.csv: seconds (model build + compile + sampling), then each group's posterior
mean of pi. Run by the bench when TESSERA_PYMC_PYTHON names a Python with pymc installed.
"""
import os
import sys
import time

import numpy as np


def main():
    d = sys.argv[1]
    start = time.perf_counter()
    import pymc as pm
    import pytensor.tensor as pt

    l = np.array([float(x) for x in open(os.path.join(d, "ln_lr.txt"))])
    g = [x.strip() for x in open(os.path.join(d, "groups.txt"))]
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
    elapsed = time.perf_counter() - start
    means = trace.posterior["pi"].mean(dim=("chain", "draw")).values
    with open(os.path.join(d, "pymc.csv"), "w") as f:
        f.write(f"{float(elapsed)!r}\n")
        for name, m in zip(names, means):
            f.write(f"{name},{float(m)!r}\n")


if __name__ == "__main__":
    main()
