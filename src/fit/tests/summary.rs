use super::*;
use crate::data::{Observation, Sex};
use crate::fit::{fit, FitSpec, ReferenceInfo};
use crate::model::Model;
use crate::sim::{simulate, GroupSpec, MissingSpec};

fn file() -> SummaryFile {
    SummaryFile {
        file: "summary.yaml".into(),
        sha256: "0".repeat(64),
        command: "test".into(),
    }
}

fn source() -> Option<SummarySource> {
    Some(SummarySource {
        citation: Some("Invented for a test".into()),
        sample: Some("simulated".into()),
        females: Some(10.0),
        males: Some(10.0),
        note: String::new(),
    })
}

const SPEC: &str = "name: refit
blocks:
  - {id: cranium, traits: [glabella, mastoid, mental_eminence]}
  - {id: postcranial, traits: [femur_head_diameter, femur_midshaft_circumference]}
";

/// What a paper would print about the same individuals: counts per grade by sex, and n, mean
/// and sample SD by sex.
fn summarise(
    model: &Model,
    sim: &crate::sim::Simulated,
    id: &str,
) -> (Option<SexSummary>, Option<SexSummary>) {
    let index = model.catalogue.position(id).unwrap();
    let def = model.catalogue.get(id).unwrap();
    let per_sex = |sex: Sex| {
        let values: Vec<Observation> = sim
            .individuals
            .iter()
            .zip(&sim.true_sex)
            .filter(|(_, s)| **s == sex)
            .filter_map(|(i, _)| i.observations[index])
            .collect();
        match def.kind {
            TraitKind::Ordinal { lowest, highest } => {
                let mut counts = vec![0.0; (highest - lowest + 1) as usize];
                for v in values {
                    let Observation::Grade { low, high } = v else {
                        panic!()
                    };
                    assert_eq!(low, high);
                    counts[(low - lowest) as usize] += 1.0;
                }
                SexSummary {
                    counts: Some(counts),
                    ..SexSummary::default()
                }
            }
            _ => {
                let xs: Vec<f64> = values
                    .iter()
                    .map(|v| match v {
                        Observation::Measurement { value } => *value,
                        _ => panic!(),
                    })
                    .collect();
                let n = xs.len() as f64;
                let mean = xs.iter().sum::<f64>() / n;
                let sd = (xs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0)).sqrt();
                SexSummary {
                    n: Some(n),
                    mean: Some(mean),
                    sd: Some(sd),
                    ..SexSummary::default()
                }
            }
        }
    };
    (Some(per_sex(Sex::Female)), Some(per_sex(Sex::Male)))
}

#[test]
fn a_summary_of_the_reference_gives_the_model_fitted_to_its_rows() {
    let model = Model::default_model().unwrap();
    let sim = simulate(
        &model,
        &[GroupSpec::single(400, 0.5)],
        &MissingSpec::parse("").unwrap(),
        17,
    )
    .unwrap();
    let spec = FitSpec::from_yaml(SPEC).unwrap();
    let refs: Vec<_> = sim
        .individuals
        .iter()
        .zip(sim.true_sex.iter().copied())
        .collect();
    let info = ReferenceInfo {
        file: "rows".into(),
        sha256: "0".repeat(64),
        command: "test".into(),
    };
    let raw = fit(&spec, &model.catalogue, &refs, &info).unwrap();
    let blocks: Vec<SummaryBlock> = spec
        .blocks
        .iter()
        .zip(&raw.model.blocks)
        .map(|(b, fitted)| {
            let RawBlock::Latent(fitted) = fitted else {
                panic!()
            };
            SummaryBlock {
                id: b.id.clone(),
                label: String::new(),
                dispersion: Dispersion::PerSex,
                traits: b
                    .traits
                    .iter()
                    .map(|t| {
                        let (female, male) = summarise(&model, &sim, t);
                        SummaryTrait {
                            id: t.clone(),
                            female,
                            male,
                        }
                    })
                    .collect(),
                correlation: fitted.correlation.clone(),
                correlation_female: None,
                correlation_male: None,
                assumed_correlation: None,
            }
        })
        .collect();
    let summary = SummarySpec {
        name: "from-summary".into(),
        description: String::new(),
        source: source(),
        minimum_age: None,
        traits: Vec::new(),
        include: None,
        blocks,
    };
    let built = build_from_summary(&summary, &model.catalogue, &file()).unwrap();
    let mut compared = 0;
    let mut worst: f64 = 0.0;
    for (a, b) in raw.model.blocks.iter().zip(&built.model.blocks) {
        let (RawBlock::Latent(a), RawBlock::Latent(b)) = (a, b) else {
            panic!()
        };
        for (ta, tb) in a.traits.iter().zip(&b.traits) {
            let mut pairs = vec![
                (ta.mean.female, tb.mean.female),
                (ta.mean.male, tb.mean.male),
            ];
            if let (Some(x), Some(y)) = (&ta.thresholds, &tb.thresholds) {
                pairs.extend(x.iter().copied().zip(y.iter().copied()));
            }
            if let (Some(x), Some(y)) = (ta.sd, tb.sd) {
                pairs.push((x.female, y.female));
                pairs.push((x.male, y.male));
            }
            for (x, y) in pairs {
                worst = worst.max((x - y).abs());
                compared += 1;
            }
        }
        assert_eq!(a.correlation, b.correlation);
    }
    println!("{compared} parameters, largest difference {worst:.1e}");
    assert_eq!(compared, 3 * 6 + 2 * 4);
    assert!(worst < 1e-9, "{worst}");
    // The standard errors agree too (the same information matrix).
    let margins = |e: &Vec<Estimate>| -> Vec<Estimate> {
        e.iter()
            .filter(|x| !x.parameter.starts_with("correlation"))
            .cloned()
            .collect()
    };
    let (a, b) = (margins(&raw.estimates), margins(&built.estimates));
    assert_eq!(a.len(), b.len());
    for (x, y) in a.iter().zip(&b) {
        assert_eq!(x.parameter, y.parameter);
        assert!((x.se - y.se).abs() < 1e-8, "{x:?} {y:?}");
    }
    let text = built.to_yaml().unwrap();
    let back = Model::from_yaml("built.yaml", &text).unwrap();
    let origin = back.built_from.unwrap();
    assert_eq!(origin.citation, "Invented for a test");
    assert!(back.provenance.contains("PUBLISHED SUMMARY STATISTICS"));
    assert!(back.provenance.contains("as published"));
}

