//! Unit tests of `sim/assemblage.rs`.

use super::*;
use crate::data::{read_assemblage_text, ReadSettings};

#[test]
fn simulated_tables_pass_the_reader_and_keep_the_truth_out_of_the_evidence() {
    let m = Model::default_model().unwrap();
    let groups = [
        GroupSpec {
            name: "a".into(),
            n: 60,
            pi: 0.3,
        },
        GroupSpec {
            name: "b".into(),
            n: 40,
            pi: 0.7,
        },
    ];
    let s = simulate(&m, &groups, &MissingSpec::fragmentary(), 9).unwrap();
    let csv = s.to_csv(&m).unwrap();
    let a = read_assemblage_text("sim.csv", &csv, &m.catalogue, &ReadSettings::default()).unwrap();
    assert_eq!(a.individuals.len(), 100);
    assert_eq!(a.carried_columns, vec!["true_sex"]);
    // What the reader gets back equals what was simulated.
    for (x, y) in a.individuals.iter().zip(&s.individuals) {
        assert_eq!(x.observations, y.observations, "{}", x.id);
        assert_eq!(x.group, y.group);
    }
    // Same seed, same bytes.
    assert_eq!(
        simulate(&m, &groups, &MissingSpec::fragmentary(), 9)
            .unwrap()
            .to_csv(&m)
            .unwrap(),
        csv
    );
}

#[test]
fn preservation_rates_are_honoured() {
    let m = Model::default_model().unwrap();
    let g = [GroupSpec::single(4000, 0.5)];
    let spec = MissingSpec::parse("pelvis=0.5,subadult=0.1,range=1,dna=0.2").unwrap();
    let s = simulate(&m, &g, &spec, 1).unwrap();
    let va = m.catalogue.position("ventral_arc").unwrap();
    let x = m.catalogue.position("dna_x_reads").unwrap();
    let n = s.individuals.len() as f64;
    let with_va = s
        .individuals
        .iter()
        .filter(|i| i.observations[va].is_some())
        .count() as f64
        / n;
    let with_dna = s
        .individuals
        .iter()
        .filter(|i| i.observations[x].is_some())
        .count() as f64
        / n;
    // Kept when the pelvis survives (0.5) and the individual is adult (0.9): 0.45.
    assert!((with_va - 0.45).abs() < 0.03, "{with_va}");
    assert!((with_dna - 0.2).abs() < 0.03, "{with_dna}");
    assert!(s
        .individuals
        .iter()
        .filter_map(|i| i.observations[va])
        .all(|o| o.is_range()));
    assert!(s.individuals.iter().all(|i| i.group.is_none()));
}
