//! The publication outputs: report, tables, methods, by-sex tables, and figures that render.

mod common;
use common::{stderr, tessera};
use std::path::Path;

fn demo() -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples/mirefold.csv")
        .display()
        .to_string()
}

/// Parse and render an SVG with resvg; fails on an invalid file or a blank picture.
fn render(svg: &str, png: Option<&Path>) {
    let mut opt = resvg::usvg::Options::default();
    opt.fontdb_mut()
        .load_font_data(tessera::report::figures::FONT_BYTES.to_vec());
    opt.fontdb_mut().set_sans_serif_family("DejaVu Sans");
    let tree = resvg::usvg::Tree::from_str(svg, &opt).expect("a valid SVG");
    let size = tree.size().to_int_size();
    let mut pix =
        resvg::tiny_skia::Pixmap::new(size.width(), size.height()).expect("a non-empty picture");
    resvg::render(
        &tree,
        resvg::tiny_skia::Transform::default(),
        &mut pix.as_mut(),
    );
    let dark = pix
        .pixels()
        .iter()
        .filter(|p| p.red() < 128 && p.alpha() > 0)
        .count();
    assert!(
        dark > 500,
        "the figure is almost blank ({dark} dark pixels)"
    );
    if let Some(p) = png {
        pix.save_png(p).unwrap();
    }
}

