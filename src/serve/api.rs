//! The page's requests: upload a table (and see what `check` sees), analyse it, download the
//! run's files. Every answer is JSON except the page itself and the zip.

use super::store::Table;
use super::{State, WebResponse};
use crate::assemblage::{category_note, lr_support};
use crate::data::{Completeness, InputError};
use crate::model::BlockStatus;
use crate::pipeline::{render, AnalysisOptions, ModelChoice, ReadOptions};
use crate::progress::Silent;
use crate::results::AnalysisResult;
use crate::Error;
use serde::Deserialize;
use serde_json::{json, Value};
use std::collections::BTreeMap;
use std::f64::consts::LN_10;

/// The cautions shown on every results view, in the page's own words.
pub const CAUTIONS: [&str; 4] = [
    "These are estimates, not identifications: every number is a probability under a stated model and prior.",
    "Forensic casework needs methods validated on a relevant reference population, accredited practice and the rules of the jurisdiction; the shipped model is illustrative.",
    "Biological sex is not gender: the skeleton and the DNA say nothing about how a person lived or identified.",
    "These are the remains of people: treat them, their descendants and their communities with respect.",
];

/// Decode `%XX` and `+` of a query value.
fn percent_decode(s: &str) -> String {
    let bytes = s.as_bytes();
    let mut out = Vec::with_capacity(bytes.len());
    let mut i = 0;
    while i < bytes.len() {
        match bytes[i] {
            b'+' => out.push(b' '),
            b'%' if i + 2 < bytes.len() => {
                let hex = |c: u8| (c as char).to_digit(16);
                match (hex(bytes[i + 1]), hex(bytes[i + 2])) {
                    (Some(h), Some(l)) => {
                        out.push((h * 16 + l) as u8);
                        i += 2;
                    }
                    _ => out.push(b'%'),
                }
            }
            b => out.push(b),
        }
        i += 1;
    }
    String::from_utf8_lossy(&out).into_owned()
}

/// The value of `key` in a query string.
pub fn query_value(query: &str, key: &str) -> Option<String> {
    query.split('&').find_map(|pair| {
        let (k, v) = pair.split_once('=').unwrap_or((pair, ""));
        (percent_decode(k) == key).then(|| percent_decode(v))
    })
}

/// A file name as the page may use it: its last path component, printable, at most 200
/// characters; `None` when nothing is left.
fn file_name(raw: &str) -> Option<String> {
    let last = raw.rsplit(['/', '\\']).next().unwrap_or("").trim();
    let clean: String = last.chars().filter(|c| !c.is_control()).take(200).collect();
    (!clean.is_empty() && clean != "." && clean != "..").then_some(clean)
}

/// The names of the shipped priors (those the page offers).
fn shipped_names() -> Vec<String> {
    crate::prior::shipped_priors()
        .map(|v| v.into_iter().map(|p| p.name).collect())
        .unwrap_or_default()
}

/// Every prior word of `words` the page may use: a shipped name, `fixed:VALUE`, and (where
/// `sets`) `shipped` and `sweep`; the page never names a prior file of this machine.
///
/// # Errors
/// The first word that is not one of them, with what the page takes.
pub fn page_prior_words<'w>(
    words: impl IntoIterator<Item = &'w str>,
    sets: bool,
) -> Result<(), String> {
    let shipped = shipped_names();
    for word in words.into_iter().map(str::trim).filter(|w| !w.is_empty()) {
        let ok = (sets && (word == "shipped" || word == "sweep"))
            || word.starts_with("fixed:")
            || shipped.iter().any(|n| n == word);
        if !ok {
            return Err(format!(
                "`{word}`: on this page a prior is one of the shipped ones ({}) or fixed:VALUE; a prior file needs the command line",
                shipped.join(", ")
            ));
        }
    }
    Ok(())
}

/// A request's JSON body as `T`; an empty body is `T`'s default. `refusal` begins the 400
/// answer ("the options are not valid").
fn json_body<T: serde::de::DeserializeOwned + Default>(
    body: &[u8],
    refusal: &str,
) -> Result<T, WebResponse> {
    if body.iter().all(u8::is_ascii_whitespace) {
        return Ok(T::default());
    }
    serde_json::from_slice(body).map_err(|e| WebResponse::error(400, &format!("{refusal}: {e}")))
}

