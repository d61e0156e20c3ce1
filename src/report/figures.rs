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

/// A tick label without spurious decimals and with a real minus sign: 0.25, 0.5, 2, 10, −3
/// (never 2.0, 10.0 or -3).
fn tick(v: f64) -> String {
    super::number::short(v, 2)
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

/// A marker's shape (the regions of the LR figure are told apart by shape and grey).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shape {
    /// Filled circle.
    Dot,
    /// Filled triangle.
    Triangle,
    /// Small cross.
    Cross,
    /// Open circle.
    Ring,
    /// Large thin cross.
    BigCross,
}

/// How one series looks. The series and its legend sample are both drawn from this one value,
/// so a legend cannot show another style than its curve, bars or markers.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Look {
    /// A line: grey, width, and dash and gap lengths (`None`: solid).
    Line(RGBColor, u32, Option<(u32, u32)>),
    /// A marker.
    Marker(RGBColor, Shape),
    /// A filled bar.
    Bar(RGBColor),
}

/// A marker of `shape` at `p`, in any coordinate system.
fn marker<'b, C: Clone + 'static>(
    grey: RGBColor,
    shape: Shape,
    p: C,
) -> DynElement<'static, SVGBackend<'b>, C> {
    match shape {
        Shape::Dot => Circle::new(p, 4, grey.filled()).into_dyn(),
        Shape::Triangle => TriangleMarker::new(p, 5, grey.filled()).into_dyn(),
        Shape::Cross => Cross::new(p, 4, grey.stroke_width(2)).into_dyn(),
        Shape::Ring => Circle::new(p, 4, grey.stroke_width(1)).into_dyn(),
        Shape::BigCross => Cross::new(p, 6, grey.stroke_width(1)).into_dyn(),
    }
}

/// Width of the legend panel beside a chart, in SVG units.
const LEGEND_WIDTH: u32 = 160;

/// The legend in its own panel beside the chart (never over the data): one row per series,
/// its sample drawn from the series' own [`Look`], then its label.
fn draw_legend(
    area: &DrawingArea<SVGBackend<'_>, plotters::coord::Shift>,
    entries: &[(String, Look)],
    name: &str,
) -> Result<(), FigureError> {
    let font = ("sans-serif", 12).into_font();
    let text = TextStyle::from(font).pos(Pos::new(HPos::Left, VPos::Center));
    for (i, (label, look)) in entries.iter().enumerate() {
        let y = 56 + 20 * i as i32;
        match *look {
            Look::Line(grey, width, None) => area.draw(&PathElement::new(
                vec![(6, y), (34, y)],
                grey.stroke_width(width),
            )),
            Look::Line(grey, width, Some((dash, gap))) => {
                area.draw(&plotters::element::DashedPathElement::new(
                    vec![(6, y), (34, y)],
                    dash,
                    gap,
                    grey.stroke_width(width),
                ))
            }
            Look::Marker(grey, shape) => area.draw(&marker(grey, shape, (20, y))),
            Look::Bar(grey) => {
                area.draw(&Rectangle::new([(12, y - 6), (28, y + 6)], grey.filled()))
            }
        }
        .map_err(fail(name))?;
        area.draw(&Text::new(label.clone(), (42, y), text.clone()))
            .map_err(fail(name))?;
    }
    Ok(())
}

/// The look of the k-th curve of the π figure: black, dark and light grey, each solid,
/// dashed and dotted; the first three thicker.
pub fn curve_look(k: usize) -> Look {
    let grey = GREYS[k % GREYS.len()];
    let dash = match k % 3 {
        0 => None,
        1 => Some((6, 4)),
        _ => Some((2, 3)),
    };
    Look::Line(grey, if k < 3 { 2 } else { 1 }, dash)
}

/// The look of the b-th block of the LR figure.
pub fn region_look(b: usize) -> Look {
    let shapes = [
        Shape::Dot,
        Shape::Triangle,
        Shape::Cross,
        Shape::Ring,
        Shape::BigCross,
    ];
    let grey = if b % 5 == 4 {
        BLACK
    } else {
        GREYS[b % GREYS.len()]
    };
    Look::Marker(grey, shapes[b % 5])
}

