//! Shared by the benchmarks: the ten-trait latent block (six ordinal traits, four
//! measurements, within-sex correlation 0.3; invented parameters for benchmarking only).
#![allow(dead_code)]

use tessera::model::Model;

/// The ten-trait model.
pub fn ten_trait_model() -> Model {
    let ord = [
        "glabella",
        "mastoid",
        "supraorbital_margin",
        "mental_eminence",
        "nuchal_crest",
        "sciatic_notch",
    ];
    let met = [
        ("femur_head_diameter", 42.0, 47.6, 2.4, 2.8),
        ("femur_midshaft_circumference", 82.5, 90.0, 6.9, 10.0),
        ("humerus_head_diameter", 41.5, 47.5, 2.4, 2.7),
        ("canine_bl_diameter", 7.0, 7.7, 0.5, 0.55),
    ];
    let mut y = String::from("name: bench\nprovenance: \"invented parameters for a benchmark only\"\nblocks:\n  - id: ten\n    type: latent\n    traits:\n");
    for t in ord {
        y += &format!("      - {{id: {t}, thresholds: [-1.3, -0.45, 0.45, 1.3], mean: {{female: -0.8, male: 0.8}}}}\n");
    }
    for (t, mf, mm, sf, sm) in met {
        y += &format!("      - {{id: {t}, mean: {{female: {mf}, male: {mm}}}, sd: {{female: {sf}, male: {sm}}}}}\n");
    }
    y += "    correlation:\n";
    for i in 0..10 {
        let row: Vec<String> = (0..10)
            .map(|j| if i == j { "1.0".into() } else { "0.3".into() })
            .collect();
        y += &format!("      - [{}]\n", row.join(", "));
    }
    Model::from_yaml("bench", &y).expect("bench model")
}
