//! Commingled remains (`tessera elements`): on seeded simulated deposits with known truth,
//! the counts by sex, the MNI by sex and the proportion female recover the truth within their
//! intervals; associations make elements share a sex; bad element records are all named.

mod common;
use common::{stderr, stdout, tessera};
use std::collections::BTreeMap;
use tessera::assemblage::Thresholds;
use tessera::commingled::{analyse_elements, read_elements, ElementOptions, ElementSide};
use tessera::data::{ReadSettings, Sex};
use tessera::model::Model;
use tessera::prior::library::parse_prior;
use tessera::sim::elements::simulate_elements;

fn options(draws: usize, seed: u64) -> ElementOptions {
    ElementOptions {
        draws,
        seed,
        prior: parse_prior("flat").unwrap(),
        thresholds: Thresholds::default(),
    }
}

/// Ten seeded deposits of 150 individuals (π = 0.3 to 0.7): the true count of female and of
/// male elements of every type and side, the true MNI by sex of every type and of the deposit
/// (largest count over sides), and the deposit's true share of women lie inside the 95%
/// intervals about as often as 95% intervals should (at least 88% of 400-odd counts; each
/// deposit's proportion female in at least 9 of 10).
#[test]
fn counts_mni_and_proportion_female_recover_the_truth() {
    let model = Model::default_model().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let (mut inside, mut total, mut pi_inside) = (0usize, 0usize, 0usize);
    for k in 0..10u64 {
        let pi = 0.3 + 0.4 * k as f64 / 9.0;
        let sim = simulate_elements(&model, 150, pi, 100 + k).unwrap();
        let path = dir.path().join(format!("deposit-{k}.csv"));
        std::fs::write(&path, sim.to_csv(&model).unwrap()).unwrap();
        let table = read_elements(&path, &model.catalogue, &ReadSettings::default()).unwrap();
        assert_eq!(table.elements.len(), sim.elements.len());
        let r = analyse_elements(&table, &model, &options(1000, k)).unwrap();
        // Truth per unit: (element, side) -> [females, males].
        let mut truth: BTreeMap<(String, ElementSide), [usize; 2]> = BTreeMap::new();
        for e in &sim.elements {
            truth.entry((e.element.clone(), e.side)).or_default()
                [usize::from(e.true_sex == Sex::Male)] += 1;
        }
        let mut check = |value: usize, lo: f64, hi: f64| {
            total += 1;
            inside += usize::from(value as f64 >= lo && value as f64 <= hi);
        };
        for u in &r.units {
            let t = truth[&(u.element.clone(), u.side)];
            check(t[0], u.females.lo, u.females.hi);
            check(t[1], u.males.lo, u.males.hi);
        }
        let mut all = [0usize; 2];
        for m in r.mni.iter().filter(|m| m.element != "all elements") {
            for s in 0..2 {
                let v = truth
                    .iter()
                    .filter(|(key, _)| key.0 == m.element)
                    .map(|(_, c)| c[s])
                    .max()
                    .unwrap();
                all[s] = all[s].max(v);
                let c = if s == 0 { &m.females } else { &m.males };
                check(v, c.lo, c.hi);
            }
        }
        let deposit = r.mni.last().unwrap();
        check(all[0], deposit.females.lo, deposit.females.hi);
        check(all[1], deposit.males.lo, deposit.males.hi);
        let share = sim
            .individuals
            .iter()
            .filter(|s| **s == Sex::Female)
            .count() as f64
            / 150.0;
        pi_inside += usize::from(share >= r.pi.lo && share <= r.pi.hi);
        let u = &r.units[r.chosen];
        println!(
            "pi {pi:.3} share {share:.3}: {:.3} ({:.3} to {:.3}) from {} {}",
            r.pi.mean,
            r.pi.lo,
            r.pi.hi,
            u.element,
            u.side.as_str()
        );
    }
    println!("truth inside the 95% intervals: {inside} of {total} counts; proportion female {pi_inside} of 10");
    assert!(inside as f64 >= 0.88 * total as f64, "{inside} of {total}");
    assert!(pi_inside >= 9, "{pi_inside} of 10");
}

