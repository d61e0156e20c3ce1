//! The files of `tessera case`: `case.md` and a printable `case.html` of one individual, from
//! one [`CaseReport`] (so the two say the same), and `case.json` with every number.
//!
//! Layout: the case details (number, analyst, reviewer — blanks to fill by hand when not
//! given), the cautions in full, the result (the likelihood ratio in all and its words), the
//! regions (one table: region, log10 LR, words, what entered), the traits (side, score, the
//! trait's own LR), what was not recorded, P(female) under the priors asked for, the model and
//! its error rates, assumptions and limitations, the verbal scale with its source.

use super::RenderError;
use crate::case::CaseReport;
use crate::output::OutputSet;
use std::fmt::Write as _;

/// Error rates of the model, quoted from a `tessera validate` run (its `scores.csv`).
#[derive(Debug, Clone, PartialEq)]
pub struct QuotedRates {
    /// The scores file as named and its SHA-256.
    pub file: String,
    /// SHA-256 of the file.
    pub sha256: String,
    /// Individuals scored.
    pub n: String,
    /// Share correct at P(female) = ½, with its Wilson interval.
    pub accuracy: (String, String, String),
    /// Share left indeterminate.
    pub share_indeterminate: String,
}

impl QuotedRates {
    /// The `all` row of a `tessera validate` `scores.csv`.
    ///
    /// # Errors
    /// What is missing, in words (not a scores file, no `all` row, a column absent).
    pub fn from_scores_csv(file: &str, bytes: &[u8]) -> Result<QuotedRates, String> {
        let mut r = csv::Reader::from_reader(bytes);
        let head = r
            .headers()
            .map_err(|e| format!("{file}: not a CSV file ({e})"))?
            .clone();
        let col = |name: &str| {
            head.iter().position(|h| h == name).ok_or_else(|| {
                format!("{file}: no column `{name}`; expected the scores.csv written by tessera validate")
            })
        };
        let (n, acc, lo, hi, ind) = (
            col("n")?,
            col("accuracy")?,
            col("accuracy_lo")?,
            col("accuracy_hi")?,
            col("share_indeterminate")?,
        );
        for rec in r.records() {
            let rec = rec.map_err(|e| format!("{file}: {e}"))?;
            if rec.get(0) == Some("all") {
                let pct = |k: usize| -> Result<String, String> {
                    let v: f64 = rec[k]
                        .parse()
                        .map_err(|_| format!("{file}: `{}` is not a share from 0 to 1", &rec[k]))?;
                    Ok(format!("{:.1}%", 100.0 * v))
                };
                return Ok(QuotedRates {
                    file: file.into(),
                    sha256: crate::data::sha256_hex(bytes),
                    n: rec[n].to_string(),
                    accuracy: (pct(acc)?, pct(lo)?, pct(hi)?),
                    share_indeterminate: pct(ind)?,
                });
            }
        }
        Err(format!(
            "{file}: no row `all`; expected the scores.csv written by tessera validate"
        ))
    }
}

/// The cautions, in full, as every case report prints them.
pub const CASE_CAUTIONS: [&str; 5] = [
    "This is an estimate of biological sex from skeletal (and, where recorded, genetic) evidence. It is not an identification. A sex estimate narrows a search; it never excludes a missing person by itself.",
    "Skeletal or chromosomal sex may not match how a person lived or was known: gender-diverse and intersex persons exist, and biological sex is not gender.",
    "The likelihood ratios hold only as far as the model's reference population resembles the population the individual came from, and as far as the scores were recorded as the method prescribes.",
    "Local standards, the laboratory's procedures and the jurisdiction's rules override the defaults of this program. Forensic casework needs validated methods and accredited practice; this report is one input to an expert's judgement, to be reviewed by a second qualified person.",
    "Traits not recorded are left out of the computation (they are not evidence either way); if they are missing for a reason related to sex, the likelihood ratio may mislead.",
];