/// A table the server still holds, or the 404 that says to load it again.
fn held_table(state: &State, id: &str) -> Result<Table, WebResponse> {
    state
        .store
        .lock()
        .ok()
        .and_then(|s| s.table(id))
        .ok_or_else(|| WebResponse::error(404, "that table is no longer held: load it again"))
}

/// The problems of a table, as the page lists them (file, row, column, value, expected).
fn problems_json(e: &InputError) -> Value {
    serde_json::to_value(e).unwrap_or(Value::Null)
}

fn error_response(e: &Error) -> WebResponse {
    WebResponse::json(422, &error_detail(e))
}

/// A column mapping as the page sends it: sheet column → tessera's name, and the lab's words
/// for "not recordable". The same content as a column profile file.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Mapping {
    /// Sheet column → tessera's name.
    pub columns: BTreeMap<String, String>,
    /// Words meaning "not recordable".
    pub not_recorded: Vec<String>,
}

impl Mapping {
    fn read_options(&self) -> ReadOptions {
        ReadOptions {
            renames: self.columns.clone(),
            not_recorded: self.not_recorded.clone(),
            ..ReadOptions::default()
        }
    }
}

/// The profile file a mapping is saved as, named after its table: `dig.csv` →
/// `dig-columns.yaml`.
pub fn profile_name(table: &str) -> String {
    let stem = table.rsplit_once('.').map_or(table, |(s, _)| s);
    format!("{stem}-columns.yaml")
}

/// `POST /api/tables?name=FILE` with the file as the body: keep it in memory and answer what
/// `check` would say of it (every problem at once), with its header and, for each column
/// tessera does not recognise, the names it most likely means.
pub fn upload(state: &State, query: &str, body: &[u8]) -> WebResponse {
    let Some(name) = query_value(query, "name").as_deref().and_then(file_name) else {
        return WebResponse::error(400, "name the file: /api/tables?name=FILE.csv");
    };
    if body.is_empty() {
        return WebResponse::error(400, &format!("`{name}` is empty"));
    }
    let id = match state.store.lock() {
        Ok(mut s) => s.add_table(Table {
            name: name.clone(),
            bytes: body.to_vec(),
        }),
        Err(_) => return WebResponse::error(500, "the server's memory is unusable"),
    };
    check_table(state, &id, &Mapping::default())
}

/// `POST /api/tables/ID/check` with a mapping as JSON: the check again, reading the sheet's
/// columns as mapped.
pub fn recheck(state: &State, table: &str, body: &[u8]) -> WebResponse {
    match json_body::<Mapping>(body, "the mapping is not valid") {
        Ok(mapping) => check_table(state, table, &mapping),
        Err(r) => r,
    }
}

/// What the page shows of a table under a mapping.
fn check_table(state: &State, id: &str, mapping: &Mapping) -> WebResponse {
    let t = match held_table(state, id) {
        Ok(t) => t,
        Err(r) => return r,
    };
    let options = AnalysisOptions {
        read: mapping.read_options(),
        ..AnalysisOptions::default()
    };
    let model = match crate::pipeline::load_model(None) {
        Ok(m) => m,
        Err(e) => return error_response(&e),
    };
    let known = crate::data::columns::column_names(&model.catalogue);
    let header = crate::data::header_of_bytes(&t.name, &t.bytes, None).unwrap_or_default();
    let unrecognised: Vec<Value> = header
        .iter()
        .filter(|h| {
            let n = crate::data::columns::normalise(h);
            !n.is_empty() && !known.contains(&n)
        })
        .map(|h| {
            json!({
                "column": h,
                "suggestions": crate::data::profile::suggestions(h, &model.catalogue),
                "mapped_to": mapping.columns.get(h.as_str()),
            })
        })
        .collect();
    let mut answer = json!({
        "table": id,
        "name": t.name,
        "header": header,
        "unrecognised": unrecognised,
        "names": known,
        "profile_name": profile_name(&t.name),
    });
    let checked = options
        .validate_with(model, "embedded default".into())
        .and_then(|run| {
            let a = run.read_bytes(&t.name, &t.bytes)?;
            Ok((run, a))
        });
    let Value::Object(m) = &mut answer else {
        return WebResponse::error(500, "unreachable");
    };
    match checked {
        Ok((run, a)) => {
            m.insert("readable".into(), json!(true));
            m.insert(
                "summary".into(),
                json!(Completeness::of(&a, Some(run.model.minimum_age))),
            );
            m.insert("notes".into(), json!(run.input_notes(&a)));
            m.insert("columns".into(), json!(a.carried_columns));
            m.insert(
                "has_group_column".into(),
                json!(a.individuals.iter().any(|i| i.group.is_some())),
            );
        }
        Err(e) => {
            m.insert("readable".into(), json!(false));
            let detail = json!(error_detail(&e));
            if let Value::Object(d) = detail {
                m.extend(d);
            }
        }
    }
    WebResponse::json(200, &answer)
}