const BAD: &str = "name: bad
blocks:
  - id: cranium
    traits:
      - id: glabella
        female: {counts: [3, -1, 4, 2, 1]}
        male: {shares: [0.1, 0.2, 0.3, 0.2, 0.1], n: 40}
      - id: mastoid
        female: {shares: [0.2, 0.2, 0.2, 0.2, 0.2]}
        male: {counts: [1, 2, 3]}
    correlation: [[1, 0.9], [0.9, 1]]
  - id: femur
    traits:
      - id: femur_head_diameter
        female: {n: 50, mean: 42, sd: 0}
        male: {mean: 47, sd: 2.8}
      - id: femur_midshaft_circumference
        female: {n: 50, mean: 82, sd: 7}
        male: {n: 60, mean: 90, sd: 10}
      - id: humerus_head_diameter
        female: {n: 50, mean: 40, sd: 2}
        male: {n: 60, mean: 46, sd: 2}
    correlation: [[1, 0.9, 0.9], [0.9, 1, -0.9], [0.9, -0.9, 1]]
";

#[test]
fn every_problem_of_a_bad_summary_is_named_by_its_field() {
    let model = Model::default_model().unwrap();
    let spec = SummarySpec::from_yaml(BAD).unwrap();
    let err = build_from_summary(&spec, &model.catalogue, &file()).unwrap_err();
    let places: Vec<&str> = err.problems.iter().map(|p| p.place.as_str()).collect();
    for expected in [
        "source",
        "blocks[cranium].traits[glabella].female.counts[2]",
        "blocks[cranium].traits[glabella].male.shares",
        "blocks[cranium].traits[mastoid].female.n",
        "blocks[cranium].traits[mastoid].male.counts",
        "blocks[femur].traits[femur_head_diameter].female.sd",
        "blocks[femur].traits[femur_head_diameter].male.n",
        "blocks[femur].correlation",
    ] {
        assert!(places.contains(&expected), "{expected} not in {places:?}");
    }
    assert_eq!(places.len(), 8, "{:#?}", err.problems);
    let pd = err
        .problems
        .iter()
        .find(|p| p.place == "blocks[femur].correlation")
        .unwrap();
    assert!(
        pd.message.contains("not positive definite"),
        "{}",
        pd.message
    );
    let shares = err
        .problems
        .iter()
        .find(|p| p.place.ends_with("male.shares"))
        .unwrap();
    assert!(shares.message.contains("sum to 0.9"), "{}", shares.message);
}

#[test]
fn an_assumed_correlation_is_exchangeable_and_its_absence_is_said() {
    let model = Model::default_model().unwrap();
    let text = |extra: &str| {
        format!(
            "name: femur
source: {{citation: c, sample: s, females: 50, males: 60}}
blocks:
  - id: femur
    traits:
      - id: femur_head_diameter
        female: {{n: 50, mean: 42, sd: 2.4}}
        male: {{n: 60, mean: 47.6, sd: 2.8}}
      - id: femur_midshaft_circumference
        female: {{n: 50, mean: 82.5, sd: 6.9}}
        male: {{n: 60, mean: 90, sd: 10}}
{extra}"
        )
    };
    let spec = SummarySpec::from_yaml(&text("    assumed_correlation: 0.4\n")).unwrap();
    let built = build_from_summary(&spec, &model.catalogue, &file()).unwrap();
    let RawBlock::Latent(b) = &built.model.blocks[0] else {
        panic!()
    };
    assert_eq!(b.correlation, Some(vec![vec![1.0, 0.4], vec![0.4, 1.0]]));
    assert!(built.model.provenance.contains("ASSUMED 0.4"));
    // ML SD from the sample SD: 2.4 · √(49/50).
    let sd = b.traits[0].sd.unwrap().female;
    assert!((sd - 2.4 * (49.0f64 / 50.0).sqrt()).abs() < 1e-9);
    let spec = SummarySpec::from_yaml(&text("")).unwrap();
    let built = build_from_summary(&spec, &model.catalogue, &file()).unwrap();
    assert!(built.model.provenance.contains("ASSUMED 0"));
    assert!(built.warnings.iter().any(|w| w.contains("independent")));
    let spec = SummarySpec::from_yaml(&text("    assumed_correlation: 1\n")).unwrap();
    let err = build_from_summary(&spec, &model.catalogue, &file()).unwrap_err();
    assert_eq!(err.problems[0].place, "blocks[femur].assumed_correlation");
}
