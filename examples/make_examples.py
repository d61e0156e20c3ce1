"""Rebuild the invented demo assemblages from `tessera simulate`, then apply the hand edits
that the story needs. Everything here is invented (see examples/README.md).

Run from the repository root after `cargo build --release`:
    python3 examples/make_examples.py [mirefold|stature|brackenmere|saltmarsh|saltmarsh_aged|charnel|infants|infants_rx ...]
"""
import csv
import random
import subprocess

BIN = "target/release/tessera"
MISSING = "cranium=0.35,pelvis=0.45,postcranial=0.3,dental=0.4,trait=0.15,range=0.06,subadult=0.07,dna=0.12"


def simulate(out, groups, seed, missing=MISSING, model=None):
    extra = ["--model", model] if model else []
    subprocess.run([BIN, "simulate", "--groups", groups, "--missing", missing, "--seed", str(seed), "--out", out] + extra, check=True)
    with open(out, newline="") as f:
        return list(csv.DictReader(f))


def mirefold():
    rows = simulate("/tmp/mirefold-sim.csv", "early:28:0.5,middle:24:0.47,late:23:0.42", 2026)
    rnd = random.Random(7)
    out, truth = [], []
    for k, r in enumerate(rows, start=1):
        o = {"id": f"MH-{k:03d}", "phase": r["group"]}
        female = r["true_sex"] == "F"
        # The story: a small group by the chapel, mostly men.
        p_chapel = 0.05 if female else 0.3
        o["zone"] = "chapel" if rnd.random() < p_chapel else rnd.choice(["north", "south"])
        o["age"] = r["age"]
        for t in ["glabella", "mental_eminence", "nuchal_crest"]:
            o[t] = r[t]
        # Bilateral traits recorded by side: mostly the left, sometimes both.
        for t in ["mastoid", "supraorbital_margin", "ventral_arc", "subpubic_concavity", "ischiopubic_ramus", "sciatic_notch"]:
            v = r[t]
            o[f"{t}_l"], o[f"{t}_r"] = "", ""
            if v:
                side = rnd.random()
                if side < 0.6:
                    o[f"{t}_l"] = v
                elif side < 0.8:
                    o[f"{t}_r"] = v
                else:
                    o[f"{t}_l"] = v
                    if "-" not in v:
                        g = int(v) + rnd.choice([0, 0, 0, 1, -1])
                        o[f"{t}_r"] = str(min(5, max(1, g)))
        for t in ["femur_head_diameter", "femur_midshaft_circumference", "humerus_head_diameter", "canine_bl_diameter"]:
            o[f"{t}_l"] = r[t]
        o["dna_x_reads"], o["dna_y_reads"] = r["dna_x_reads"], r["dna_y_reads"]
        o["cribra_orbitalia"] = rnd.choice(["0", "0", "0", "1"]) if (r["glabella"] or r["mastoid"]) else "NA"
        o["grave_goods"] = rnd.choice(["", "", "", "knife", "spindle whorl", "bead string", "buckle", "pot"])
        out.append(o)
        truth.append({"id": o["id"], "true_sex": r["true_sex"]})
    # Hand edits for the story.
    # A grave with nothing scorable: only a pot survives.
    for t in list(out[-1].keys()):
        if t not in ("id", "phase", "zone"):
            out[-1][t] = ""
    out[-1]["age"], out[-1]["grave_goods"], out[-1]["cribra_orbitalia"] = "adult", "pot", "NA"
    # An individual whose reads fit neither sex (an invented XXY-like case): flagged, not forced.
    out[10]["dna_x_reads"], out[10]["dna_y_reads"] = "5730", "270"
    fields = list(out[0].keys())
    with open("examples/mirefold.csv", "w", newline="") as f:
        w = csv.DictWriter(f, fieldnames=fields, lineterminator="\n")
        w.writeheader()
        w.writerows(out)
    with open("examples/mirefold-truth.csv", "w", newline="") as f:
        w = csv.DictWriter(f, fieldnames=["id", "true_sex"], lineterminator="\n")
        w.writeheader()
        w.writerows(truth)