/// An error as the page lists it: `error`, and `problems` or `options` where there are such.
fn error_detail(e: &Error) -> Value {
    match e {
        Error::Input(problems) => json!({
            "error": "the table has problems; every one is listed",
            "problems": problems_json(problems),
        }),
        Error::Options(o) => {
            json!({ "error": "some options cannot be used", "options": o.to_string() })
        }
        other => json!({ "error": other.to_string() }),
    }
}

/// `POST /api/profile` with a mapping as JSON: the column profile file (YAML) that the
/// command line takes with `--columns`, checked first (every problem at once).
pub fn profile(body: &[u8]) -> WebResponse {
    let mapping: Mapping = match serde_json::from_slice(body) {
        Ok(m) => m,
        Err(e) => return WebResponse::error(400, &format!("the mapping is not valid: {e}")),
    };
    let catalogue = match crate::catalogue::Catalogue::standard() {
        Ok(c) => c,
        Err(e) => return WebResponse::error(500, &e.to_string()),
    };
    let p = crate::data::ColumnProfile {
        columns: mapping.columns,
        not_recorded: mapping.not_recorded,
    };
    let problems = p.problems(&catalogue);
    if problems.is_empty() {
        WebResponse::new(200, "application/yaml", p.to_yaml())
    } else {
        WebResponse::json(
            422,
            &json!({ "error": "the mapping cannot be saved", "options": problems.join("\n") }),
        )
    }
}

/// What the page may set of an analysis. Paths to files of this machine (a model, a prior
/// file, a scale map) are not among them.
#[derive(Debug, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct PageOptions {
    /// The chosen prior: a shipped name or `fixed:VALUE`.
    pub prior: String,
    /// The sensitivity set: shipped names, `fixed:VALUE`, `shipped`, `sweep`.
    pub priors: String,
    /// Cut-offs on P(female).
    pub thresholds: String,
    /// The column holding the groups (empty: the `group` column, if any).
    pub group_by: String,
    /// Which side of a bilateral trait to use: `left-first`, `right-first` or `both`.
    pub sides: String,
    /// Columns to compare between the sexes: 0/1 conditions or numbers.
    pub by_sex: Vec<String>,
    /// Age classes of the life tables.
    pub life_table_classes: String,
    /// Age classes of the tables of age by sex and of categories by age.
    pub age_classes: String,
    /// The reference sex ratio, males per 100 females.
    pub reference_ratio: f64,
    /// The age range of the comparison of mortality.
    pub hazard_ages: String,
    /// Within-sex correlations to try (empty: no correlation check).
    pub correlation_check: String,
    /// Joint posterior draws to write.
    pub draws: Option<usize>,
    /// Recalibrate the measurements.
    pub recalibrate: bool,
    /// Seed.
    pub seed: u64,
    /// The sheet's columns under tessera's names (the mapping).
    pub columns: BTreeMap<String, String>,
    /// The lab's words for "not recordable" (the mapping).
    pub not_recorded: Vec<String>,
    /// The name of a model file the user chose (empty: the embedded default model).
    pub model_name: String,
    /// That model file's text.
    pub model_yaml: String,
    /// The name of a scale map file the user chose (empty: none).
    pub scale_map_name: String,
    /// That scale map's text.
    pub scale_map_yaml: String,
}