/// Most points (or rows) a figure draws: beyond it every k-th of the sorted individuals is
/// drawn (and the axis says so), so that a regional table of a million individuals still gives
/// a figure that renders (usvg refuses documents of millions of elements). 2000 is a choice of
/// ours: more points than the 640 units of the plot's width can show apart.
pub const MAX_FIGURE_POINTS: usize = 2000;

/// The positions drawn of `n` sorted items: all of them up to [`MAX_FIGURE_POINTS`], else
/// every k-th from the first, and the last; with k.
fn thinned(n: usize) -> (Vec<usize>, usize) {
    if n <= MAX_FIGURE_POINTS {
        return ((0..n).collect(), 1);
    }
    let k = n.div_ceil(MAX_FIGURE_POINTS);
    let mut v: Vec<usize> = (0..n).step_by(k).collect();
    if v.last() != Some(&(n - 1)) {
        v.push(n - 1);
    }
    (v, k)
}

/// Each individual's P(female) under the chosen prior (dots) with its range across the
/// sensitivity set (bars), sorted; dashed lines at the category thresholds.
pub fn p_female_figure(
    points: Vec<(f64, f64, f64)>,
    thresholds: [f64; 4],
) -> Result<String, FigureError> {
    register_font();
    let name = "p_female";
    let mut v = points;
    v.sort_by(|a, b| a.0.total_cmp(&b.0));
    let n = v.len().max(1);
    let (shown, every) = thinned(v.len());
    let x_desc = if every == 1 {
        "individuals with usable evidence, sorted by P(female)".to_string()
    } else {
        format!(
            "individuals with usable evidence, sorted by P(female) (every {every}th of {} drawn)",
            v.len()
        )
    };
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
            .x_desc(x_desc.as_str())
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
        c.draw_series(shown.iter().map(|&i| {
            let (_, lo, hi) = v[i];
            PathElement::new(
                vec![(i as f64 + 1.0, lo), (i as f64 + 1.0, hi)],
                RGBColor(120, 120, 120),
            )
        }))
        .map_err(fail(name))?;
        c.draw_series(
            shown
                .iter()
                .map(|&i| Circle::new((i as f64 + 1.0, v[i].0), 3, BLACK.filled())),
        )
        .map_err(fail(name))?;
        root.present().map_err(fail(name))?;
    }
    Ok(s)
}

/// The posterior density of π under each prior (one line style each, [`curve_look`]).
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
        let (chart, legend) = root.split_horizontally(800 - LEGEND_WIDTH);
        let mut c = ChartBuilder::on(&chart)
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
        let mut entries = Vec::new();
        for (k, (label, pts)) in curves.iter().enumerate() {
            let look = curve_look(k);
            let Look::Line(grey, width, dash) = look else {
                continue;
            };
            let style = ShapeStyle::from(grey).stroke_width(width);
            match dash {
                None => c.draw_series(LineSeries::new(pts.clone(), style)),
                Some((d, g)) => c.draw_series(DashedLineSeries::new(pts.clone(), d, g, style)),
            }
            .map_err(fail(name))?;
            entries.push((label.clone(), look));
        }
        draw_legend(&legend, &entries, name)?;
        root.present().map_err(fail(name))?;
    }
    Ok(s)
}

/// Height of one individual's row on the LR figure: room for one line of 11-unit text.
const LR_ROW_HEIGHT: usize = 14;
/// Height of the LR figure's caption, axis and margins.
const LR_FRAME_HEIGHT: usize = 120;
/// Tallest LR figure (a choice of ours: about five printed pages at its width).
const LR_MAX_HEIGHT: usize = 4000;

/// Most individuals the LR figure labels: up to this many every row fits at
/// [`LR_ROW_HEIGHT`] within [`LR_MAX_HEIGHT`] and every individual is named; beyond it none is
/// (the order is that of the total LR, as individuals.csv gives it).
pub const LR_FIGURE_MAX_LABELLED: usize = (LR_MAX_HEIGHT - LR_FRAME_HEIGHT) / LR_ROW_HEIGHT;

/// One row of the LR figure: the individual's name and each block's log10 LR (`None` where
/// the block was not used).
pub type LrRow = (String, Vec<Option<f64>>);

