"""Regenerate every reference fixture into a temporary folder and compare it with the
committed one. Fails (exit 1) where a value drifts beyond the stated tolerance.

Tolerances: normal_tails.csv relative 1e-12 (deterministic special functions);
mvn_boxes.csv absolute 1e-6 on ln P (scipy's randomised integration, seeded);
pi_posterior.csv absolute 1e-9 (adaptive quadrature).
Run: python tests/reference/check_fixtures.py
"""
import csv
import math
import os
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
SCRIPTS = {
    "normal_tails.py": ("normal_tails.csv", "expected", "rel", 1e-12),
    "mvn_boxes.py": ("mvn_boxes.csv", "ln_p", "abs", 1e-6),
    "pi_posterior.py": ("pi_posterior.csv", "expected", "abs", 1e-9),
    "by_sex.py": ("by_sex_expected.csv", "expected", "abs", 1e-12),
    "agreement.py": ("agreement_expected.csv", "expected", "abs", 1e-12),
    "ordered_probit.py": ("ordered_probit_expected.csv", "expected", "abs", 1e-8),
}


def read(path):
    with open(path, newline="") as f:
        return list(csv.DictReader(f))


def main():
    failures = 0
    with tempfile.TemporaryDirectory() as tmp:
        for script, (fixture, column, kind, tol) in SCRIPTS.items():
            subprocess.run([sys.executable, os.path.join(HERE, script), tmp], check=True)
            new, old = read(os.path.join(tmp, fixture)), read(os.path.join(HERE, "fixtures", fixture))
            if len(new) != len(old):
                print(f"{fixture}: {len(new)} rows regenerated, {len(old)} committed")
                failures += 1
                continue
            worst = 0.0
            for i, (a, b) in enumerate(zip(new, old)):
                for key in a:
                    if key != column and a[key] != b[key]:
                        print(f"{fixture} row {i + 2}: input `{key}` differs")
                        failures += 1
                x, y = float(a[column]), float(b[column])
                d = abs(x - y) if kind == "abs" else abs(x - y) / max(abs(y), 1e-300)
                worst = max(worst, d)
                if not d <= tol or math.isnan(d):
                    print(f"{fixture} row {i + 2}: {x!r} regenerated vs {y!r} committed ({kind} {d:.2e} > {tol})")
                    failures += 1
            print(f"{fixture}: {len(new)} values, largest {kind} drift {worst:.2e} (tolerance {tol})")
    sys.exit(1 if failures else 0)


if __name__ == "__main__":
    main()
