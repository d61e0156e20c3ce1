use super::*;
use crate::data::ReadSettings;

fn table(text: &str) -> Assemblage {
    let model = Model::default_model().unwrap();
    read_bytes(
        "t.csv",
        text.as_bytes(),
        &model.catalogue,
        &ReadSettings::default(),
    )
    .unwrap()
}

#[test]
fn rows_without_a_group_go_to_the_no_group_label_only_when_some_row_has_one() {
    let none = table("id,group,glabella\nA,,3\nB,,4\n");
    assert_eq!(group_labels(&none).unwrap(), None);
    let some = table("id,group,glabella\nA,north,3\nB,,4\n");
    assert_eq!(
        group_labels(&some).unwrap(),
        Some(vec!["north".to_string(), NO_GROUP.to_string()])
    );
    let clash = table("id,group,glabella\nA,(none),3\nB,north,4\n");
    let e = group_labels(&clash).unwrap_err();
    assert!(e.to_string().contains("rename that group"), "{e}");
}

#[test]
fn a_scored_child_is_noted_before_any_work() {
    let model = Model::default_model().unwrap();
    let a = table("id,age,glabella\nA,8,3\nB,30,4\n");
    let notes = input_notes(&model, &a);
    assert!(
        notes
            .iter()
            .any(|n| n.starts_with("1 individual with skeletal scores")),
        "{notes:?}"
    );
}

#[test]
fn recalibration_changes_count_only_individuals_whose_category_moves() {
    let run = AnalysisOptions::default().validate().unwrap();
    let a = table("id,glabella,mastoid_l\nA,1,1\nB,5,5\nC,3,3\n");
    let mut r = run.analyse(a, vec![], &crate::progress::Silent).unwrap();
    assert_eq!(r.recalibration_changes(), 0);
    let mut p = r.results.main.p_female.clone();
    // Move the first individual to the other end of the scale.
    p[0] = p[0].map(|x| 1.0 - x);
    r.recalibration = Some(crate::assemblage::recalibration::Recalibration {
        p_female: p,
        ..Default::default()
    });
    assert_eq!(r.recalibration_changes(), 1);
}

#[test]
fn the_tables_by_sex_leave_out_subadults_and_the_evidence_free_and_count_them() {
    let run = AnalysisOptions {
        by_sex: vec!["lesion".into()],
        ..Default::default()
    }
    .validate()
    .unwrap();
    // C is a child sexed by DNA, D has nothing that speaks of sex.
    let a = table(
        "id,age,glabella,mastoid_l,dna_x_reads,dna_y_reads,lesion\n\
         A,30,1,1,,,1\nB,40,5,5,,,0\nC,8,,,5000,0,1\nD,50,,,,,1\nE,35,2,1,,,0\n",
    );
    let r = run.analyse(a, vec![], &crate::progress::Silent).unwrap();
    assert!(r.evidence[2].estimable, "the child is sexed by DNA");
    assert_eq!(
        r.by_sex.left_out,
        LeftOut {
            no_evidence: 1,
            subadult: 1
        }
    );
    let p = &r.by_sex.prevalence[0];
    assert_eq!((p.n_recorded, p.n_left_out), (3, 2));
    assert!((p.n_female + p.n_male - 3.0).abs() < 1e-9);
    assert_eq!(r.by_sex.age.as_ref().unwrap().n_with_age, 3);
    assert_eq!(
        r.by_sex.left_out.sentence().unwrap(),
        "1 individual without evidence of sex and 1 subadult sexed by DNA"
    );
}

#[test]
fn the_internal_draws_adapt_to_the_table_instead_of_refusing_it() {
    assert_eq!(internal_draws(75), DEFAULT_DRAWS);
    assert_eq!(internal_draws(200_000), DEFAULT_DRAWS);
    // A million individuals: 200 draws (200 million individual-draws, the bound).
    assert_eq!(internal_draws(1_000_000), 200);
    assert!(internal_draws(1_000_000) * 1_000_000 <= MAX_INDIVIDUAL_DRAWS);
    assert_eq!(internal_draws(usize::MAX), 1);
    assert_eq!(internal_draws(0), DEFAULT_DRAWS);
}