/// The verbal scale for likelihood ratios (ENFSI 2015; cut-points quoted from memory).
const SCALE: [(&str, &str); 7] = [
    ("1 to 2", "no support for either sex"),
    ("2 to 10", "weak support"),
    ("10 to 100", "moderate support"),
    ("100 to 1 000", "moderately strong support"),
    ("1 000 to 10 000", "strong support"),
    ("10 000 to 1 000 000", "very strong support"),
    ("above 1 000 000", "extremely strong support"),
];

/// A likelihood ratio for reading: "about 36 to 1 for male" from log10 LR.
pub fn ratio_words(log10_lr: f64) -> String {
    let m = log10_lr.abs();
    let side = if log10_lr >= 0.0 { "female" } else { "male" };
    let r = 10f64.powf(m);
    let n = if m >= 6.0 {
        format!("10^{m:.1}")
    } else if r >= 100.0 {
        format!("{:.0}", r)
    } else {
        format!("{:.1}", r)
    };
    if m < 1e-9 {
        "1 (no evidence either way)".into()
    } else {
        format!("{n} to 1 for {side}")
    }
}

/// A signed number with a real minus sign, for reading.
fn signed(x: f64, decimals: usize) -> String {
    super::number::reading(x, decimals)
}

fn blank(x: &Option<String>) -> String {
    x.clone().unwrap_or_else(|| "________________".into())
}