/// log10 LR of each body region for each individual (one marker per region, [`region_look`]):
/// every individual named on the left when there are at most [`LR_FIGURE_MAX_LABELLED`], none
/// otherwise. `n_rows` individuals in the order of their total LR; `row(i)` gives the i-th's
/// name and per-block log10 LR, asked for only of the rows drawn (a regional run's million
/// rows are never built).
pub fn lr_by_region_figure(
    blocks: &[String],
    n_rows: usize,
    row: &dyn Fn(usize) -> LrRow,
) -> Result<String, FigureError> {
    register_font();
    let name = "lr_by_region";
    let n = n_rows.max(1);
    let label_all = n_rows <= LR_FIGURE_MAX_LABELLED;
    let (shown, every) = thinned(n_rows);
    let rows: Vec<LrRow> = shown.iter().map(|&i| row(i)).collect();
    let y_desc = match (label_all, every) {
        (true, _) => "individual (by total likelihood ratio)".to_string(),
        (false, 1) => {
            "individuals, by total likelihood ratio (too many to name: see individuals.csv)"
                .to_string()
        }
        (false, k) => format!(
            "individuals, by total likelihood ratio (every {k}th of {n_rows} drawn; see individuals.csv)"
        ),
    };
    let height = (LR_FRAME_HEIGHT + LR_ROW_HEIGHT * n).clamp(300, LR_MAX_HEIGHT) as u32;
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
        let (chart, legend) = root.split_horizontally(800 - LEGEND_WIDTH);
        let mut c = ChartBuilder::on(&chart)
            .caption(
                "Evidence per body region (log10 likelihood ratio female:male)",
                ("sans-serif", 15),
            )
            .margin(12)
            .x_label_area_size(40)
            .y_label_area_size(if label_all { 90 } else { 30 })
            .build_cartesian_2d(-max..max, 0i32..(n as i32 + 1))
            .map_err(fail(name))?;
        c.configure_mesh()
            .light_line_style(TRANSPARENT)
            .bold_line_style(RGBColor(215, 215, 215))
            .disable_y_mesh()
            .x_desc("log10 LR (positive: female, negative: male; beyond ±10 at the edge)")
            .y_desc(y_desc.as_str())
            .x_label_formatter(&|v| tick(*v))
            // At least one key point: plotters' integer axis loops without end on zero.
            .y_labels(if label_all { n + 2 } else { 1 })
            .y_label_style(("sans-serif", 11))
            .y_label_formatter(&|&y| {
                usize::try_from(y)
                    .ok()
                    .filter(|&i| label_all && i >= 1)
                    // Every row is drawn when all are named: row i − 1 is the (i − 1)-th.
                    .and_then(|i| rows.get(i - 1).map(|r| r.0.clone()))
                    .unwrap_or_default()
            })
            .draw()
            .map_err(fail(name))?;
        c.draw_series(std::iter::once(PathElement::new(
            vec![(0.0, 0), (0.0, n as i32 + 1)],
            BLACK,
        )))
        .map_err(fail(name))?;
        let mut entries = Vec::new();
        for (b, block) in blocks.iter().enumerate() {
            let look = region_look(b);
            let Look::Marker(grey, shape) = look else {
                continue;
            };
            let series: Vec<DynElement<'static, SVGBackend, (f64, i32)>> = shown
                .iter()
                .zip(&rows)
                .map(|(&i, r)| (i, r))
                .filter_map(|(i, r)| {
                    r.1.get(b)
                        .copied()
                        .flatten()
                        .map(|x| marker(grey, shape, (x.clamp(-max, max), i as i32 + 1)))
                })
                .collect();
            c.draw_series(series).map_err(fail(name))?;
            entries.push((block.clone(), look));
        }
        draw_legend(&legend, &entries, name)?;
        root.present().map_err(fail(name))?;
    }
    Ok(s)
}

