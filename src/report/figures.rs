//! Figures as SVG (plotters' SVG backend), legible in black and white: greys, line dashes and
//! marker shapes rather than colour; every axis labelled with its unit.

use crate::summary::AgeBySex;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};
use std::sync::Once;

static FONT: Once = Once::new();

/// The text font, embedded (DejaVu Sans, Bitstream Vera licence: assets/fonts/).
pub const FONT_BYTES: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans.ttf");

fn register_font() {
    FONT.call_once(|| {
        let _ = plotters::style::register_font("sans-serif", FontStyle::Normal, FONT_BYTES);
    });
}

/// A figure could not be drawn.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("figure {figure}: {message}")]
pub struct FigureError {
    /// Which figure.
    pub figure: String,
    /// What went wrong.
    pub message: String,
}

/// Pixels per SVG unit of the PNG copies: the figures are drawn 800 units wide, so 2.5 gives
/// 2000 pixels, 300 dpi at a page width of about 17 cm (common journal practice for
/// line art: at least 300 dpi at print size).
pub const PNG_SCALE: f32 = 2.5;

/// A PNG copy of an SVG figure (resvg, the embedded font, white background).
///
/// # Errors
/// [`FigureError`] when the SVG cannot be parsed or the picture encoded.
pub fn png_of(name: &str, svg: &[u8]) -> Result<Vec<u8>, FigureError> {
    let err = |message: String| FigureError {
        figure: name.into(),
        message,
    };
    let mut opt = resvg::usvg::Options::default();
    opt.fontdb_mut().load_font_data(FONT_BYTES.to_vec());
    opt.fontdb_mut().set_sans_serif_family("DejaVu Sans");
    let tree = resvg::usvg::Tree::from_data(svg, &opt).map_err(|e| err(e.to_string()))?;
    let size = tree
        .size()
        .to_int_size()
        .scale_by(PNG_SCALE)
        .ok_or_else(|| err("empty picture".into()))?;
    let mut pix = resvg::tiny_skia::Pixmap::new(size.width(), size.height())
        .ok_or_else(|| err("empty picture".into()))?;
    pix.fill(resvg::tiny_skia::Color::WHITE);
    resvg::render(
        &tree,
        resvg::tiny_skia::Transform::from_scale(PNG_SCALE, PNG_SCALE),
        &mut pix.as_mut(),
    );
    pix.encode_png().map_err(|e| err(e.to_string()))
}

/// A tick label without spurious decimals: 0.25, 0.5, 2, 10 (never 2.0 or 10.0).
fn tick(v: f64) -> String {
    let s = format!("{v:.2}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" {
        "0".into()
    } else {
        s.into()
    }
}

fn fail<E: std::fmt::Debug>(figure: &str) -> impl Fn(E) -> FigureError + '_ {
    move |e| FigureError {
        figure: figure.to_string(),
        message: format!("{e:?}"),
    }
}

const GREYS: [RGBColor; 6] = [
    RGBColor(0, 0, 0),
    RGBColor(90, 90, 90),
    RGBColor(150, 150, 150),
    RGBColor(0, 0, 0),
    RGBColor(90, 90, 90),
    RGBColor(150, 150, 150),
];