/// The report as Markdown.
pub fn case_markdown(c: &CaseReport, rates: Option<&QuotedRates>, command: &str) -> String {
    let mut m = String::new();
    let _ = writeln!(m, "# Sex estimate of one individual: {}\n", c.id);
    let _ = writeln!(m, "| | |\n|---|---|");
    let _ = writeln!(m, "| Case number | {} |", blank(&c.details.case_number));
    let _ = writeln!(m, "| Analyst | {} |", blank(&c.details.analyst));
    let _ = writeln!(m, "| Reviewer | {} |", blank(&c.details.reviewer));
    let _ = writeln!(
        m,
        "| Individual | `{}` (row {} of `{}`) |",
        c.id, c.row, c.file
    );
    let _ = writeln!(m, "| Input SHA-256 | `{}` |", c.file_sha256);
    let _ = writeln!(
        m,
        "| Recorded age | {} |",
        c.age.clone().unwrap_or_else(|| "not recorded".into())
    );
    let _ = writeln!(m, "| Program | tessera {} |", crate::VERSION);
    let _ = writeln!(m, "| Command | `{command}` |\n");
    let _ = writeln!(m, "## Cautions\n");
    for line in CASE_CAUTIONS {
        let _ = writeln!(m, "- {line}");
    }
    let _ = writeln!(m, "\n## Result\n");
    if c.estimable {
        let _ = writeln!(
            m,
            "Likelihood ratio female:male over all recorded evidence: **{}** (log10 {}), **{}** on the verbal scale below.\n",
            ratio_words(c.log10_lr),
            signed(c.log10_lr, 2),
            c.support
        );
        let _ = writeln!(m, "The likelihood ratio says how much more probable the recorded evidence is if the individual is female than if male; it does not depend on any assumption about the proportion of females. A probability of being female needs such an assumption (a prior), and is given below only where one was named.\n");
    } else {
        let _ = writeln!(
            m,
            "No evidence of sex could be used for this individual: no estimate is made.\n"
        );
    }
    for w in &c.warnings {
        let _ = writeln!(m, "> **Note:** {w}\n");
    }
    let _ = writeln!(m, "## By body region\n");
    let _ = writeln!(m, "Regions are combined as independent given sex (the model's assumption); the total is the product of the regions' ratios.\n");
    let _ = writeln!(
        m,
        "| region | status | log10 LR | likelihood ratio | in words | traits that entered |"
    );
    let _ = writeln!(m, "|---|---|---:|---|---|---|");
    for r in &c.regions {
        let used = r.status == "used";
        let _ = writeln!(
            m,
            "| {} | {} | {} | {} | {} | {} |",
            r.block,
            r.status.replace('_', " "),
            if used {
                signed(r.log10_lr, 2)
            } else {
                String::new()
            },
            if used {
                ratio_words(r.log10_lr)
            } else {
                String::new()
            },
            r.support,
            r.traits.len()
        );
    }
    if c.estimable {
        let _ = writeln!(
            m,
            "| **all** | | **{}** | **{}** | **{}** | {} |",
            signed(c.log10_lr, 2),
            ratio_words(c.log10_lr),
            c.support,
            c.regions.iter().map(|r| r.traits.len()).sum::<usize>()
        );
    }
    let _ = writeln!(m, "\n## What was recorded\n");
    let _ = writeln!(m, "Each trait's likelihood ratio alone is its region's model with no other trait recorded; a region's ratio is computed jointly and is not the product of its traits' (traits of a region are correlated within sex).\n");
    let _ = writeln!(
        m,
        "| region | trait | side | recorded | log10 LR alone | in words |"
    );
    let _ = writeln!(m, "|---|---|---|---|---:|---|");
    for r in &c.regions {
        for t in &r.traits {
            let _ = writeln!(
                m,
                "| {} | {} (`{}`) | {} | {} | {} | {} |",
                r.block,
                t.name,
                t.id,
                t.side,
                t.recorded,
                t.log10_lr_alone
                    .map(|v| signed(v, 2))
                    .unwrap_or_else(|| "–".into()),
                t.log10_lr_alone
                    .map(crate::assemblage::lr_support)
                    .unwrap_or_default()
            );
        }
    }
    let missing: Vec<String> = c
        .regions
        .iter()
        .filter(|r| !r.not_recorded.is_empty())
        .map(|r| format!("{}: {}", r.block, r.not_recorded_names.join(", ")))
        .collect();
    let _ = writeln!(m, "\n## Not recorded\n");
    if missing.is_empty() {
        let _ = writeln!(m, "Every trait of the model was recorded.\n");
    } else {
        for x in missing {
            let _ = writeln!(m, "- {x}");
        }
        let _ = writeln!(m);
    }
    let notes: Vec<String> = c
        .regions
        .iter()
        .filter(|r| !r.note.is_empty())
        .map(|r| format!("{}: {}", r.block, r.note))
        .collect();
    if !notes.is_empty() {
        let _ = writeln!(m, "Notes of the computation:\n");
        for x in notes {
            let _ = writeln!(m, "- {x}");
        }
        let _ = writeln!(m);
    }
    let _ = writeln!(m, "## Probability of being female under named priors\n");
    if c.under_priors.is_empty() {
        let _ = writeln!(
            m,
            "None was asked for (`--prior`). The likelihood ratio above is the result.\n"
        );
    } else {
        let _ = writeln!(m, "P(female | evidence) = LR·p / (LR·p + 1 − p), for a prior probability of female p (the mean of the named prior). The category follows the cut-offs on P(female) and therefore depends on the prior; the verbal scale describes the likelihood ratio alone, so the two may speak with different strength.\n");
        let _ = writeln!(
            m,
            "| prior | prior probability of female | P(female) | category |"
        );
        let _ = writeln!(m, "|---|---:|---:|---|");
        for u in &c.under_priors {
            let _ = writeln!(
                m,
                "| {} | {:.3} | {} | {} |",
                u.prior,
                u.prior_female,
                super::number::probability(u.p_female),
                u.category
            );
        }
        let _ = writeln!(m);
    }
    let _ = writeln!(m, "## The model and its error rates\n");
    let _ = writeln!(m, "- Model: `{}` (SHA-256 `{}`)", c.model, c.model_sha256);
    match &c.fitted_to {
        Some(f) => {
            let _ = writeln!(m, "- Parameters: {f}");
        }
        None => {
            let _ = writeln!(
                m,
                "- Not fitted to a documented collection (illustrative parameters)"
            );
        }
    }
    let _ = writeln!(
        m,
        "- Skeletal evidence used from the age of {} years",
        c.minimum_age
    );
    match rates {
        Some(q) => {
            let _ = writeln!(
                m,
                "- Error rates quoted from `{}` (SHA-256 `{}`): of {} documented individuals, {} correct (95% Wilson interval {} to {}), {} left indeterminate. They were attached by the analyst: tessera does not check that they were measured for this model, and they hold for individuals like that reference collection.",
                q.file, q.sha256, q.n, q.accuracy.0, q.accuracy.1, q.accuracy.2, q.share_indeterminate
            );
        }
        None => {
            let _ = writeln!(m, "- No error rates are attached (`--rates`, from `tessera validate`): the rate at which this model misclassifies individuals like this one is not stated here.");
        }
    }
    let _ = writeln!(m, "\nProvenance of the model:\n");
    for line in c.model_provenance.lines() {
        let _ = writeln!(m, "> {line}");
    }
    let _ = writeln!(m, "\n## Assumptions and limitations\n");
    for line in [
        "Body regions are independent given sex; traits within a region are correlated as the model says.",
        "Traits not recorded are missing at random with respect to sex (they are integrated out, not counted).",
        "Where both sides were recorded, one side per trait is used under the run's side policy (the side is listed above).",
        "A score recorded as a range of grades (`3-4`) counts as 'one of these grades'.",
        "Ancient- or forensic-DNA read counts, where recorded, allow a small rate of contamination or mix-up (the model's `contamination`), which bounds the DNA likelihood ratio.",
        "The numbers equal those of `tessera evidence` for the same input, model and seed.",
    ] {
        let _ = writeln!(m, "- {line}");
    }
    let _ = writeln!(m, "\n## Verbal scale of the likelihood ratio\n");
    let _ = writeln!(m, "After the ENFSI guideline for evaluative reporting in forensic science (ENFSI 2015; cut-points quoted from memory). A ratio below 1 is read as its reciprocal in support of male.\n");
    let _ = writeln!(m, "| likelihood ratio | words |\n|---|---|");
    for (r, w) in SCALE {
        let _ = writeln!(m, "| {r} | {w} |");
    }
    let _ = writeln!(m, "\n## Signatures\n");
    let _ = writeln!(m, "Analyst: ________________  Date: __________\n");
    let _ = writeln!(m, "Reviewer: ________________  Date: __________");
    m
}