impl Default for PageOptions {
    fn default() -> Self {
        let d = AnalysisOptions::default();
        PageOptions {
            prior: d.prior,
            priors: d.priors,
            thresholds: d.thresholds,
            group_by: String::new(),
            sides: "left-first".into(),
            by_sex: Vec::new(),
            life_table_classes: d.life_table_classes,
            age_classes: d.age_classes,
            reference_ratio: d.reference_ratio,
            hazard_ages: d.hazard_ages,
            correlation_check: d.correlation_check,
            draws: None,
            recalibrate: false,
            seed: d.seed,
            columns: BTreeMap::new(),
            not_recorded: Vec::new(),
            model_name: String::new(),
            model_yaml: String::new(),
            scale_map_name: String::new(),
            scale_map_yaml: String::new(),
        }
    }
}

impl PageOptions {
    /// The library's options, or why not: every prior word must be shipped, `fixed:VALUE`,
    /// `shipped` or `sweep` (the page never names a file of this machine).
    fn analysis_options(&self) -> Result<AnalysisOptions, String> {
        page_prior_words(self.prior.split(',').chain(self.priors.split(',')), true)?;
        let sides = match self.sides.as_str() {
            "" => crate::data::SidePolicy::LeftFirst,
            word => crate::data::SidePolicy::from_word(word)
                .ok_or_else(|| format!("`{word}`: sides are left-first, right-first or both"))?,
        };
        Ok(AnalysisOptions {
            model: ModelChoice::Embedded,
            prior: self.prior.clone(),
            priors: self.priors.clone(),
            thresholds: self.thresholds.clone(),
            draws: self.draws,
            by_sex: self.by_sex.clone(),
            life_table_classes: self.life_table_classes.clone(),
            age_classes: self.age_classes.clone(),
            reference_ratio: self.reference_ratio,
            hazard_ages: self.hazard_ages.clone(),
            correlation_check: self.correlation_check.clone(),
            recalibrate: self.recalibrate,
            seed: self.seed,
            read: ReadOptions {
                group_by: (!self.group_by.trim().is_empty()).then(|| self.group_by.clone()),
                sides,
                renames: self.columns.clone(),
                not_recorded: self.not_recorded.clone(),
                scale_map_text: (!self.scale_map_yaml.trim().is_empty()).then(|| {
                    (
                        file_name(&self.scale_map_name).unwrap_or_else(|| "scale-map.yaml".into()),
                        self.scale_map_yaml.clone(),
                    )
                }),
                ..ReadOptions::default()
            },
            ..AnalysisOptions::default()
        })
    }
}

/// The command line that gives the same files as a page run (for the record and for
/// reproducing it in a terminal).
fn command_of(table: &str, o: &AnalysisOptions) -> Vec<String> {
    let d = AnalysisOptions::default();
    let mut c: Vec<String> = vec!["tessera".into(), "analyse".into(), table.into()];
    c.extend(["--out".to_string(), "results".to_string()]);
    if let ModelChoice::File(p) = &o.model {
        c.extend(["--model".to_string(), p.display().to_string()]);
    }
    let mut opt = |k: &str, v: String| {
        c.push(k.to_string());
        c.push(v);
    };
    if o.prior != d.prior {
        opt("--prior", o.prior.clone());
    }
    if o.priors != d.priors {
        opt("--priors", o.priors.clone());
    }
    if o.thresholds != d.thresholds {
        opt("--thresholds", o.thresholds.clone());
    }
    if o.read.sides != crate::data::SidePolicy::default() {
        opt("--sides", o.read.sides.as_str().into());
    }
    if let Some(g) = &o.read.group_by {
        opt("--group-by", g.clone());
    }
    if !o.read.renames.is_empty() || !o.read.not_recorded.is_empty() {
        opt("--columns", profile_name(table));
    }
    if let Some((name, _)) = &o.read.scale_map_text {
        opt("--scale-map", name.clone());
    }
    if let Some(n) = o.draws {
        opt("--draws", n.to_string());
    }
    for b in &o.by_sex {
        opt("--by-sex", b.clone());
    }
    if o.life_table_classes != d.life_table_classes {
        opt("--life-table-classes", o.life_table_classes.clone());
    }
    if o.age_classes != d.age_classes {
        opt("--age-classes", o.age_classes.clone());
    }
    if o.reference_ratio != d.reference_ratio {
        opt("--reference-ratio", o.reference_ratio.to_string());
    }
    if o.hazard_ages != d.hazard_ages {
        opt("--hazard-ages", o.hazard_ages.clone());
    }
    if !o.correlation_check.trim().is_empty() {
        opt("--correlation-check", o.correlation_check.clone());
    }
    if o.seed != d.seed {
        opt("--seed", o.seed.to_string());
    }
    if o.recalibrate {
        c.push("--recalibrate".into());
    }
    c
}

