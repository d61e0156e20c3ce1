"""Regenerate every reference fixture into a temporary folder and compare it with the
committed one. Fails (exit 1) where a value drifts beyond what its method guarantees across
machines.

The same pinned libraries give slightly different bits on different processors: numpy and
scipy pick SIMD kernels and BLAS/LAPACK kernels by processor, so sums, matrix products and
factorisations round differently. Each tolerance below is set from what the method itself
guarantees, not from what one machine happened to print:

- normal_tails.csv, relative 1e-12: scipy's log_ndtr / ndtr are scalar special-function code
  (no BLAS, no SIMD dispatch), accurate to a few ulps; 1e-12 leaves three orders of margin.
- mvn_boxes.csv, absolute 2e-8 on P (not ln P): scipy's randomised quasi-Monte Carlo with
  abseps = 1e-8 guarantees P to about that error; the seeded lattice is the same everywhere,
  but the Cholesky factor (LAPACK) rounds differently, and the stopping rule may then stop
  at another iteration. The inputs (covariance, bounds) come from a seeded generator and a
  matrix product (BLAS), so they are compared numerically (relative 1e-12), not as text.
- pi_posterior.csv, absolute 1e-9: scipy.integrate.quad (QUADPACK, epsabs 1e-13) and brentq
  on the integrated CDF; numpy's SIMD exp/log differ by an ulp or two between processors.
- by_sex_expected.csv, absolute 1e-10: numpy means and variances over a few hundred draws of
  values up to ~100, summed pairwise in an order set by the SIMD width: the rounding bound
  n * eps * max|x| is ~1e-11.
- prevalence_by_sex_expected.csv, absolute 1e-12: a 16^3-point Gauss-Legendre sum (exact for
  the polynomial integrand) of ~4 000 terms of size <= 1 in an order set by numpy; rounding is
  ~1e-14 (checked: a 24-point rule agrees to 6e-16).
- hierarchy_expected.csv, relative 1e-14: pure mpmath at 24 significant digits (no BLAS, no
  SIMD; arbitrary-precision arithmetic rounds the same on every processor), written to 17
  digits; 1e-14 allows only for the last printed digit.
- agreement_expected.csv, absolute 1e-12: kappa from integer confusion matrices of 5 grades
  and ANOVA sums over ~100 pairs; rounding is ~1e-15.
- ordered_probit_expected.csv: thresholds and shift, absolute 1e-7: statsmodels' fit stops
  at a score (gradient) below 1e-6 (checked in ordered_probit.py), so an estimate is within
  about |H^-1 score| <= SE^2 * 1e-6 * dim ~ 1e-7 of the exact optimum on any machine.
  Standard errors (`*_se`), relative 1e-5: they come from a numerical Hessian (finite
  differences with steps ~1e-4), whose truncation and rounding errors are ~1e-7 relative and
  move by that much between machines (seen: 3.1e-7 relative); the Rust test needs 1e-3.
- grouped_probit_expected.csv: as ordered_probit_expected.csv (the same statsmodels fit, on
  count tables expanded to one row per individual; its score stops near 1e-7).
- dna_x_expected.csv, absolute 1e-7: scipy's betabinom.logpmf adds log-beta terms of size up
  to ~1e7 for the 10^8-read case, so its rounding is ~1e-16 * 1e8 = 1e-8 there (1e-15 on the
  small cases); scalar special functions, no BLAS.
- age_probit_expected.csv: the ordinal rows as ordered_probit_expected.csv (the same
  statsmodels fit with two more covariates). The metric rows are OLS (a QR solve through
  LAPACK on 200 rows) and ML SDs: relative error ~1e-14, far inside the same tolerances.
- age_interval_expected.csv, relative 1e-14: pure mpmath at 40 digits, written to 17.
- mvn_rules.csv, relative 1e-14: pure mpmath at 30 digits from decimal inputs, written to 17
  (the scipy comparison inside the script is a check that stops it, not a written value).
- gompertz_expected.csv, absolute 1e-6: scipy's BFGS stops at a gradient below 1e-9, so the
  estimates are within |H^-1 grad| ~ 1e-11 of the optimum; the log-likelihood is a sum of 600
  terms (numpy's expm1 and log, an ulp apart between processors), ~1e-12 relative.

Run: python tests/reference/check_fixtures.py
"""
import csv
import math
import os
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))


