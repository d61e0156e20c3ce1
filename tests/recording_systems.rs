//! The trade's other recording systems in the catalogue (Phenice 1969; Bruzek 2002; the
//! weighted −2…+2 traits of Ferembach et al. 1980; postcranial, pelvic and dental
//! measurements; mandibular ramus flexure): they are read and checked like any trait, and a
//! model is fitted to them from a documented reference. No shipped model carries parameters
//! for them (said in README).

mod common;
use common::{stderr, tessera};
use tessera::data::Sex;
use tessera::fit::{fit, FitSpec, ReferenceInfo};
use tessera::model::{Block, Model};
use tessera::sim::{simulate, GroupSpec, MissingSpec};

#[test]
fn scores_of_other_systems_are_read_with_their_own_scales() {
    let dir = tempfile::tempdir().unwrap();
    let table = dir.path().join("lab.csv");
    std::fs::write(
        &table,
        "id,bruzek_sciatic_notch_l,bruzek_composite_arch_l,wea_glabella,wea_mastoid_process_l,phenice_ventral_arc_l,ramus_flexure_l,humerus_epicondylar_breadth_l,maxillary_canine_cervical_md\n\
         B1,f,i,-2,-1,1,0,55.5,6.1\n\
         B2,M,m,+2,1,3,1,64.0,7.2\n\
         B3,i,f,0,-1/0,2,0,58.0,\n",
    )
    .unwrap();
    let map = concat!(env!("CARGO_MANIFEST_DIR"), "/examples/scale-map-fim.yaml");
    let o = tessera(&["check", table.to_str().unwrap(), "--scale-map", map]);
    assert!(o.status.success(), "{}", stderr(&o));
    // Out of scale: −3 on a −2…+2 trait, 2 for a flexure scored 0/1, a breadth in cm.
    std::fs::write(
        &table,
        "id,wea_glabella,ramus_flexure_l,humerus_epicondylar_breadth_l\nB1,-3,2,6.2\n",
    )
    .unwrap();
    let o = tessera(&["check", table.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(3));
    let e = stderr(&o);
    for column in [
        "wea_glabella",
        "ramus_flexure_l",
        "humerus_epicondylar_breadth_l",
    ] {
        assert!(e.contains(column), "{column}: {e}");
    }
}

/// An invented model of Bruzek's five characters and two measurements (numbers for this test
/// only), a reference simulated from it, and `fit`: the fitted model classifies as the true one.
#[test]
fn a_model_of_another_system_is_fitted_from_a_reference() {
    let truth = Model::from_yaml(
        "bruzek-test.yaml",
        "name: bruzek-test
provenance: invented numbers for a test of fitting other recording systems
blocks:
  - id: os_coxae
    type: latent
    traits:
      - {id: bruzek_preauricular_surface, thresholds: [-0.4, 0.4], mean: {female: -1.0, male: 1.0}}
      - {id: bruzek_sciatic_notch, thresholds: [-0.4, 0.4], mean: {female: -1.1, male: 1.1}}
      - {id: bruzek_composite_arch, thresholds: [-0.4, 0.4], mean: {female: -0.9, male: 0.9}}
      - {id: bruzek_inferior_pelvis, thresholds: [-0.4, 0.4], mean: {female: -1.2, male: 1.2}}
      - {id: bruzek_ischiopubic_proportion, thresholds: [-0.4, 0.4], mean: {female: -0.8, male: 0.8}}
      - {id: acetabulum_diameter, mean: {female: 48.0, male: 54.0}, sd: {female: 2.5, male: 2.8}}
    correlation:
      - [1, 0.3, 0.3, 0.3, 0.3, 0.2]
      - [0.3, 1, 0.3, 0.3, 0.3, 0.2]
      - [0.3, 0.3, 1, 0.3, 0.3, 0.2]
      - [0.3, 0.3, 0.3, 1, 0.3, 0.2]
      - [0.3, 0.3, 0.3, 0.3, 1, 0.2]
      - [0.2, 0.2, 0.2, 0.2, 0.2, 1]
",
    )
    .unwrap();
    let reference = simulate(
        &truth,
        &[GroupSpec::single(2000, 0.5)],
        &MissingSpec::parse("trait=0.2").unwrap(),
        24,
    )
    .unwrap();
    let spec = FitSpec::from_yaml(
        "name: bruzek-fitted
include: []
blocks:
  - {id: os_coxae, traits: [bruzek_preauricular_surface, bruzek_sciatic_notch, bruzek_composite_arch, bruzek_inferior_pelvis, bruzek_ischiopubic_proportion, acetabulum_diameter]}
",
    )
    .unwrap();
    let refs: Vec<(&tessera::data::Individual, Sex)> = reference
        .individuals
        .iter()
        .zip(reference.true_sex.iter().copied())
        .collect();
    let info = ReferenceInfo {
        file: "simulated".into(),
        sha256: "0".repeat(64),
        command: "test".into(),
    };
    let fitted = fit(&spec, &truth.catalogue, &refs, &info).unwrap();
    let model = Model::from_yaml("fitted.yaml", &fitted.to_yaml().unwrap()).unwrap();
    let (Block::Latent(t), Block::Latent(f)) = (&truth.blocks[0], &model.blocks[0]) else {
        panic!()
    };
    // The male − female separation of each character, within 4.5 standard errors (as the
    // fit of the shipped model's blocks in src/fit/tests/fit.rs).
    for (j, e) in fitted
        .estimates
        .iter()
        .filter(|e| e.parameter == "male - female latent mean")
        .enumerate()
    {
        let true_shift = t.mean[1][j] - t.mean[0][j];
        assert!(
            (e.estimate - true_shift).abs() < 4.5 * e.se,
            "{}: {} ± {} vs {true_shift}",
            e.trait_id,
            e.estimate,
            e.se
        );
    }
    assert!((f.mean[0][5] - 48.0).abs() < 0.5 && (f.mean[1][5] - 54.0).abs() < 0.5);
}