def stature():
    """Add `stature_cm` to mirefold.csv: an invented living stature (cm) as a lab would
    estimate it from long bones, for comparing a measurement between the sexes. Drawn from the
    simulated truth (females about 158 ± 5, males 169 ± 6), missing where no long bone would
    survive (about a third), blank for subadults. Run after `mirefold` (or alone on the file)."""
    rnd = random.Random(1858)
    with open("examples/mirefold-truth.csv", newline="") as f:
        truth = {r["id"]: r["true_sex"] for r in csv.DictReader(f)}
    with open("examples/mirefold.csv", newline="") as f:
        rows = list(csv.DictReader(f))
    for r in rows:
        adult = not any(r["age"].startswith(p) for p in ("0-", "1-", "2-", "3-", "4-", "5-", "6-", "7-", "8-", "9-", "10-", "11-", "12-", "13-", "14-", "15-"))
        lost = rnd.random() < 0.33
        mean, sd = (158.0, 5.0) if truth.get(r["id"]) == "F" else (169.0, 6.0)
        value = rnd.gauss(mean, sd)
        r["stature_cm"] = f"{value:.1f}" if adult and not lost else ""
    with open("examples/mirefold.csv", "w", newline="") as f:
        w = csv.DictWriter(f, fieldnames=list(rows[0].keys()), lineterminator="\n")
        w.writeheader()
        w.writerows(rows)


def brackenmere():
    rows = simulate("/tmp/brackenmere-sim.csv", "house:32:1.0", 31, missing="cranium=0.3,pelvis=0.4,postcranial=0.3,dental=0.5,trait=0.15,range=0.05")
    with open("examples/brackenmere.csv", "w", newline="") as f:
        fields = [k for k in rows[0].keys() if k not in ("group", "true_sex", "dna_x_reads", "dna_y_reads")]
        w = csv.DictWriter(f, fieldnames=["id"] + fields[1:], lineterminator="\n", extrasaction="ignore")
        w.writeheader()
        for k, r in enumerate(rows, start=1):
            r = dict(r)
            r["id"] = f"BR-{k:02d}"
            w.writerow(r)


def saltmarsh():
    """The Saltmarsh Lane documented collection: an invented reference sample of documented
    sex (burial registers of an imagined town cemetery), for `tessera fit` and `validate`."""
    out = "/tmp/saltmarsh-sim.csv"
    subprocess.run([BIN, "simulate", "--n", "240", "--pi", "0.5", "--as-reference",
                    "--missing", "cranium=0.12,pelvis=0.2,postcranial=0.15,dental=0.3,trait=0.1,range=0.03",
                    "--seed", "77", "--out", out], check=True)
    with open(out, newline="") as f:
        rows = list(csv.DictReader(f))
    with open("examples/saltmarsh-reference.csv", "w", newline="") as f:
        fields = [k for k in rows[0].keys() if k not in ("dna_x_reads", "dna_y_reads")]
        w = csv.DictWriter(f, fieldnames=fields, lineterminator="\n", extrasaction="ignore")
        w.writeheader()
        for k, r in enumerate(rows, start=1):
            r = dict(r)
            r["id"] = f"SL-{k:03d}"
            w.writerow(r)


def saltmarsh_aged():
    """The Saltmarsh Lane aged register: an invented reference of documented sex and age at
    death (whole years), drawn from examples/ageing-crania-model.yaml, where women's crania
    grow more robust with age; for `tessera fit` with `age_slope` (examples/saltmarsh-age-spec.yaml)."""
    out = "/tmp/saltmarsh-aged-sim.csv"
    subprocess.run([BIN, "simulate", "--n", "600", "--pi", "0.5", "--as-reference",
                    "--model", "examples/ageing-crania-model.yaml",
                    "--missing", "cranium=0.1,pelvis=0.25,trait=0.1,range=0.03",
                    "--seed", "78", "--out", out], check=True)
    with open(out, newline="") as f:
        rows = list(csv.DictReader(f))
    with open("examples/saltmarsh-aged-reference.csv", "w", newline="") as f:
        w = csv.DictWriter(f, fieldnames=list(rows[0].keys()), lineterminator="\n")
        w.writeheader()
        for k, r in enumerate(rows, start=1):
            r = dict(r)
            r["id"] = f"SA-{k:03d}"
            w.writerow(r)


def charnel():
    """The Mirefold Hollow charnel house: an invented commingled deposit, 140 people broken into
    elements, some lost, the rest mixed; associations recorded where the story's excavator
    fitted a mandible to a cranium or paired two femora. The truth (`true_individual`,
    `true_sex`) is carried through, never evidence."""
    out = "/tmp/charnel-sim.csv"
    subprocess.run([BIN, "simulate", "--n", "140", "--pi", "0.45", "--as-elements",
                    "--seed", "11", "--out", out], check=True)
    with open(out, newline="") as f:
        rows = list(csv.DictReader(f))
    rnd = random.Random(11)
    fields = ["id", "element", "side", "context"] + [k for k in rows[0].keys() if k not in ("id", "element", "side")]
    with open("examples/mirefold-charnel.csv", "w", newline="") as f:
        w = csv.DictWriter(f, fieldnames=fields, lineterminator="\n")
        w.writeheader()
        for k, r in enumerate(rows, start=1):
            r = dict(r)
            r["id"] = f"CH-{k:03d}"
            r["context"] = rnd.choice(["bay 1", "bay 2", "bay 3"])
            w.writerow(r)