def absolute(tol):
    return lambda new, old: (abs(new - old), tol, "abs")


def relative(tol):
    return lambda new, old: (abs(new - old) / max(abs(old), 1e-300), tol, "rel")


def probability_from_log(tol):
    return lambda new, old: (abs(math.exp(new) - math.exp(old)), tol, "abs on P")


def ordered_probit(row):
    return relative(1e-5) if row["quantity"].endswith("_se") else absolute(1e-7)


# fixture script -> (fixture file, value column, tolerance for a row, numeric input columns)
SCRIPTS = {
    "normal_tails.py": ("normal_tails.csv", "expected", lambda row: relative(1e-12), ()),
    "mvn_boxes.py": ("mvn_boxes.csv", "ln_p", lambda row: probability_from_log(2e-8), ("cov", "lower", "upper")),
    "pi_posterior.py": ("pi_posterior.csv", "expected", lambda row: absolute(1e-9), ()),
    "by_sex.py": ("by_sex_expected.csv", "expected", lambda row: absolute(1e-10), ()),
    "prevalence_by_sex.py": ("prevalence_by_sex_expected.csv", "expected", lambda row: absolute(1e-12), ()),
    "agreement.py": ("agreement_expected.csv", "expected", lambda row: absolute(1e-12), ()),
    "ordered_probit.py": ("ordered_probit_expected.csv", "expected", ordered_probit, ()),
    "hierarchy.py": ("hierarchy_expected.csv", "expected", lambda row: relative(1e-14), ()),
    "gompertz.py": ("gompertz_expected.csv", "expected", lambda row: absolute(1e-6), ()),
    "grouped_probit.py": ("grouped_probit_expected.csv", "expected", ordered_probit, ()),
    "dna_x.py": ("dna_x_expected.csv", "expected", lambda row: absolute(1e-7), ()),
    "age_probit.py": ("age_probit_expected.csv", "expected", ordered_probit, ()),
    "age_interval.py": ("age_interval_expected.csv", "expected", lambda row: relative(1e-14), ()),
    "mvn_rules.py": ("mvn_rules.csv", "ln_p", lambda row: relative(1e-14), ()),
}

# Numeric inputs written by a seeded generator through BLAS may differ in the last bits.
INPUT_REL_TOL = 1e-12


def read(path):
    with open(path, newline="") as f:
        return list(csv.DictReader(f))


def same_numbers(a, b):
    xs, ys = a.split(";"), b.split(";")
    if len(xs) != len(ys):
        return False
    for x, y in zip(xs, ys):
        x, y = float(x), float(y)
        if x == y:
            continue
        if not abs(x - y) <= INPUT_REL_TOL * max(abs(x), abs(y)):
            return False
    return True


def main():
    failures = 0
    with tempfile.TemporaryDirectory() as tmp:
        for script, (fixture, column, tolerance, numeric_inputs) in SCRIPTS.items():
            subprocess.run([sys.executable, os.path.join(HERE, script), tmp], check=True)
            new, old = read(os.path.join(tmp, fixture)), read(os.path.join(HERE, "fixtures", fixture))
            if len(new) != len(old):
                print(f"{fixture}: {len(new)} rows regenerated, {len(old)} committed")
                failures += 1
                continue
            worst = {}
            for i, (a, b) in enumerate(zip(new, old)):
                for key in a:
                    if key == column or a[key] == b[key]:
                        continue
                    if key in numeric_inputs and same_numbers(a[key], b[key]):
                        continue
                    print(f"{fixture} row {i + 2}: input `{key}` differs")
                    failures += 1
                d, tol, kind = tolerance(b)(float(a[column]), float(b[column]))
                worst[(kind, tol)] = max(worst.get((kind, tol), 0.0), d)
                if not d <= tol or math.isnan(d):
                    print(f"{fixture} row {i + 2}: {a[column]} regenerated vs {b[column]} committed ({kind} {d:.2e} > {tol})")
                    failures += 1
            drift = ", ".join(f"largest {k} drift {w:.2e} (tolerance {t})" for (k, t), w in sorted(worst.items()))
            print(f"{fixture}: {len(new)} values, {drift}")
    sys.exit(1 if failures else 0)


if __name__ == "__main__":
    main()