/// Each individual's P(female) under the chosen prior (dots) with its range across the
/// sensitivity set (bars), sorted; dashed lines at the category thresholds.
pub fn p_female_figure(
    points: &[(f64, f64, f64)],
    thresholds: [f64; 4],
) -> Result<String, FigureError> {
    register_font();
    let name = "p_female";
    let mut v: Vec<(f64, f64, f64)> = points.to_vec();
    v.sort_by(|a, b| a.0.total_cmp(&b.0));
    let n = v.len().max(1);
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, (800, 420)).into_drawing_area();
        root.fill(&WHITE).map_err(fail(name))?;
        let mut c = ChartBuilder::on(&root)
            .caption(
                "Posterior probability of female, with its range across priors",
                ("sans-serif", 16),
            )
            .margin(12)
            .x_label_area_size(40)
            .y_label_area_size(50)
            .build_cartesian_2d(0f64..(n as f64 + 1.0), 0f64..1f64)
            .map_err(fail(name))?;
        c.configure_mesh()
            .light_line_style(TRANSPARENT)
            .bold_line_style(RGBColor(215, 215, 215))
            .disable_x_mesh()
            .x_desc("individuals with usable evidence, sorted by P(female)")
            .y_desc("P(female)")
            .x_label_formatter(&|v| tick(*v))
            .y_label_formatter(&|v| tick(*v))
            .draw()
            .map_err(fail(name))?;
        // Each cut-off labelled with its category, just above its line at the left (text is
        // anchored at its top-left corner; 0.045 clears an 11-pixel line of text).
        let words = ["male", "probable male", "probable female", "female"];
        for (t, w) in thresholds.into_iter().zip(words) {
            c.draw_series(DashedLineSeries::new(
                vec![(0.0, t), (n as f64 + 1.0, t)],
                4,
                4,
                RGBColor(150, 150, 150).into(),
            ))
            .map_err(fail(name))?;
            let label = if t < 0.5 {
                format!("{w} at or below {}", tick(t))
            } else {
                format!("{w} from {}", tick(t))
            };
            c.draw_series(std::iter::once(Text::new(
                label,
                (n as f64 * 0.02, t + 0.045),
                ("sans-serif", 11).into_font().color(&RGBColor(90, 90, 90)),
            )))
            .map_err(fail(name))?;
        }
        c.draw_series(v.iter().enumerate().map(|(i, &(_, lo, hi))| {
            PathElement::new(
                vec![(i as f64 + 1.0, lo), (i as f64 + 1.0, hi)],
                RGBColor(120, 120, 120),
            )
        }))
        .map_err(fail(name))?;
        c.draw_series(
            v.iter()
                .enumerate()
                .map(|(i, &(p, _, _))| Circle::new((i as f64 + 1.0, p), 3, BLACK.filled())),
        )
        .map_err(fail(name))?;
        root.present().map_err(fail(name))?;
    }
    Ok(s)
}

/// The posterior density of π under each prior (one line style each).
pub fn pi_posterior_figure(curves: &[(String, Vec<(f64, f64)>)]) -> Result<String, FigureError> {
    register_font();
    let name = "pi_posterior";
    let ymax = curves
        .iter()
        .flat_map(|(_, c)| c.iter().map(|p| p.1))
        .fold(0.0, f64::max)
        .max(1e-9)
        * 1.1;
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, (800, 420)).into_drawing_area();
        root.fill(&WHITE).map_err(fail(name))?;
        let mut c = ChartBuilder::on(&root)
            .caption(
                "Posterior of the proportion female under each prior",
                ("sans-serif", 16),
            )
            .margin(12)
            .x_label_area_size(40)
            .y_label_area_size(50)
            .build_cartesian_2d(0f64..1f64, 0f64..ymax)
            .map_err(fail(name))?;
        c.configure_mesh()
            .light_line_style(TRANSPARENT)
            .bold_line_style(RGBColor(215, 215, 215))
            .x_desc("proportion female, π")
            .y_desc("posterior density")
            .x_label_formatter(&|v| tick(*v))
            .y_label_formatter(&|v| tick(*v))
            .draw()
            .map_err(fail(name))?;
        for (k, (label, pts)) in curves.iter().enumerate() {
            let col = GREYS[k % GREYS.len()];
            let style = ShapeStyle::from(col).stroke_width(if k < 3 { 2 } else { 1 });
            if k % 3 == 0 {
                c.draw_series(LineSeries::new(pts.clone(), style))
                    .map_err(fail(name))?
                    .label(label.clone())
                    .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], style));
            } else {
                let (dash, gap) = if k % 3 == 1 { (6, 4) } else { (2, 3) };
                c.draw_series(DashedLineSeries::new(pts.clone(), dash, gap, style))
                    .map_err(fail(name))?
                    .label(label.clone())
                    // The legend's sample is dashed as its curve is (legible in greyscale).
                    .legend(move |(x, y)| {
                        plotters::element::DashedPathElement::new(
                            vec![(x, y), (x + 24, y)],
                            dash,
                            gap,
                            style,
                        )
                    });
            }
        }
        c.configure_series_labels()
            .border_style(BLACK)
            .background_style(WHITE)
            .label_font(("sans-serif", 12))
            .draw()
            .map_err(fail(name))?;
        root.present().map_err(fail(name))?;
    }
    Ok(s)
}