#[test]
fn the_demo_writes_report_tables_methods_and_figures_that_render() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("r");
    let o = tessera(&[
        "analyse",
        &demo(),
        "--out",
        out.to_str().unwrap(),
        "--group-by",
        "phase",
        "--draws",
        "300",
        "--by-sex",
        "cribra_orbitalia",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    for f in [
        "report.md",
        "tables.tex",
        "methods.md",
        "by_sex_age.csv",
        "by_sex_prevalence.csv",
        "category_by_age.csv",
    ] {
        assert!(out.join(f).exists(), "{f}");
    }
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    for needle in [
        "not identifications",
        "SHA-256",
        "Reproduce with",
        "## Groups",
        "## Age at death by sex",
        "## Prevalence by sex",
        "MH-011",
    ] {
        assert!(report.contains(needle), "report lacks {needle}");
    }
    // The data dictionary describes every column of every table written.
    let columns = std::fs::read_to_string(out.join("columns.md")).unwrap();
    assert!(!columns.contains("(not described)"), "{columns}");
    for f in ["individuals.csv", "assemblage.csv", "by_sex_prevalence.csv"] {
        assert!(
            columns.contains(&format!("## {f}")),
            "{f} not in columns.md"
        );
    }
    assert!(columns.contains("| `zone` | a column of the input, carried through unchanged"));
    let methods = std::fs::read_to_string(out.join("methods.md")).unwrap();
    assert!(methods.contains("Konigsberg & Hens, 1998") && methods.contains("## References"));
    // Every reference is written out in full: authors, (year), a title, then the source.
    let refs: Vec<&str> = methods
        .lines()
        .skip_while(|l| !l.starts_with("## References"))
        .filter(|l| l.starts_with("- "))
        .collect();
    assert!(refs.len() >= 10, "{refs:?}");
    let body = methods.split("## References").next().unwrap();
    for r in refs {
        let title = r.split_once("). ").map(|(_, t)| t).unwrap_or("");
        assert!(title.split(". ").count() >= 2, "no title or source: {r}");
        // Cited in the text: the first author's surname, then the year close after it.
        let surname: String = r[2..]
            .chars()
            .take_while(|c| *c != ',' && *c != '.')
            .collect();
        // The year: the first "(" followed by four digits (1825, 1969, 2017 …).
        let at = r
            .match_indices('(')
            .map(|(i, _)| i + 1)
            .find(|&i| r.len() >= i + 4 && r[i..i + 4].bytes().all(|b| b.is_ascii_digit()))
            .unwrap_or_else(|| panic!("no year in {r}"));
        let year = &r[at..at + 4];
        let cited = body.match_indices(surname.as_str()).any(|(i, _)| {
            body[i..]
                .chars()
                .take(90)
                .collect::<String>()
                .contains(year)
        });
        assert!(cited, "listed but not cited in the text: {r}");
    }
    let tex = std::fs::read_to_string(out.join("tables.tex")).unwrap();
    assert_eq!(
        tex.matches("\\begin{tabular}").count(),
        tex.matches("\\end{tabular}").count()
    );
    let keep = std::env::var_os("TESSERA_KEEP_FIGURES").map(std::path::PathBuf::from);
    for f in ["p_female", "pi_posterior", "lr_by_region", "age_at_death"] {
        let svg = std::fs::read_to_string(out.join(format!("figures/{f}.svg"))).unwrap();
        assert!(svg.contains("<text"), "{f} has no text");
        render(
            &svg,
            keep.as_ref().map(|d| d.join(format!("{f}.png"))).as_deref(),
        );
    }
}

/// `analyse` on a table written from `text` into `dir`, comparing the sexes on `column` under
/// the flat prior alone; the output and the output folder.
fn analyse_by_sex(
    dir: &Path,
    text: &str,
    column: &str,
) -> (std::process::Output, std::path::PathBuf) {
    let input = dir.join("in.csv");
    std::fs::write(&input, text).unwrap();
    let out = dir.join("r");
    let o = tessera(&[
        "analyse",
        input.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--by-sex",
        column,
        "--priors",
        "flat",
    ]);
    (o, out)
}

#[test]
fn outcome_columns_must_be_zero_or_one_and_never_traits() {
    let dir = tempfile::tempdir().unwrap();
    let table = "id,glabella,lesion,age\nA,2,1,30\nB,5,maybe,40\nC,4,0,35\n";
    let (o, out) = analyse_by_sex(dir.path(), table, "lesion");
    assert_eq!(o.status.code(), Some(3));
    assert!(
        stderr(&o).contains("row 3, column `lesion`: found `maybe`"),
        "{}",
        stderr(&o)
    );
    assert!(!out.exists());
    let (o, _) = analyse_by_sex(dir.path(), table, "glabella");
    assert_eq!(o.status.code(), Some(4));
}

#[test]
fn a_numeric_outcome_with_a_text_cell_is_refused_with_its_row_and_column() {
    let dir = tempfile::tempdir().unwrap();
    let (o, out) = analyse_by_sex(
        dir.path(),
        "id,glabella,stature,age\nA,2,158.5,30\nB,5,tall,40\nC,4,171,35\nD,1,,30\n",
        "stature",
    );
    assert_eq!(o.status.code(), Some(3));
    let err = stderr(&o);
    assert!(
        err.contains("row 3, column `stature`: found `tall`"),
        "{err}"
    );
    assert!(err.contains("a number"), "{err}");
    assert!(!out.exists());
    // Mended, the column is a numeric outcome: its own table, described in columns.md.
    let (o, out) = analyse_by_sex(
        dir.path(),
        "id,glabella,stature,age\nA,2,158.5,30\nB,5,176,40\nC,4,171,35\nD,1,,30\n",
        "stature",
    );
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let table = std::fs::read_to_string(out.join("by_sex_numeric.csv")).unwrap();
    assert!(
        table.starts_with(
            "outcome,n_recorded,n_left_out,n_female,n_male,quantity,estimate,lo,hi\nstature,3,0,"
        ),
        "{table}"
    );
    assert!(!out.join("by_sex_prevalence.csv").exists());
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    assert!(report.contains("## Measurements and scores by sex"));
}

#[test]
fn the_validation_report_of_the_demo_reference_renders() {
    let dir = tempfile::tempdir().unwrap();
    let root = env!("CARGO_MANIFEST_DIR");
    let out = dir.path().join("v");
    let o = tessera(&[
        "validate",
        &format!("{root}/examples/saltmarsh-reference.csv"),
        "--traits",
        &format!("{root}/examples/saltmarsh-spec.yaml"),
        "--folds",
        "5",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let svg = std::fs::read_to_string(out.join("calibration.svg")).unwrap();
    let png = std::env::var_os("TESSERA_FIGURES").map(|d| Path::new(&d).join("calibration.png"));
    render(&svg, png.as_deref());
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    assert!(report.contains("5-fold cross-validation"));
    assert!(report.contains("Biological sex is not gender"));
}

/// What a journal's copy editor checks first, on the demo's outputs: no negative zeros, ranges
/// in words ("−0.157 to 0.375", never "-0.157--0.375" or "0.2–0.4"), counts as whole numbers.
#[test]
fn the_demo_outputs_read_as_a_journal_expects() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let demo = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/mirefold.csv");
    let o = common::tessera(&[
        "analyse",
        demo.to_str().unwrap(),
        "--group-by",
        "phase",
        "--by-sex",
        "cribra_orbitalia",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", common::stderr(&o));
    let between_digits = |text: &str, sep: &str| {
        text.match_indices(sep).any(|(i, _)| {
            let before = text[..i].chars().next_back();
            let after = text[i + sep.len()..].chars().next();
            matches!((before, after), (Some(b), Some(a)) if b.is_ascii_digit() && a.is_ascii_digit())
        })
    };
    for name in ["report.md", "methods.md", "tables.tex"] {
        let whole = std::fs::read_to_string(out.join(name)).unwrap();
        // Page ranges of the references keep their en dash, as reference styles set them.
        let text = whole.split("## References").next().unwrap();
        assert!(!text.contains("-0.000"), "{name}: a negative zero");
        assert!(!between_digits(text, "–"), "{name}: a range with a dash");
        assert!(!between_digits(text, "--"), "{name}: a range with --");
    }
    for entry in std::fs::read_dir(&out).unwrap() {
        let p = entry.unwrap().path();
        if p.extension().is_some_and(|e| e == "csv") {
            let text = std::fs::read_to_string(&p).unwrap();
            let negative_zero = text.lines().flat_map(|l| l.split(',')).any(|c| {
                c.strip_prefix('-')
                    .is_some_and(|r| !r.is_empty() && r.chars().all(|x| x == '0' || x == '.'))
            });
            assert!(!negative_zero, "{}: a negative zero", p.display());
            // A CSV number has an ASCII minus, which every CSV reader parses as a number.
            assert!(
                !text.contains('\u{2212}'),
                "{}: a typographic minus",
                p.display()
            );
        }
    }
    // Every SVG figure has a PNG beside it (journals and word processors take raster
    // images), at 2.5 pixels per unit, and report.md shows them.
    let report_text = std::fs::read_to_string(out.join("report.md")).unwrap();
    for entry in std::fs::read_dir(out.join("figures")).unwrap() {
        let p = entry.unwrap().path();
        if p.extension().is_some_and(|e| e == "svg") {
            let png = std::fs::read(p.with_extension("png")).unwrap();
            assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n", "{}", p.display());
            let width = u32::from_be_bytes([png[16], png[17], png[18], png[19]]);
            assert_eq!(width, 2000, "{}", p.display());
            let name = p
                .file_name()
                .unwrap()
                .to_str()
                .unwrap()
                .replace(".svg", ".png");
            assert!(
                report_text.contains(&format!("](figures/{name})")),
                "{name} not shown"
            );
        }
    }
    // The age table's intervals are counts of individuals: whole numbers.
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    let rows: Vec<&str> = report
        .lines()
        .skip_while(|l| !l.starts_with("| age class |"))
        .skip(2)
        .take_while(|l| l.starts_with('|'))
        .collect();
    assert!(!rows.is_empty());
    for row in rows {
        for cell in row.split('|').skip(2).filter(|c| !c.trim().is_empty()) {
            let inner = cell.split('(').nth(1).unwrap().trim_end_matches([')', ' ']);
            for end in inner.split(" to ") {
                assert!(
                    end.trim().parse::<u64>().is_ok(),
                    "{row}: `{end}` is not a count"
                );
            }
        }
    }
}