fn esc(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// The same report as a printable HTML page, from the Markdown's lines: headings, tables,
/// lists, quotes, paragraphs (the small subset the Markdown above uses; no scripts, no
/// outside resources).
pub fn case_html(markdown: &str, title: &str) -> String {
    let mut h = String::new();
    let _ = writeln!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>{}</title>",
        esc(title)
    );
    let _ = writeln!(h, "<style>\nbody {{ font-family: sans-serif; max-width: 52em; margin: 2em auto; line-height: 1.4; color: #111; }}\ntable {{ border-collapse: collapse; margin: 0.5em 0 1em; }}\ntd, th {{ border: 1px solid #999; padding: 0.2em 0.5em; vertical-align: top; }}\nth {{ background: #eee; }}\nblockquote {{ border-left: 3px solid #999; margin: 0.5em 0; padding-left: 0.8em; }}\n@media print {{ body {{ margin: 0; max-width: none; }} h2 {{ page-break-after: avoid; }} table {{ page-break-inside: avoid; }} }}\n</style>\n</head>\n<body>");
    let inline = |s: &str| -> String {
        // **bold** and `code`, after escaping.
        let mut out = String::new();
        let e = esc(s);
        let mut bold = false;
        let mut code = false;
        let mut chars = e.chars().peekable();
        while let Some(ch) = chars.next() {
            if ch == '*' && chars.peek() == Some(&'*') {
                chars.next();
                out.push_str(if bold { "</strong>" } else { "<strong>" });
                bold = !bold;
            } else if ch == '`' {
                out.push_str(if code { "</code>" } else { "<code>" });
                code = !code;
            } else {
                out.push(ch);
            }
        }
        if bold {
            out.push_str("</strong>");
        }
        if code {
            out.push_str("</code>");
        }
        out
    };
    let mut in_table = false;
    let mut header_row = false;
    let mut in_list = false;
    for line in markdown.lines() {
        let t = line.trim_end();
        if t.starts_with('|') {
            let cells: Vec<&str> = t.trim_matches('|').split('|').map(str::trim).collect();
            // The separator row: every cell dashes (an empty header cell is not one).
            if cells
                .iter()
                .all(|c| c.contains('-') && c.chars().all(|x| x == '-' || x == ':'))
            {
                continue;
            }
            if !in_table {
                h.push_str("<table>\n");
                in_table = true;
                header_row = true;
            }
            let tag = if header_row { "th" } else { "td" };
            header_row = false;
            h.push_str("<tr>");
            for c in cells {
                let _ = write!(h, "<{tag}>{}</{tag}>", inline(c));
            }
            h.push_str("</tr>\n");
            continue;
        }
        if in_table {
            h.push_str("</table>\n");
            in_table = false;
        }
        if let Some(item) = t.strip_prefix("- ") {
            if !in_list {
                h.push_str("<ul>\n");
                in_list = true;
            }
            let _ = writeln!(h, "<li>{}</li>", inline(item));
            continue;
        }
        if in_list {
            h.push_str("</ul>\n");
            in_list = false;
        }
        if let Some(x) = t.strip_prefix("## ") {
            let _ = writeln!(h, "<h2>{}</h2>", inline(x));
        } else if let Some(x) = t.strip_prefix("# ") {
            let _ = writeln!(h, "<h1>{}</h1>", inline(x));
        } else if let Some(x) = t.strip_prefix("> ") {
            let _ = writeln!(h, "<blockquote>{}</blockquote>", inline(x));
        } else if !t.is_empty() {
            let _ = writeln!(h, "<p>{}</p>", inline(t));
        }
    }
    if in_table {
        h.push_str("</table>\n");
    }
    if in_list {
        h.push_str("</ul>\n");
    }
    h.push_str("</body>\n</html>\n");
    h
}