/// log10 LR of each body region for each individual (one marker shape per region).
pub fn lr_by_region_figure(
    blocks: &[String],
    rows: &[(String, Vec<Option<f64>>)],
) -> Result<String, FigureError> {
    register_font();
    let name = "lr_by_region";
    let n = rows.len().max(1);
    let height = (120 + 14 * n).clamp(300, 4000) as u32;
    let max = rows
        .iter()
        .flat_map(|r| r.1.iter().flatten().map(|x| x.abs()))
        .fold(1.0, f64::max)
        .min(10.0)
        * 1.05;
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, (800, height)).into_drawing_area();
        root.fill(&WHITE).map_err(fail(name))?;
        let mut c = ChartBuilder::on(&root)
            .caption(
                "Evidence per body region (log10 likelihood ratio female:male)",
                ("sans-serif", 16),
            )
            .margin(12)
            .x_label_area_size(40)
            .y_label_area_size(90)
            .build_cartesian_2d(-max..max, 0f64..(n as f64 + 1.0))
            .map_err(fail(name))?;
        let labels: Vec<String> = rows.iter().map(|r| r.0.clone()).collect();
        c.configure_mesh()
            .light_line_style(TRANSPARENT)
            .bold_line_style(RGBColor(215, 215, 215))
            .disable_y_mesh()
            .x_desc("log10 LR (positive: female, negative: male; beyond ±10 drawn at the edge)")
            .y_desc("individual")
            .y_labels(n.min(60))
            .y_label_formatter(&|y| {
                let i = y.round() as usize;
                if i >= 1 && i <= labels.len() && (y - y.round()).abs() < 1e-9 {
                    labels[i - 1].clone()
                } else {
                    String::new()
                }
            })
            .draw()
            .map_err(fail(name))?;
        c.draw_series(std::iter::once(PathElement::new(
            vec![(0.0, 0.0), (0.0, n as f64 + 1.0)],
            BLACK,
        )))
        .map_err(fail(name))?;
        for (b, block) in blocks.iter().enumerate() {
            let pts: Vec<(f64, f64)> = rows
                .iter()
                .enumerate()
                .filter_map(|(i, r)| {
                    r.1.get(b)
                        .copied()
                        .flatten()
                        .map(|x| (x.clamp(-max, max), i as f64 + 1.0))
                })
                .collect();
            let col = GREYS[b % GREYS.len()];
            let series: Vec<DynElement<'static, SVGBackend, (f64, f64)>> = pts
                .iter()
                .map(|&p| match b % 5 {
                    0 => Circle::new(p, 4, col.filled()).into_dyn(),
                    1 => TriangleMarker::new(p, 5, col.filled()).into_dyn(),
                    2 => Cross::new(p, 4, col.stroke_width(2)).into_dyn(),
                    3 => Circle::new(p, 4, col.stroke_width(1)).into_dyn(),
                    _ => Cross::new(p, 6, BLACK.stroke_width(1)).into_dyn(),
                })
                .collect();
            let k = b % 5;
            c.draw_series(series)
                .map_err(fail(name))?
                .label(block.clone())
                .legend(move |(x, y)| match k {
                    0 => Circle::new((x + 10, y), 4, col.filled()).into_dyn(),
                    1 => TriangleMarker::new((x + 10, y), 5, col.filled()).into_dyn(),
                    2 => Cross::new((x + 10, y), 4, col.stroke_width(2)).into_dyn(),
                    3 => Circle::new((x + 10, y), 4, col.stroke_width(1)).into_dyn(),
                    _ => Cross::new((x + 10, y), 6, BLACK.stroke_width(1)).into_dyn(),
                });
        }
        c.configure_series_labels()
            .border_style(BLACK)
            .background_style(WHITE)
            .label_font(("sans-serif", 12))
            .draw()
            .map_err(fail(name))?;
        root.present().map_err(fail(name))?;
    }
    Ok(s)
}

