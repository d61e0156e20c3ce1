use super::*;

#[test]
fn scores_of_a_hand_worked_example() {
    // Four individuals: F at 0.9 (right), F at 0.3 (wrong, indeterminate),
    // M at 0.1 (right), M at 0.6 (wrong, indeterminate).
    let v = [
        (0.9, Sex::Female),
        (0.3, Sex::Female),
        (0.1, Sex::Male),
        (0.6, Sex::Male),
    ];
    let s = scores(&v, &Thresholds::default());
    assert_eq!(s.n, 4);
    assert_eq!(s.accuracy, 0.5);
    assert_eq!(s.accuracy_female, 0.5);
    assert_eq!(s.sex_bias, 0.0);
    assert_eq!(s.share_indeterminate, 0.5);
    assert_eq!(s.accuracy_determinate, 1.0);
    // Brier: (0.1² + 0.7² + 0.1² + 0.6²) / 4 = 0.87 / 4 = 0.2175
    assert!((s.brier - 0.2175).abs() < 1e-15, "{}", s.brier);
    // Log loss: −(ln 0.9 + ln 0.3 + ln 0.9 + ln 0.4) / 4
    let ll = -(0.9f64.ln() + 0.3f64.ln() + 0.9f64.ln() + 0.4f64.ln()) / 4.0;
    assert!((s.log_loss - ll).abs() < 1e-15);
    let r = reliability(&v);
    assert_eq!(r.iter().map(|b| b.n).sum::<usize>(), 4);
    assert_eq!(r[9].n, 1);
    assert_eq!(r[9].share_female, 1.0);
}

#[test]
fn folds_are_stratified_and_seeded() {
    let sexes: Vec<Sex> = (0..53)
        .map(|i| if i % 3 == 0 { Sex::Male } else { Sex::Female })
        .collect();
    let a = assign_folds(&sexes, Folds::K(5), 9);
    assert_eq!(a, assign_folds(&sexes, Folds::K(5), 9));
    assert_ne!(a, assign_folds(&sexes, Folds::K(5), 10));
    for f in 0..5 {
        let males = (0..53)
            .filter(|&i| a[i] == f && sexes[i] == Sex::Male)
            .count();
        let size = a.iter().filter(|&&g| g == f).count();
        assert!((3..=4).contains(&males), "fold {f}: {males} males");
        assert!((10..=11).contains(&size), "fold {f}: {size}");
    }
    assert_eq!(
        assign_folds(&sexes, Folds::LeaveOneOut, 1),
        (0..53).collect::<Vec<_>>()
    );
}

#[test]
fn a_preservation_mask_removes_evidence_reproducibly_and_ages_are_classed() {
    // 200 complete simulated skeletons, checked against the model that made them.
    let model = Model::default_model().unwrap();
    let groups = [crate::sim::GroupSpec {
        name: "all".into(),
        n: 200,
        pi: 0.5,
    }];
    let sim = crate::sim::simulate(&model, &groups, &MissingSpec::default(), 3).unwrap();
    let reference: Vec<(&Individual, Sex)> = sim
        .individuals
        .iter()
        .zip(sim.true_sex.iter().copied())
        .collect();
    let info = ReferenceInfo {
        file: "simulated".into(),
        sha256: "0".into(),
        command: String::new(),
    };
    let complete = validate(
        Subject::Fixed(&model),
        &reference,
        &info,
        &ValidationSettings::default(),
    )
    .unwrap();
    let mask = MissingSpec::parse("cranium=1,trait=0.3").unwrap();
    let settings = ValidationSettings {
        missing: Some(mask),
        ..ValidationSettings::default()
    };
    let masked = validate(Subject::Fixed(&model), &reference, &info, &settings).unwrap();
    // The same seed gives the same masks; the cranium is gone from every individual.
    let again = validate(Subject::Fixed(&model), &reference, &info, &settings).unwrap();
    assert_eq!(masked.predictions, again.predictions);
    let cranium = masked.blocks.iter().position(|b| b == "cranium").unwrap();
    assert!(masked
        .predictions
        .iter()
        .all(|p| p.block_ln_lr[cranium].is_none()));
    let traits = |v: &Validation| v.predictions.iter().map(|p| p.n_traits).sum::<usize>();
    assert!(
        traits(&masked) < traits(&complete) / 2,
        "{} vs {}",
        traits(&masked),
        traits(&complete)
    );
    assert!(masked.overall.brier > complete.overall.brier);
    assert!(masked.design.contains("cranium=1"));
    // Every scored individual is in exactly one age class.
    let n: usize = masked.by_age.iter().map(|(_, s)| s.n).sum();
    assert_eq!(n, masked.overall.n);
    use crate::data::AgeAtDeath;
    let y = |low: f64, high: Option<f64>| Some(AgeAtDeath::Years { low, high });
    assert_eq!(age_class(y(18.0, Some(25.0)).as_ref()), 1);
    assert_eq!(age_class(y(15.0, Some(20.0)).as_ref()), 0);
    assert_eq!(age_class(y(35.0, Some(50.0)).as_ref()), 2);
    assert_eq!(age_class(y(50.0, None).as_ref()), 3);
    assert_eq!(age_class(Some(&AgeAtDeath::Adult)), 4);
    assert_eq!(age_class(None), 4);
}