/// A command line to paste into a POSIX shell: words with anything but letters, digits and
/// `-_.,:/=+` quoted in single quotes.
pub fn shell_words(args: &[String]) -> String {
    args.iter()
        .map(|a| {
            let plain = !a.is_empty()
                && a.chars()
                    .all(|c| c.is_ascii_alphanumeric() || "-_.,:/=+".contains(c));
            if plain {
                a.clone()
            } else {
                format!("'{}'", a.replace('\'', "'\\''"))
            }
        })
        .collect::<Vec<_>>()
        .join(" ")
}

/// `POST /api/tables/ID/start` with the options as JSON: the analysis of
/// [`analyse`], in the background; answers `{"job": ID}` at once (202), and
/// `GET /api/jobs/ID` tells how far it has got until it answers as `analyse` would.
pub fn start(state: &State, table: &str, body: &[u8]) -> WebResponse {
    let (id, job) = match state.jobs.lock() {
        Ok(mut j) => j.add(),
        Err(_) => return WebResponse::error(500, "the server's memory is unusable"),
    };
    let (state, table, body) = (state.clone(), table.to_string(), body.to_vec());
    let spawned = std::thread::Builder::new()
        .name(format!("analysis {id}"))
        .spawn({
            let job = std::sync::Arc::clone(&job);
            move || job.complete(analyse_with(&state, &table, &body, job.as_ref()))
        });
    if spawned.is_err() {
        return WebResponse::error(500, "the analysis could not be started");
    }
    WebResponse::json(202, &json!({ "job": id }))
}

/// `GET /api/jobs/ID`: 202 with the stage and its steps while the analysis runs, then its
/// answer.
pub fn poll(state: &State, job: &str) -> WebResponse {
    match state.jobs.lock().ok().and_then(|j| j.get(job)) {
        Some(j) => j.poll(),
        None => WebResponse::error(404, "that analysis is no longer held: run it again"),
    }
}

/// `POST /api/tables/ID/analyse` with the options as JSON: the whole analysis, as `analyse`
/// runs it, and what the page shows of it.
pub fn analyse(state: &State, table: &str, body: &[u8]) -> WebResponse {
    analyse_with(state, table, body, &Silent)
}

