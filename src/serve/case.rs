//! The page's one-case form: a single individual's scores and measurements, typed in, give
//! the report of `tessera case` (likelihood ratio by region and in all, each trait alone, the
//! verbal scale, P(female) under the priors named) with the cautions beside it.

use super::WebResponse;
use crate::catalogue::TraitKind;
use serde::Deserialize;
use serde_json::json;
use std::collections::BTreeMap;

/// `GET /api/catalogue`: the traits the form offers, by region, with their scales.
pub fn catalogue() -> WebResponse {
    let model = match crate::pipeline::load_model(None) {
        Ok(m) => m,
        Err(e) => return WebResponse::error(500, &e.to_string()),
    };
    let traits: Vec<serde_json::Value> = model
        .catalogue
        .traits()
        .iter()
        .map(|t| {
            let (kind, scale) = match &t.kind {
                TraitKind::Ordinal { lowest, highest } => {
                    ("grade", json!({ "lowest": lowest, "highest": highest }))
                }
                TraitKind::Metric { unit, low, high } => (
                    "measurement",
                    json!({ "unit": unit, "low": low, "high": high }),
                ),
                TraitKind::Count => ("count", json!({})),
            };
            json!({
                "id": t.id,
                "name": t.name,
                "region": t.region,
                "bilateral": t.bilateral,
                "kind": kind,
                "scale": scale,
                "definition": t.definition,
                "source": t.source,
            })
        })
        .collect();
    WebResponse::json(200, &json!({ "traits": traits, "model": model.name }))
}

/// What the form sends.
#[derive(Debug, Default, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct CaseForm {
    /// Column name (`glabella`, `mastoid_l`, …) → the value as typed.
    pub values: BTreeMap<String, String>,
    /// Age at death as recorded (years, range, open class, adult, subadult).
    pub age: String,
    /// Priors to give P(female) under (shipped names or fixed:VALUE).
    pub priors: Vec<String>,
    /// Case or accession number.
    pub case_number: String,
    /// Analyst.
    pub analyst: String,
    /// Reviewer.
    pub reviewer: String,
}

/// One CSV field, quoted when it must be.
fn field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// `POST /api/case` with the form as JSON: the one-case report, its Markdown and printable
/// HTML, and the cautions; a value that cannot be read is answered with every problem, as
/// `check` would list it.
pub fn case(body: &[u8]) -> WebResponse {
    let form: CaseForm = match serde_json::from_slice(body) {
        Ok(f) => f,
        Err(e) => return WebResponse::error(400, &format!("the form is not valid: {e}")),
    };
    let model = match crate::pipeline::load_model(None) {
        Ok(m) => m,
        Err(e) => return WebResponse::error(500, &e.to_string()),
    };
    let known = crate::data::columns::column_names(&model.catalogue);
    let mut columns: Vec<(&String, &String)> = form
        .values
        .iter()
        .filter(|(_, v)| !v.trim().is_empty())
        .collect();
    if let Some((bad, _)) = columns.iter().find(|(c, _)| !known.contains(c)) {
        return WebResponse::error(422, &format!("`{bad}` is not a trait of the model"));
    }
    columns.retain(|(c, _)| !matches!(c.as_str(), "id" | "group" | "age" | "known_sex"));
    // The case as a one-row table, read as every table is read.
    let mut header = vec!["id".to_string(), "age".to_string()];
    let mut row = vec!["case".to_string(), field(form.age.trim())];
    for (c, v) in &columns {
        header.push((*c).clone());
        row.push(field(v.trim()));
    }
    let text = format!("{}\n{}\n", header.join(","), row.join(","));
    let settings = crate::data::ReadSettings::default();
    let a = match crate::data::read_assemblage_text(
        "case",
        text.as_bytes(),
        &model.catalogue,
        &settings,
    ) {
        Ok(a) => a,
        Err(e) => {
            return WebResponse::json(
                422,
                &json!({ "error": "some values cannot be read; every one is listed", "problems": e }),
            )
        }
    };
    if let Err(m) = super::api::page_prior_words(form.priors.iter().map(String::as_str), false) {
        return WebResponse::error(422, &m);
    }
    let mut priors = Vec::new();
    for p in &form.priors {
        match crate::prior::parse_prior_set(p) {
            Ok(mut v) => priors.append(&mut v),
            Err(e) => return WebResponse::error(422, &e.to_string()),
        }
    }
    let nonempty = |s: &str| (!s.trim().is_empty()).then(|| s.trim().to_string());
    let details = crate::case::CaseDetails {
        case_number: nonempty(&form.case_number),
        analyst: nonempty(&form.analyst),
        reviewer: nonempty(&form.reviewer),
    };
    let report = match crate::case::case_report(
        &model,
        &a,
        "case",
        &priors,
        &crate::assemblage::Thresholds::default(),
        details,
        1,
    ) {
        Ok(r) => r,
        Err(e) => return WebResponse::error(422, &e.to_string()),
    };
    let markdown =
        crate::report::case::case_markdown(&report, None, "the tessera page's one-case form");
    let html = crate::report::case::case_html(&markdown, "Sex estimate: one case");
    WebResponse::json(
        200,
        &json!({
            "report": report,
            "ratio": crate::report::case::ratio_words(report.log10_lr),
            "markdown": markdown,
            "html": html,
            "cautions": super::api::CAUTIONS,
        }),
    )
}
