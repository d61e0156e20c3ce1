//! Unit tests of `case/mod.rs`.

use super::*;
use crate::data::{read_assemblage_text, ReadSettings};
use crate::likelihood::ledger::ledger_rows;

const TABLE: &str = "id,glabella,mastoid_l,mastoid_r,ventral_arc_l,femur_head_diameter_l,age\n\
                     C-1,4,3-4,2,1,47.5,30-40\n\
                     C-2,,,,,,25\n";

fn setup() -> (Model, Assemblage) {
    let model = Model::default_model().unwrap();
    let a = read_assemblage_text(
        "case.csv",
        TABLE.as_bytes(),
        &model.catalogue,
        &ReadSettings::default(),
    )
    .unwrap();
    (model, a)
}

/// The report of `id` under `priors`, default cut-offs and details, seed 1.
fn report(
    model: &Model,
    a: &Assemblage,
    id: &str,
    priors: &[Prior],
) -> Result<CaseReport, CaseError> {
    case_report(
        model,
        a,
        id,
        priors,
        &Thresholds::default(),
        CaseDetails::default(),
        1,
    )
}

#[test]
fn the_case_numbers_are_the_ledgers() {
    let (model, a) = setup();
    let c = report(&model, &a, "C-1", &[]).unwrap();
    let ev = crate::likelihood::evaluate_assemblage(&model, &a, &Context::new(1));
    let rows = ledger_rows(&model, &a, &ev);
    for (r, region) in rows.iter().filter(|(i, _)| *i == 0).zip(&c.regions) {
        assert_eq!(r.1.block, region.block);
        assert_eq!(r.1.ln_lr / LN_10, region.log10_lr, "{}", region.block);
        assert_eq!(r.1.status, region.status);
    }
    let total = rows
        .iter()
        .find(|(i, r)| *i == 0 && r.block == "total")
        .unwrap();
    assert_eq!(total.1.ln_lr / LN_10, c.log10_lr);
    // Recorded as read: the range stays a range, the left side is named, the unrecorded
    // cranial traits are listed, and no P(female) without a prior asked for.
    let cranium = c.regions.iter().find(|r| r.block == "cranium").unwrap();
    let mastoid = cranium.traits.iter().find(|t| t.id == "mastoid").unwrap();
    assert_eq!(
        (mastoid.recorded.as_str(), mastoid.side.as_str()),
        ("3-4", "left")
    );
    assert!(cranium.not_recorded.contains(&"nuchal_crest".to_string()));
    assert!(c.under_priors.is_empty());
    // The default model is illustrative: said.
    assert!(c.warnings.iter().any(|w| w.contains("not fitted")));
}

#[test]
fn a_trait_alone_is_its_regions_ratio_when_it_is_the_only_one() {
    let (model, a) = setup();
    let c = report(&model, &a, "C-1", &[]).unwrap();
    // The postcranial block has only the femoral head recorded: alone = the region.
    let post = c.regions.iter().find(|r| r.block == "postcranial").unwrap();
    assert_eq!(post.traits.len(), 1);
    assert_eq!(post.traits[0].log10_lr_alone, Some(post.log10_lr));
}

#[test]
fn a_prior_gives_the_closed_form_posterior_and_an_unknown_id_is_named() {
    let (model, a) = setup();
    let p = crate::prior::Prior::fixed(0.3).unwrap();
    let c = report(&model, &a, "C-1", &[p]).unwrap();
    let lr = 10f64.powf(c.log10_lr);
    let want = lr * 0.3 / (lr * 0.3 + 0.7);
    assert!((c.under_priors[0].p_female - want).abs() < 1e-12);
    let none = report(&model, &a, "C-2", &[]).unwrap();
    assert!(!none.estimable);
    let e = report(&model, &a, "C-9", &[]).unwrap_err();
    assert!(
        e.to_string().contains("`C-9` is not an id of case.csv"),
        "{e}"
    );
}
