//! Unit tests of `report/figures.rs`.

use super::*;

/// The figure's bars use the library's Wilson interval (checked against statsmodels in
/// numeric/proportion.rs); with no individual in a bin, the bar spans 0 to 1.
#[test]
fn an_empty_bin_has_a_bar_from_0_to_1() {
    assert_eq!(wilson(0.3, 0), (0.0, 1.0));
    let (a, b) = wilson(0.7, 10);
    assert!(
        (a - 0.396_778_147_461_145_37).abs() < 1e-12 && (b - 0.892_208_732_593_698_9).abs() < 1e-12
    );
}

#[test]
fn tick_labels_have_no_spurious_decimals_and_a_real_minus() {
    assert_eq!(tick(10.0), "10");
    assert_eq!(tick(0.25), "0.25");
    assert_eq!(tick(-3.0), "\u{2212}3");
    assert_eq!(tick(-0.001), "0");
}

/// Legible in greyscale: no two curves of the π figure and no two regions of the LR figure
/// look alike (the legend draws each sample from the series' own look, so they match).
#[test]
fn every_series_has_a_look_of_its_own() {
    let curves: Vec<Look> = (0..6).map(curve_look).collect();
    let regions: Vec<Look> = (0..5).map(region_look).collect();
    for looks in [curves, regions] {
        for (i, a) in looks.iter().enumerate() {
            assert!(looks[i + 1..].iter().all(|b| b != a), "{a:?} twice");
        }
    }
}

/// Every individual is named on the LR figure up to the limit, and none beyond it.
#[test]
fn the_lr_figure_names_every_individual_or_none() {
    let rows = |n: usize| -> Vec<(String, Vec<Option<f64>>)> {
        (0..n)
            .map(|i| {
                (
                    format!("ZQ-{i:04}"),
                    vec![Some(i as f64 / n as f64 - 0.5), None],
                )
            })
            .collect()
    };
    let blocks = vec!["cranium".to_string(), "pelvis".to_string()];
    let few = rows(75);
    let svg = lr_by_region_figure(&blocks, few.len(), &|i| few[i].clone()).unwrap();
    for i in 0..75 {
        assert!(
            svg.contains(&format!("\nZQ-{i:04}\n")),
            "ZQ-{i:04} not named"
        );
    }
    // The legend names each block once.
    assert_eq!(svg.matches("cranium").count(), 1);
    let n = LR_FIGURE_MAX_LABELLED + 1;
    let many = rows(n);
    let svg = lr_by_region_figure(&blocks, many.len(), &|i| many[i].clone()).unwrap();
    assert!(
        !svg.contains(">ZQ-"),
        "some individuals named beyond the limit"
    );
}

/// A regional table: the figures draw every k-th of the sorted individuals beyond 2000, say
/// so on the axis, and still render as PNG.
#[test]
fn a_million_individuals_give_figures_that_render() {
    let (v, k) = thinned(1_000_000);
    assert_eq!(k, 500);
    assert!(v.len() <= MAX_FIGURE_POINTS + 1 && v[0] == 0 && *v.last().unwrap() == 999_999);
    assert_eq!(thinned(3).0, [0, 1, 2]);
    let n = 50_000;
    let points: Vec<(f64, f64, f64)> = (0..n)
        .map(|i| {
            let p = i as f64 / n as f64;
            (p, p * 0.9, (p * 1.1).min(1.0))
        })
        .collect();
    let svg = p_female_figure(points, [0.05, 0.2, 0.8, 0.95]).unwrap();
    assert!(svg.contains("every 25th of 50000 drawn"));
    assert!(png_of("p_female", svg.as_bytes()).is_ok());
    let rows: Vec<(String, Vec<Option<f64>>)> = (0..n)
        .map(|i| (format!("R{i}"), vec![Some(i as f64 / n as f64 - 0.5)]))
        .collect();
    let svg =
        lr_by_region_figure(&["cranium".to_string()], rows.len(), &|i| rows[i].clone()).unwrap();
    assert!(svg.contains("every 25th of 50000 drawn"));
    assert!(png_of("lr_by_region", svg.as_bytes()).is_ok());
}