def infants():
    """Perinates of Mirefold Hollow sexed by ancient DNA alone: an invented deposit of infants
    under the floor of the mill race (`mill_race`, where the story has more boys) and the
    infants of the churchyard (`churchyard`, as born). Ages are perinatal; no skeletal trait
    of sex is recorded, as none is read in infants."""
    rows = simulate("/tmp/infants-sim.csv", "mill_race:34:0.25,churchyard:22:0.5", 408,
                    missing="cranium=1,pelvis=1,postcranial=1,dental=1,subadult=1,dna=1")
    rnd = random.Random(5)
    with open("examples/mirefold-infants.csv", "w", newline="") as f:
        w = csv.DictWriter(f, fieldnames=["id", "deposit", "age", "dna_x_reads", "dna_y_reads", "true_sex"],
                           lineterminator="\n", extrasaction="ignore")
        w.writeheader()
        for k, r in enumerate(rows, start=1):
            r = dict(r)
            r["id"] = f"MI-{k:02d}"
            r["deposit"] = r["group"]
            r["age"] = rnd.choice(["0-0.5", "0-1", "0-0.25"])
            w.writerow(r)


def infants_rx():
    """Perinates under the floor of an invented bakehouse at Mirefold Hollow, sampled by a
    laboratory that reports reads on X, on the autosomes and (for most libraries) on Y, drawn
    from models/dna-reads.yaml. Eight libraries come from a capture without Y probes (no Y
    count: the X:autosome ratio alone speaks); two carry a story: MX-07 has no Y reads but half
    the X dosage (an X0-like library) and MX-15 a Y fraction between the sexes with an XX-like
    X dosage (an XXY-like library). tessera flags both and forces neither to a sex."""
    rows = simulate("/tmp/infants-rx-sim.csv", "bakehouse:24:0.5", 77,
                    missing="cranium=1,pelvis=1,postcranial=1,dental=1,subadult=1,dna=1",
                    model="models/dna-reads.yaml")
    rnd = random.Random(11)
    fields = ["id", "deposit", "age", "dna_x_reads", "dna_y_reads", "dna_autosome_reads", "true_sex", "note"]
    with open("examples/mirefold-infants-rx.csv", "w", newline="") as f:
        w = csv.DictWriter(f, fieldnames=fields, lineterminator="\n", extrasaction="ignore")
        w.writeheader()
        for k, r in enumerate(rows, start=1):
            r = dict(r)
            r["id"] = f"MX-{k:02d}"
            r["deposit"] = r["group"]
            r["age"] = rnd.choice(["0-0.5", "0-1", "0-0.25"])
            r["note"] = ""
            x, a = int(r["dna_x_reads"]), int(r["dna_autosome_reads"])
            if k == 7:
                # X0-like: one X, no Y.
                r["dna_x_reads"] = str(round(x / 2)) if r["true_sex"] == "F" else str(x)
                r["dna_y_reads"] = "1"
                r["true_sex"] = "F"
                r["note"] = "invented X0-like library"
            elif k == 15:
                # XXY-like: two X and a Y.
                xx = x * 2 if r["true_sex"] == "M" else x
                r["dna_x_reads"] = str(xx)
                r["dna_y_reads"] = str(round(xx * 0.045))
                r["true_sex"] = "M"
                r["note"] = "invented XXY-like library"
            elif k % 3 == 0:
                r["dna_y_reads"] = ""
                r["note"] = "capture without Y probes"
            w.writerow(r)


if __name__ == "__main__":
    # `python3 examples/make_examples.py infants` rebuilds one file. The Mirefold, Brackenmere
    # and Saltmarsh tables were drawn by an earlier `tessera simulate`; today's draws differ, so
    # rebuilding them changes the demo (and every example in README built on it).
    import sys
    chosen = sys.argv[1:] or ["mirefold", "stature", "brackenmere", "saltmarsh", "saltmarsh_aged", "charnel", "infants", "infants_rx"]
    for name in chosen:
        {"mirefold": mirefold, "stature": stature, "brackenmere": brackenmere, "saltmarsh": saltmarsh, "saltmarsh_aged": saltmarsh_aged, "charnel": charnel, "infants": infants, "infants_rx": infants_rx}[name]()
