use super::*;
use crate::model::{Block, Model};
use crate::sim::{simulate, GroupSpec, MissingSpec};

const SPEC: &str = "name: refit
blocks:
  - {id: cranium, traits: [glabella, mastoid, supraorbital_margin, mental_eminence, nuchal_crest]}
  - {id: pelvis, traits: [ventral_arc, subpubic_concavity, ischiopubic_ramus, sciatic_notch]}
  - {id: postcranial, traits: [femur_head_diameter, femur_midshaft_circumference, humerus_head_diameter]}
";

fn info() -> ReferenceInfo {
    ReferenceInfo {
        file: "simulated".into(),
        sha256: "0".repeat(64),
        command: "test".into(),
    }
}

fn reference(n: usize, missing: &str, seed: u64) -> (Model, crate::sim::Simulated) {
    let model = Model::default_model().unwrap();
    let groups = vec![GroupSpec::single(n, 0.5)];
    let sim = simulate(&model, &groups, &MissingSpec::parse(missing).unwrap(), seed).unwrap();
    (model, sim)
}

/// The true value of an estimate's parameter in the (identified) parametrisation of the table.
fn truth(model: &Model, e: &Estimate) -> Option<f64> {
    let block = model.blocks.iter().find_map(|b| match b {
        Block::Latent(l) if l.id == e.block => Some(l),
        _ => None,
    })?;
    let j = block.traits.iter().position(|t| t.id == e.trait_id)?;
    let mf = block.mean[0][j];
    let mm = block.mean[1][j];
    let p = e.parameter.as_str();
    if let Some(rest) = p.strip_prefix("correlation with ") {
        let other = rest.split(' ').next()?;
        let k = block.traits.iter().position(|t| t.id == other)?;
        let c = &block.cov[0];
        return Some(c[(j, k)] / (c[(j, j)] * c[(k, k)]).sqrt());
    }
    match p {
        "male - female latent mean" => Some(mm - mf),
        "mean female" => Some(mf),
        "mean male" => Some(mm),
        "sd female" => Some(block.cov[0][(j, j)].sqrt()),
        "sd male" => Some(block.cov[1][(j, j)].sqrt()),
        _ => {
            let k: usize = p
                .strip_prefix("threshold ")?
                .split('|')
                .next()?
                .parse()
                .ok()?;
            match &block.traits[j].kind {
                crate::model::latent::LatentKind::Ordinal { thresholds, lowest } => {
                    Some(thresholds[(k as i32 - lowest) as usize] - mf)
                }
                _ => None,
            }
        }
    }
}

#[test]
fn fitting_a_simulated_reference_recovers_the_model_within_its_intervals() {
    let (model, sim) = reference(2000, "trait=0.2,range=0.03", 41);
    let spec = FitSpec::from_yaml(SPEC).unwrap();
    check_spec(&spec, &model.catalogue).unwrap();
    let refs: Vec<_> = sim
        .individuals
        .iter()
        .zip(sim.true_sex.iter().copied())
        .collect();
    let fitted = fit(&spec, &model.catalogue, &refs, &info()).unwrap();
    let mut covered = 0;
    let mut total = 0;
    for e in &fitted.estimates {
        let t = truth(&model, e).unwrap_or_else(|| panic!("no truth for {e:?}"));
        let z = (e.estimate - t) / e.se;
        assert!(
            z.abs() < 4.5,
            "{} {} {}: {} ± {} vs {t}",
            e.block,
            e.trait_id,
            e.parameter,
            e.estimate,
            e.se
        );
        total += 1;
        if z.abs() <= 1.96 {
            covered += 1;
        }
    }
    let share = covered as f64 / total as f64;
    println!("95% intervals covering the truth: {covered}/{total}");
    // 95% nominal; measurements are recorded to 0.1 mm, which costs a little.
    assert!(share >= 0.85, "{covered}/{total}");
    // The written model loads, and keeps the block structure (the fitted blocks, then the
    // shipped DNA block it includes by default).
    let text = fitted.to_yaml().unwrap();
    let back = Model::from_yaml("refit.yaml", &text).unwrap();
    assert_eq!(back.blocks.len(), 4);
    assert!(matches!(back.blocks[3], crate::model::Block::Dna(_)));
    assert!(back.provenance.contains("FITTED"));
}

#[test]
fn problems_are_all_reported_and_warnings_name_the_grade() {
    let (model, sim) = reference(60, "", 5);
    // Only females scored 5 on the glabella are kept at grade 5 … remove every grade-1 score
    // of the ventral arc so that its lowest threshold cannot be estimated.
    let va = model.catalogue.position("ventral_arc").unwrap();
    let gl = model.catalogue.position("glabella").unwrap();
    let mut inds = sim.individuals.clone();
    for (ind, sex) in inds.iter_mut().zip(&sim.true_sex) {
        if matches!(
            ind.observations[va],
            Some(Observation::Grade { low: 1, .. })
        ) {
            ind.observations[va] = Some(Observation::Grade { low: 2, high: 2 });
        }
        if *sex == Sex::Male
            && matches!(
                ind.observations[gl],
                Some(Observation::Grade { low: 1, .. })
            )
        {
            ind.observations[gl] = Some(Observation::Grade { low: 2, high: 2 });
        }
    }
    let spec = FitSpec::from_yaml(SPEC).unwrap();
    let refs: Vec<_> = inds.iter().zip(sim.true_sex.iter().copied()).collect();
    let err = fit(&spec, &model.catalogue, &refs, &info()).unwrap_err();
    assert_eq!(err.problems.len(), 1, "{err:?}");
    assert!(err.problems[0].place.contains("ventral_arc"));
    assert!(err.problems[0]
        .message
        .contains("grade 1 is never recorded"));
    // Without the ventral arc, the fit goes through and warns about the glabella.
    let spec = FitSpec::from_yaml(&SPEC.replace("ventral_arc, ", "")).unwrap();
    let fitted = fit(&spec, &model.catalogue, &refs, &info()).unwrap();
    assert!(fitted
        .warnings
        .iter()
        .any(|w| w.contains("glabella") && w.contains("grade 1 is never recorded for a male")));
}

#[test]
fn a_spec_with_unknown_or_repeated_traits_is_refused() {
    let model = Model::default_model().unwrap();
    let spec = FitSpec::from_yaml(
        "name: x\nblocks:\n  - {id: a, traits: [glabella, nosuch]}\n  - {id: a, traits: [glabella, dna_y_reads]}\n",
    )
    .unwrap();
    let problems = check_spec(&spec, &model.catalogue).unwrap_err();
    assert_eq!(problems.len(), 4, "{problems:?}");
}