/// Age at death by sex: mean count per age class over the draws with its 95% band.
pub fn age_figure(age: &AgeBySex) -> Result<String, FigureError> {
    register_font();
    let name = "age_at_death";
    // As in the tables: a class nobody sexed falls in (subadults are left out of analyses by
    // sex) is not drawn as an empty pair of bars.
    let classes: Vec<&crate::summary::AgeClassRow> = age
        .classes
        .iter()
        .filter(|c| !(c.female.2 == 0.0 && c.male.2 == 0.0))
        .collect();
    let k = classes.len().max(1);
    let ymax = classes
        .iter()
        .flat_map(|c| [c.female.2, c.male.2])
        .filter(|x| x.is_finite())
        .fold(1.0, f64::max)
        * 1.15;
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, (800, 420)).into_drawing_area();
        root.fill(&WHITE).map_err(fail(name))?;
        let (chart, legend) = root.split_horizontally(800 - LEGEND_WIDTH);
        let labels: Vec<String> = classes.iter().map(|c| c.class.clone()).collect();
        let mut c = ChartBuilder::on(&chart)
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
            .y_label_formatter(&|v| tick(*v))
            .draw()
            .map_err(fail(name))?;
        let mut entries = Vec::new();
        for (sex, offset, fill, label) in [
            (0, 0.1, RGBColor(170, 170, 170), "female"),
            (1, 0.5, RGBColor(40, 40, 40), "male"),
        ] {
            entries.push((label.to_string(), Look::Bar(fill)));
            let bars: Vec<Rectangle<(f64, f64)>> = classes
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
            c.draw_series(bars).map_err(fail(name))?;
            c.draw_series(classes.iter().enumerate().map(|(i, cl)| {
                let (_, lo, hi) = if sex == 0 { cl.female } else { cl.male };
                let x = i as f64 + offset + 0.19;
                PathElement::new(
                    vec![(x, lo.max(0.0)), (x, hi.max(0.0))],
                    BLACK.stroke_width(2),
                )
            }))
            .map_err(fail(name))?;
        }
        draw_legend(&legend, &entries, name)?;
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

/// One sex's curve: (x, estimate, lo, hi) per point.
pub type SexCurve = Vec<(f64, f64, f64, f64)>;

/// Two curves by sex on one chart: each sex's estimate as a line with markers (females grey
/// and solid with dots, males black and dashed with triangles) and its 95% interval as thin
/// dotted lines of the same grey; the legend beside the chart.
fn sex_curves_figure(
    name: &str,
    caption: &str,
    (x_desc, y_desc): (&str, &str),
    (x_range, y_range): (std::ops::Range<f64>, std::ops::Range<f64>),
    (y_tick, y_labels): (&dyn Fn(&f64) -> String, usize),
    curves: [&SexCurve; 2],
) -> Result<String, FigureError> {
    register_font();
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, (800, 420)).into_drawing_area();
        root.fill(&WHITE).map_err(fail(name))?;
        let (chart, legend) = root.split_horizontally(800 - LEGEND_WIDTH);
        let mut c = ChartBuilder::on(&chart)
            .caption(caption, ("sans-serif", 16))
            .margin(12)
            .x_label_area_size(40)
            .y_label_area_size(64)
            .build_cartesian_2d(x_range, y_range)
            .map_err(fail(name))?;
        c.configure_mesh()
            .light_line_style(TRANSPARENT)
            .bold_line_style(RGBColor(215, 215, 215))
            .x_desc(x_desc)
            .y_desc(y_desc)
            .x_label_formatter(&|v| tick(*v))
            .y_labels(y_labels)
            .y_label_formatter(y_tick)
            .draw()
            .map_err(fail(name))?;
        let mut entries = Vec::new();
        for (curve, label, look, shape) in [
            (
                curves[0],
                "female",
                Look::Line(RGBColor(120, 120, 120), 2, None),
                Shape::Dot,
            ),
            (
                curves[1],
                "male",
                Look::Line(BLACK, 2, Some((6, 4))),
                Shape::Triangle,
            ),
        ] {
            let Look::Line(grey, width, dash) = look else {
                continue;
            };
            let at = |k: usize| -> Vec<(f64, f64)> {
                curve
                    .iter()
                    .map(|p| (p.0, [p.1, p.2, p.3][k]))
                    .filter(|p| p.1.is_finite())
                    .collect()
            };
            let line = at(0);
            match dash {
                None => c
                    .draw_series(std::iter::once(PathElement::new(
                        line.clone(),
                        grey.stroke_width(width),
                    )))
                    .map(|_| ()),
                Some((d, g)) => c
                    .draw_series(std::iter::once(plotters::element::DashedPathElement::new(
                        line.clone(),
                        d,
                        g,
                        grey.stroke_width(width),
                    )))
                    .map(|_| ()),
            }
            .map_err(fail(name))?;
            // Markers at most every few points, so that a dense curve stays a line.
            let every = line.len().div_ceil(12).max(1);
            c.draw_series(line.iter().step_by(every).map(|&p| marker(grey, shape, p)))
                .map_err(fail(name))?;
            let band = Look::Line(grey, 1, Some((2, 3)));
            for bound in [at(1), at(2)] {
                c.draw_series(std::iter::once(plotters::element::DashedPathElement::new(
                    bound,
                    2,
                    3,
                    grey.stroke_width(1),
                )))
                .map_err(fail(name))?;
            }
            entries.push((label.to_string(), look));
            entries.push((format!("{label}, 95%"), band));
        }
        draw_legend(&legend, &entries, name)?;
        root.present().map_err(fail(name))?;
    }
    Ok(s)
}