/// Age at death by sex: mean count per age class over the draws with its 95% band.
pub fn age_figure(age: &AgeBySex) -> Result<String, FigureError> {
    register_font();
    let name = "age_at_death";
    let k = age.classes.len();
    let ymax = age
        .classes
        .iter()
        .flat_map(|c| [c.female.2, c.male.2])
        .filter(|x| x.is_finite())
        .fold(1.0, f64::max)
        * 1.15;
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, (800, 420)).into_drawing_area();
        root.fill(&WHITE).map_err(fail(name))?;
        let labels: Vec<String> = age.classes.iter().map(|c| c.class.clone()).collect();
        let mut c = ChartBuilder::on(&root)
            .caption(
                "Age at death by sex (mean over joint draws, 95% band)",
                ("sans-serif", 16),
            )
            .margin(12)
            .x_label_area_size(40)
            .y_label_area_size(50)
            .build_cartesian_2d(0f64..k as f64, 0f64..ymax)
            .map_err(fail(name))?;
        c.configure_mesh()
            .light_line_style(TRANSPARENT)
            .bold_line_style(RGBColor(215, 215, 215))
            .disable_x_mesh()
            .x_labels(0)
            .x_desc("age at death (years)")
            .y_desc("individuals")
            .draw()
            .map_err(fail(name))?;
        for (sex, offset, fill, label) in [
            (0, 0.1, RGBColor(170, 170, 170), "female"),
            (1, 0.5, RGBColor(40, 40, 40), "male"),
        ] {
            let bars: Vec<Rectangle<(f64, f64)>> = age
                .classes
                .iter()
                .enumerate()
                .map(|(i, cl)| {
                    let v = if sex == 0 { cl.female.0 } else { cl.male.0 };
                    Rectangle::new(
                        [
                            (i as f64 + offset, 0.0),
                            (i as f64 + offset + 0.38, v.max(0.0)),
                        ],
                        fill.filled(),
                    )
                })
                .collect();
            c.draw_series(bars)
                .map_err(fail(name))?
                .label(label)
                .legend(move |(x, y)| Rectangle::new([(x, y - 5), (x + 14, y + 5)], fill.filled()));
            c.draw_series(age.classes.iter().enumerate().map(|(i, cl)| {
                let (_, lo, hi) = if sex == 0 { cl.female } else { cl.male };
                let x = i as f64 + offset + 0.19;
                PathElement::new(
                    vec![(x, lo.max(0.0)), (x, hi.max(0.0))],
                    BLACK.stroke_width(2),
                )
            }))
            .map_err(fail(name))?;
        }
        c.configure_series_labels()
            .border_style(BLACK)
            .background_style(WHITE)
            .label_font(("sans-serif", 12))
            .draw()
            .map_err(fail(name))?;
        // Class labels under each pair of bars, placed in pixels below the axis.
        let style =
            TextStyle::from(("sans-serif", 12).into_font()).pos(Pos::new(HPos::Center, VPos::Top));
        for (i, l) in labels.iter().enumerate() {
            let (px, py) = c.backend_coord(&(i as f64 + 0.5, 0.0));
            root.draw(&Text::new(l.clone(), (px, py + 6), style.clone()))
                .map_err(fail(name))?;
        }
        root.present().map_err(fail(name))?;
    }
    Ok(s)
}

/// Reliability of predicted probabilities: for each bin of P(female), the share of
/// documented females (dots, with 95% Wilson intervals as bars) against the mean predicted
/// P(female); the dashed diagonal is perfect calibration. `bins` holds
/// (mean predicted, observed share, n).
pub fn calibration_figure(bins: &[(f64, f64, usize)]) -> Result<String, FigureError> {
    register_font();
    let name = "calibration";
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, (520, 520)).into_drawing_area();
        root.fill(&WHITE).map_err(fail(name))?;
        let mut c = ChartBuilder::on(&root)
            .caption(
                "Predicted P(female) against the documented share female",
                ("sans-serif", 15),
            )
            .margin(14)
            .x_label_area_size(42)
            .y_label_area_size(50)
            .build_cartesian_2d(0f64..1f64, 0f64..1f64)
            .map_err(fail(name))?;
        c.configure_mesh()
            .light_line_style(TRANSPARENT)
            .bold_line_style(RGBColor(215, 215, 215))
            .x_desc("mean predicted P(female) in the bin")
            .y_desc("share of documented females")
            .x_label_formatter(&|v| tick(*v))
            .y_label_formatter(&|v| tick(*v))
            .draw()
            .map_err(fail(name))?;
        c.draw_series(DashedLineSeries::new(
            vec![(0.0, 0.0), (1.0, 1.0)],
            5,
            4,
            RGBColor(150, 150, 150).into(),
        ))
        .map_err(fail(name))?;
        let used: Vec<_> = bins.iter().filter(|b| b.2 > 0).collect();
        c.draw_series(used.iter().map(|&&(p, obs, n)| {
            let (lo, hi) = wilson(obs, n);
            PathElement::new(vec![(p, lo), (p, hi)], RGBColor(90, 90, 90))
        }))
        .map_err(fail(name))?;
        c.draw_series(
            used.iter()
                .map(|&&(p, obs, _)| Circle::new((p, obs), 4, BLACK.filled())),
        )
        .map_err(fail(name))?;
        root.present().map_err(fail(name))?;
    }
    Ok(s)
}

/// 95% Wilson score interval of an observed share of `n` (Wilson 1927); (0, 1) when n = 0.
fn wilson(share: f64, n: usize) -> (f64, f64) {
    use crate::numeric::proportion::{wilson_interval_of_share, Z95};
    wilson_interval_of_share(share, n, Z95).unwrap_or((0.0, 1.0))
}

#[cfg(test)]
#[path = "tests/figures.rs"]
mod tests;