/// The files of one case: `case.md`, `case.html`, `case.json`.
///
/// # Errors
/// [`RenderError`] when the JSON cannot be written.
pub fn case_files(
    c: &CaseReport,
    rates: Option<&QuotedRates>,
    command: &str,
) -> Result<OutputSet, RenderError> {
    let md = case_markdown(c, rates, command);
    let html = case_html(&md, &format!("Sex estimate: {}", c.id));
    let mut json = serde_json::to_vec_pretty(c)?;
    json.push(b'\n');
    let mut files = OutputSet::default();
    files.push("case.md", md.into_bytes());
    files.push("case.html", html.into_bytes());
    files.push("case.json", json);
    Ok(files)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ratios_read_as_numbers_to_one() {
        assert_eq!(ratio_words(36f64.log10()), "36.0 to 1 for female");
        assert_eq!(ratio_words(-(250f64.log10())), "250 to 1 for male");
        assert_eq!(ratio_words(-7.25), "10^7.2 to 1 for male");
        assert_eq!(ratio_words(0.0), "1 (no evidence either way)");
        assert_eq!(signed(-0.179, 3), "−0.179");
        assert_eq!(signed(-0.0001, 2), "0.00");
    }

    #[test]
    fn the_page_escapes_what_it_is_given() {
        let h = case_html(
            "# A <b>\n\n| a | b |\n|---|---|\n| 1 & 2 | `x` |\n\n- **y**\n",
            "t<",
        );
        assert!(h.contains("<h1>A &lt;b&gt;</h1>"));
        assert!(h.contains("<th>a</th><th>b</th>"));
        assert!(h.contains("<td>1 &amp; 2</td><td><code>x</code></td>"));
        assert!(h.contains("<li><strong>y</strong></li>"));
        assert!(h.contains("<title>t&lt;</title>"));
        // A table whose header cells are empty keeps its first row as data.
        let h = case_html("| | |\n|---|---|\n| Case | K-1 |\n", "t");
        assert!(h.contains("<tr><th></th><th></th></tr>"), "{h}");
        assert!(h.contains("<tr><td>Case</td><td>K-1</td></tr>"), "{h}");
        assert!(!h.contains("<script"));
    }
}