/// Elements recorded as one individual with probability 1 share their sex in every draw:
/// their p_female is the same, and equals the exact posterior of their summed evidence within
/// Monte Carlo error; an element associated with probability 0 keeps its own.
#[test]
fn associated_elements_share_one_sex() {
    let model = Model::default_model().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("pit.csv");
    std::fs::write(
        &path,
        "id,element,side,individual,association,glabella,mastoid,femur_head_diameter,ventral_arc\n\
         C1,cranium,,A1,,2,2,,\n\
         F1,femur,left,A1,1,,,47.5,\n\
         X1,os coxae,right,A1,0,,,,5\n\
         F2,femur,left,,,,,41.0,\n\
         F3,femur,left,,,,,44.0,\n\
         F4,femur,left,,,,,48.0,\n\
         C2,cranium,,,,4,5,,\n",
    )
    .unwrap();
    let table = read_elements(&path, &model.catalogue, &ReadSettings::default()).unwrap();
    let r = analyse_elements(&table, &model, &options(20_000, 3)).unwrap();
    let (c1, f1, x1) = (&r.elements[0], &r.elements[1], &r.elements[2]);
    assert_eq!(c1.p_female, f1.p_female);
    // The exact posterior of the pair under the chosen unit's π posterior.
    let ln_sum = (c1.log10_lr + f1.log10_lr) * std::f64::consts::LN_10;
    let chosen_post = tessera::assemblage::PiPosterior::compute(
        &table
            .elements
            .iter()
            .enumerate()
            .filter(|(_, e)| {
                e.element == r.units[r.chosen].element && e.side == r.units[r.chosen].side
            })
            .map(|(i, _)| r.elements[i].log10_lr * std::f64::consts::LN_10)
            .collect::<Vec<_>>(),
        &parse_prior("flat").unwrap(),
    );
    let exact = chosen_post.p_female(ln_sum);
    let mc = (exact * (1.0 - exact) / 20_000.0).sqrt();
    assert!(
        (c1.p_female - exact).abs() < 4.0 * mc + 1e-9,
        "{} vs {exact}",
        c1.p_female
    );
    // Association 0: the os coxae's own evidence only (exact p_female_own, within MC error).
    let mc = (x1.p_female_own * (1.0 - x1.p_female_own) / 20_000.0).sqrt();
    assert!((x1.p_female - x1.p_female_own).abs() < 4.0 * mc + 1e-9);
}

#[test]
fn every_bad_element_record_is_named() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("bad.csv");
    std::fs::write(
        &path,
        "id,element,side,individual,association,glabella\n\
         B1,,left,,,2\n\
         B2,femur,up,,,\n\
         B3,cranium,,A1,1.4,3\n\
         B4,cranium,,,0.5,3\n",
    )
    .unwrap();
    let o = tessera(&["elements", path.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(3), "{}", stderr(&o));
    let e = stderr(&o);
    for needle in [
        "row 2",
        "row 3",
        "`up`",
        "row 4",
        "1.4",
        "row 5",
        "with an `individual`",
    ] {
        assert!(e.contains(needle), "{needle}: {e}");
    }
    // Elements without any trait the model uses: said plainly, naming the file.
    std::fs::write(&path, "id,element,side\nB1,femur,left\nB2,cranium,\n").unwrap();
    let o = tessera(&["elements", path.to_str().unwrap()]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("bad.csv") && stderr(&o).contains("no element carries evidence"),
        "{}",
        stderr(&o)
    );
    // Without an element column: one clear problem.
    std::fs::write(&path, "id,glabella\nB1,2\n").unwrap();
    let o = tessera(&["elements", path.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(3));
    assert!(stderr(&o).contains("`element` column"), "{}", stderr(&o));
}

/// The command on a simulated deposit writes its four files and says where the proportion
/// female comes from.
#[test]
fn the_command_writes_its_files() {
    let dir = tempfile::tempdir().unwrap();
    let table = dir.path().join("deposit.csv");
    let o = tessera(&[
        "simulate",
        "--n",
        "80",
        "--as-elements",
        "--seed",
        "5",
        "--out",
        table.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let out = dir.path().join("res");
    let o = tessera(&[
        "elements",
        table.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stdout(&o).contains("Proportion female"));
    for f in [
        "elements.csv",
        "element_counts.csv",
        "mni_by_sex.csv",
        "report.md",
    ] {
        assert!(out.join(f).exists(), "{f}");
    }
    let o = tessera(&["elements", table.to_str().unwrap(), "--draws", "0"]);
    assert!(!o.status.success());
    assert!(
        stderr(&o).contains("--draws: give from 1") && !stderr(&o).contains("--draws: --draws"),
        "{}",
        stderr(&o)
    );
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    assert!(report.contains("not identifications") && report.contains("not gender"));
}