/// Survivorship by sex: lx (per cent entering each class) at the start of every age class,
/// and 0 where the open last class is closed; the population's 95% interval dotted.
///
/// # Errors
/// [`FigureError`] when plotting fails.
pub fn survivorship_figure(lt: &crate::summary::LifeTables) -> Result<String, FigureError> {
    let x_start = lt.classes.0.first().map_or(0.0, |c| c.from);
    let curve = |table: &[crate::summary::life_table::LifeTableClass]| -> SexCurve {
        table
            .iter()
            .map(|r| {
                (
                    r.class.from,
                    r.lx.estimate,
                    r.lx.population_lo,
                    r.lx.population_hi,
                )
            })
            .chain(std::iter::once((lt.open_end, 0.0, 0.0, 0.0)))
            .collect()
    };
    sex_curves_figure(
        "survivorship",
        "Survivorship by sex (lx; mean over joint draws, population 95% interval)",
        ("age (years)", "survivors entering the class (per cent)"),
        (x_start..lt.open_end, 0.0..105.0),
        (&|v| tick(*v), 11),
        [&curve(&lt.female), &curve(&lt.male)],
    )
}

/// The Gompertz hazard by sex from the adult start to 80 (median over the draws, 95% interval
/// dotted), on a log scale: a Gompertz hazard is a straight line there.
///
/// # Errors
/// [`FigureError`] when plotting fails.
pub fn hazard_figure(h: &crate::summary::HazardsBySex) -> Result<String, FigureError> {
    let curve = |female: bool| -> SexCurve {
        h.curve
            .iter()
            .map(|(x, f, m)| {
                let v = if female { f } else { m };
                (*x, v.0.log10(), v.1.log10(), v.2.log10())
            })
            .collect()
    };
    let (cf, cm) = (curve(true), curve(false));
    let ys = cf
        .iter()
        .chain(&cm)
        .flat_map(|p| [p.1, p.2, p.3])
        .filter(|y| y.is_finite());
    let (lo, hi) = ys.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), y| {
        (a.min(y), b.max(y))
    });
    let (lo, hi) = if lo < hi {
        (lo.floor(), hi.ceil())
    } else {
        (-3.0, 0.0)
    };
    let x_end = h.curve.last().map_or(80.0, |c| c.0);
    sex_curves_figure(
        "hazard",
        "Mortality by sex (Gompertz hazard; median over joint draws, 95% interval)",
        ("age (years)", "deaths per person-year (log scale)"),
        (h.start..x_end, lo..hi),
        // One label per power of ten.
        (
            &|v| crate::report::number::short(10f64.powf(*v), 4),
            (hi - lo) as usize + 1,
        ),
        [&cf, &cm],
    )
}