/// [`analyse`], telling `progress` how far it has got.
fn analyse_with(
    state: &State,
    table: &str,
    body: &[u8],
    progress: &dyn crate::progress::Progress,
) -> WebResponse {
    let t = match held_table(state, table) {
        Ok(t) => t,
        Err(r) => return r,
    };
    let page: PageOptions = match json_body(body, "the options are not valid") {
        Ok(p) => p,
        Err(r) => return r,
    };
    let mut options = match page.analysis_options() {
        Ok(o) => o,
        Err(m) => return WebResponse::error(422, &m),
    };
    let validated = if page.model_yaml.trim().is_empty() {
        options.validate()
    } else {
        // A model file the user chose (from `tessera fit`, or written by hand), read from the
        // text sent, never from a path: it may include only the shipped model.
        let name = file_name(&page.model_name).unwrap_or_else(|| "model.yaml".into());
        if page.model_yaml.len() as u64 > crate::limits::MAX_SETTINGS_BYTES {
            return WebResponse::error(
                413,
                "the model file is larger than any model tessera reads",
            );
        }
        match crate::model::Model::from_yaml(&name, &page.model_yaml) {
            Ok(m) => {
                options.model = ModelChoice::File(name.clone().into());
                options.validate_with(m, name)
            }
            Err(e) => Err(Error::Model(e)),
        }
    };
    let run = match validated {
        Ok(r) => r,
        Err(e) => return error_response(&e),
    };
    let a = match run.read_bytes(&t.name, &t.bytes) {
        Ok(a) => a,
        Err(e) => return error_response(&e),
    };
    let notes = run.input_notes(&a);
    let args = command_of(&t.name, &options);
    let result = match run.analyse(a, args.clone(), progress) {
        Ok(r) => r,
        Err(e) => return error_response(&e),
    };
    let files = match render(&result) {
        Ok(f) => f,
        Err(e) => return error_response(&e),
    };
    let figures: Vec<Value> = files
        .files
        .iter()
        .filter(|f| f.name.ends_with(".svg"))
        .map(|f| json!({ "name": f.name, "svg": String::from_utf8_lossy(&f.bytes) }))
        .collect();
    let methods = files
        .get("methods.md")
        .map(|f| String::from_utf8_lossy(&f.bytes).into_owned())
        .unwrap_or_default();
    let names: Vec<String> = files.names().iter().map(|s| s.to_string()).collect();
    let id = match state.store.lock() {
        Ok(mut s) => s.add_run(&t.name, files),
        Err(_) => return WebResponse::error(500, "the server's memory is unusable"),
    };
    let mut body = results_json(&result);
    if let Value::Object(m) = &mut body {
        m.insert("run".into(), json!(id));
        m.insert("notes".into(), json!(notes));
        m.insert("figures".into(), json!(figures));
        m.insert("methods".into(), json!(methods));
        m.insert("files".into(), json!(names));
        m.insert("command".into(), json!(shell_words(&args)));
        m.insert("command_args".into(), json!(args));
    }
    WebResponse::json(200, &body)
}

/// Everything the results view shows, from one analysis.
pub fn results_json(r: &AnalysisResult) -> Value {
    let analysis = &r.results;
    let main = &analysis.main;
    let priors: Vec<&crate::assemblage::PriorResult> = analysis.results().collect();
    let individuals: Vec<Value> = r
        .assemblage
        .individuals
        .iter()
        .zip(&r.evidence)
        .enumerate()
        .map(|(i, (ind, ev))| {
            let log10 = ev.ln_lr / LN_10;
            let regions: Vec<Value> = r
                .model
                .blocks
                .iter()
                .zip(&ev.blocks)
                .map(|(b, e)| {
                    let used = e.status == BlockStatus::Used;
                    json!({
                        "region": b.id(),
                        "status": e.status.as_str(),
                        "log10_lr": used.then_some(e.ln_lr / LN_10),
                        "words": if used { lr_support(e.ln_lr / LN_10) } else { String::new() },
                        "traits": e
                            .traits_used
                            .iter()
                            .map(|t| r.model.catalogue.get(t).map_or_else(|| t.clone(), |d| d.name.clone()))
                            .collect::<Vec<_>>(),
                        "note": e.note,
                    })
                })
                .collect();
            let under: Vec<Value> = priors
                .iter()
                .map(|p| {
                    json!({
                        "prior": p.prior.name,
                        "p_female": p.p_female[i],
                        "category": p.categories[i].label(),
                    })
                })
                .collect();
            let s = &analysis.individual_sensitivity[i];
            json!({
                "id": ind.id,
                "row": ind.row,
                "group": ind.group,
                "estimable": ev.estimable,
                "n_traits": ev.n_traits,
                "log10_lr": ev.estimable.then_some(log10),
                "lr_words": if ev.estimable { lr_support(log10) } else { String::new() },
                "p_female": main.p_female[i],
                "category": main.categories[i].label(),
                "category_note": if ev.estimable {
                    category_note(&analysis.thresholds, main.categories[i], log10, &main.prior.name)
                } else {
                    None
                },
                "prior_sensitive": s.prior_sensitive,
                "p_female_min": s.p_female_min,
                "p_female_max": s.p_female_max,
                "note": ev.note,
                "regions": regions,
                "under_priors": under,
            })
        })
        .collect();
    let categories: Vec<Value> = crate::assemblage::Category::ALL
        .iter()
        .map(|c| {
            json!({
                "category": c.label(),
                "n": main.categories.iter().filter(|x| *x == c).count(),
            })
        })
        .collect();
    let groups: Vec<Value> = main
        .groups
        .iter()
        .map(|g| json!({ "group": g.group, "n": g.n, "mean": g.pi.mean, "lo": g.pi.lo, "hi": g.pi.hi }))
        .collect();
    let sensitivity: Vec<Value> = priors
        .iter()
        .map(|p| {
            json!({
                "prior": p.prior.name,
                "fixed": p.prior.is_fixed(),
                "mean": p.pi.mean,
                "lo": p.pi.lo,
                "hi": p.pi.hi,
            })
        })
        .collect();
    json!({
        "cautions": CAUTIONS,
        "input": r.assemblage.file,
        "sha256": r.assemblage.sha256,
        "model": r.model.name,
        "prior": main.prior.name,
        "proportion_female": {
            "model": if main.hyper.is_some() { "population behind the groups (μ)" } else { "the assemblage as one population" },
            "mean": main.hyper.as_ref().map_or(main.pi.mean, |h| h.mu.mean),
            "lo": main.hyper.as_ref().map_or(main.pi.lo, |h| h.mu.lo),
            "hi": main.hyper.as_ref().map_or(main.pi.hi, |h| h.mu.hi),
        },
        "n_individuals": main.n_individuals,
        "n_estimable": main.n_estimable,
        "thresholds": analysis.thresholds,
        "categories": categories,
        "groups": groups,
        "sensitivity": sensitivity,
        "flagged": crate::report::named_at_most(r.flagged.len(), r.flagged.iter().cloned(), "the `flags` column of individuals.csv"),
        "individuals": individuals,
    })
}