/// The sex ratio (males per 100 females) of the assemblage and of each group: the posterior
/// median as a dot, the 95% interval as a bar, and the reference ratio as a dashed line, on a
/// log scale (a ratio of 50 is as far below 100 as 200 is above).
///
/// # Errors
/// [`FigureError`] when plotting fails.
pub fn sex_ratio_figure(tests: &[crate::summary::SexRatioTest]) -> Result<String, FigureError> {
    register_font();
    let name = "sex_ratio";
    let reference = tests.first().map_or(105.0, |t| t.reference);
    let values = tests
        .iter()
        .flat_map(|t| [t.lo, t.hi, t.median])
        .chain(std::iter::once(reference))
        .filter(|v| v.is_finite() && *v > 0.0)
        .map(f64::log10);
    let (lo, hi) = values.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
        (a.min(v), b.max(v))
    });
    let (lo, hi) = if lo < hi {
        (lo - 0.1, hi + 0.1)
    } else {
        (1.0, 3.0)
    };
    let k = tests.len().max(1);
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, (800, 420)).into_drawing_area();
        root.fill(&WHITE).map_err(fail(name))?;
        let (chart, legend) = root.split_horizontally(800 - LEGEND_WIDTH);
        let mut c = ChartBuilder::on(&chart)
            .caption(
                "Sex ratio by group (posterior median, 95% interval) against the reference",
                ("sans-serif", 16),
            )
            .margin(12)
            .x_label_area_size(40)
            .y_label_area_size(64)
            .build_cartesian_2d(0f64..k as f64, lo..hi)
            .map_err(fail(name))?;
        c.configure_mesh()
            .light_line_style(TRANSPARENT)
            .bold_line_style(RGBColor(215, 215, 215))
            .disable_x_mesh()
            .disable_y_mesh()
            .x_labels(0)
            .y_labels(0)
            .y_desc("males per 100 females (log scale)")
            .draw()
            .map_err(fail(name))?;
        // Grid lines and labels at 1, 2 and 5 times the powers of ten within the range.
        let ticks: Vec<f64> = (-1..5)
            .flat_map(|e| [1.0, 2.0, 5.0].map(|m| m * 10f64.powi(e)))
            .filter(|v| (lo..=hi).contains(&v.log10()))
            .collect();
        let label_style = TextStyle::from(("sans-serif", 12).into_font())
            .pos(Pos::new(HPos::Right, VPos::Center));
        for v in &ticks {
            c.draw_series(std::iter::once(PathElement::new(
                vec![(0.0, v.log10()), (k as f64, v.log10())],
                RGBColor(215, 215, 215).stroke_width(1),
            )))
            .map_err(fail(name))?;
            let (px, py) = c.backend_coord(&(0.0, v.log10()));
            root.draw(&Text::new(
                crate::report::number::short(*v, 1),
                (px - 6, py),
                label_style.clone(),
            ))
            .map_err(fail(name))?;
        }
        let reference_look = Look::Line(RGBColor(90, 90, 90), 1, Some((6, 4)));
        c.draw_series(std::iter::once(plotters::element::DashedPathElement::new(
            vec![(0.0, reference.log10()), (k as f64, reference.log10())],
            6,
            4,
            RGBColor(90, 90, 90).stroke_width(1),
        )))
        .map_err(fail(name))?;
        let dot = Look::Marker(BLACK, Shape::Dot);
        for (i, t) in tests.iter().enumerate() {
            let x = i as f64 + 0.5;
            if t.lo > 0.0 && t.hi.is_finite() {
                c.draw_series(std::iter::once(PathElement::new(
                    vec![(x, t.lo.log10()), (x, t.hi.log10())],
                    BLACK.stroke_width(2),
                )))
                .map_err(fail(name))?;
            }
            if t.median > 0.0 && t.median.is_finite() {
                c.draw_series(std::iter::once(marker(
                    BLACK,
                    Shape::Dot,
                    (x, t.median.log10()),
                )))
                .map_err(fail(name))?;
            }
        }
        draw_legend(
            &legend,
            &[
                ("median".to_string(), dot),
                (
                    format!("reference {}", crate::report::number::short(reference, 1)),
                    reference_look,
                ),
            ],
            name,
        )?;
        let style =
            TextStyle::from(("sans-serif", 12).into_font()).pos(Pos::new(HPos::Center, VPos::Top));
        for (i, t) in tests.iter().enumerate() {
            let (px, py) = c.backend_coord(&(i as f64 + 0.5, lo));
            let label = t.group.clone().unwrap_or_else(|| "all".into());
            root.draw(&Text::new(label, (px, py + 6), style.clone()))
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