/// `GET /api/runs/ID/outputs.zip`: every file of the run, the same bytes `analyse` writes,
/// in one zip (deflated, entries in writing order, every date the zip epoch, so the same run
/// gives the same zip).
pub fn download(state: &State, run: &str) -> WebResponse {
    let Some((table, files)) = state.store.lock().ok().and_then(|s| s.run(run)) else {
        return WebResponse::error(404, "that run is no longer held: run it again");
    };
    match zip_of(&files) {
        Ok(bytes) => {
            let stem = table.rsplit_once('.').map_or(table.as_str(), |(s, _)| s);
            let mut r = WebResponse::new(200, "application/zip", bytes);
            let safe: String = stem
                .chars()
                .map(|c| {
                    if c.is_ascii_alphanumeric() || c == '-' || c == '_' {
                        c
                    } else {
                        '_'
                    }
                })
                .collect();
            r.download = Some(format!("{safe}-results.zip"));
            r
        }
        Err(m) => WebResponse::error(500, &m),
    }
}

/// The files of a run as a zip archive, deterministic.
///
/// # Errors
/// A message when the archive cannot be built.
pub fn zip_of(files: &crate::output::OutputSet) -> Result<Vec<u8>, String> {
    use std::io::Write as _;
    let mut w = zip::ZipWriter::new(std::io::Cursor::new(Vec::new()));
    let opts = zip::write::SimpleFileOptions::default()
        .compression_method(zip::CompressionMethod::Deflated)
        .last_modified_time(zip::DateTime::default())
        .unix_permissions(0o644);
    for f in &files.files {
        w.start_file(f.name.as_str(), opts)
            .map_err(|e| e.to_string())?;
        w.write_all(&f.bytes).map_err(|e| e.to_string())?;
    }
    w.finish()
        .map(std::io::Cursor::into_inner)
        .map_err(|e| e.to_string())
}

/// `GET /api/about`: the program, the cautions, and the priors the page offers.
pub fn about() -> WebResponse {
    let priors = shipped_names();
    WebResponse::json(
        200,
        &json!({
            "program": "tessera",
            "version": crate::VERSION,
            "cautions": CAUTIONS,
            "priors": priors,
        }),
    )
}
