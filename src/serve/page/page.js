// tessera's page. Every text that comes from a table is put in with textContent, never as
// markup; figures are shown as images (no script in them can run).
"use strict";

const $ = (id) => document.getElementById(id);
const state = { table: null, run: null, results: null, sort: { key: null, down: false } };

function el(tag, text, cls) {
  const e = document.createElement(tag);
  if (text !== undefined && text !== null) e.textContent = String(text);
  if (cls) e.className = cls;
  return e;
}

function fixed(x, d) {
  if (x === null || x === undefined || !isFinite(x)) return "–";
  const s = Number(x).toFixed(d);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s.replace("-", "\u2212");
}

function probability(p) {
  if (p === null || p === undefined) return "–";
  if (p > 0 && p < 0.0001) return p.toExponential(1);
  if (p < 1 && p > 0.9999) return "1 \u2212 " + (1 - p).toExponential(1);
  return fixed(p, 4);
}

function table(target, head, rows, numeric) {
  target.replaceChildren();
  const thead = el("thead");
  const tr = el("tr");
  head.forEach((h) => tr.appendChild(el("th", h)));
  thead.appendChild(tr);
  const tbody = el("tbody");
  rows.forEach((r) => {
    const row = el("tr");
    r.forEach((c, i) => row.appendChild(el("td", c, numeric && numeric[i] ? "num" : "")));
    tbody.appendChild(row);
  });
  target.append(thead, tbody);
}

// One labelled checkbox per value, ids `prefix0`, `prefix1`, …
function checkboxes(target, values, prefix) {
  target.replaceChildren();
  values.forEach((v, i) => {
    const box = el("input");
    box.type = "checkbox";
    box.id = prefix + i;
    box.value = v;
    const label = el("label", v);
    label.htmlFor = box.id;
    const line = el("div", null, "check");
    line.append(box, " ", label);
    target.appendChild(line);
  });
}

async function ask(url, options) {
  const response = await fetch(url, options);
  const type = response.headers.get("Content-Type") || "";
  const body = type.startsWith("application/json") ? await response.json() : null;
  return { ok: response.ok, status: response.status, body };
}

function showProblems(target, body) {
  target.replaceChildren();
  target.appendChild(el("p", body.error || "Something went wrong.", "error"));
  const problems = body.problems && body.problems.problems;
  if (Array.isArray(problems) && problems.length) {
    const t = el("table", null, "problems");
    table(t, ["row", "column", "found", "expected"], problems.map((p) => [
      p.row === null ? "" : p.row,
      p.column || "",
      p.value === null || p.value === undefined ? "" : p.value,
      p.expected,
    ]));
    target.appendChild(el("p", problems.length + " problem" + (problems.length === 1 ? "" : "s") + " in " + (problems[0].file || "the file") + ":"));
    target.appendChild(t);
  }
  if (body.options) target.appendChild(el("pre", body.options));
}

// The mapping of the sheet's own column names.
function currentMapping() {
  const columns = {};
  document.querySelectorAll("#mapping-table select").forEach((sel) => {
    if (sel.value) columns[sel.dataset.column] = sel.value;
  });
  const not_recorded = $("not-recorded").value.split(",").map((w) => w.trim()).filter((w) => w);
  return { columns, not_recorded };
}

function drawMapping(t) {
  const box = $("mapping");
  const rows = t.unrecognised || [];
  box.hidden = rows.length === 0 && !$("not-recorded").value;
  const tbl = $("mapping-table");
  tbl.replaceChildren();
  const head = el("tr");
  ["your column", "holds"].forEach((h) => head.appendChild(el("th", h)));
  const thead = el("thead");
  thead.appendChild(head);
  const tbody = el("tbody");
  rows.forEach((u, i) => {
    const tr = el("tr");
    tr.appendChild(el("td", u.column));
    const sel = el("select");
    sel.dataset.column = u.column;
    sel.id = "map-" + i;
    sel.setAttribute("aria-label", "What " + u.column + " holds");
    sel.appendChild(new Option("keep as it is (carried through)", ""));
    const first = u.suggestions.concat(t.names.filter((n) => !u.suggestions.includes(n)));
    first.forEach((n, k) => {
      const label = k < u.suggestions.length ? n + " (close to your name)" : n;
      sel.appendChild(new Option(label, n));
    });
    if (u.mapped_to) sel.value = u.mapped_to;
    const td = el("td");
    td.appendChild(sel);
    tr.appendChild(td);
    tbody.appendChild(tr);
  });
  tbl.append(thead, tbody);
}

async function applyMapping() {
  if (!state.table) return;
  const r = await ask("api/tables/" + state.table.table + "/check", {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify(currentMapping()),
  });
  showCheck(r);
}

async function saveProfile() {
  if (!state.table) return;
  const r = await fetch("api/profile", {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify(currentMapping()),
  });
  if (!r.ok) {
    const body = await r.json();
    $("profile-note").textContent = body.options || body.error;
    return;
  }
  const text = await r.text();
  const a = el("a");
  a.href = URL.createObjectURL(new Blob([text], { type: "application/yaml" }));
  a.download = state.table.profile_name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  $("profile-note").textContent = "Saved as " + state.table.profile_name + ": give it to the command line with --columns " + state.table.profile_name + ".";
}

// 1. The table.
async function load(file) {
  $("table-status").textContent = "Reading " + file.name + "…";
  $("settings-step").hidden = true;
  $("results-step").hidden = true;
  const bytes = await file.arrayBuffer();
  $("not-recorded").value = "";
  const r = await ask("api/tables?name=" + encodeURIComponent(file.name), { method: "POST", body: bytes });
  showCheck(r);
}

function showCheck(r) {
  const out = $("table-report");
  if (!r.ok) {
    $("table-status").textContent = "";
    showProblems(out, r.body || { error: "The server answered " + r.status + "." });
    return;
  }
  state.table = r.body;
  drawMapping(r.body);
  if (!r.body.readable) {
    $("settings-step").hidden = true;
    $("results-step").hidden = true;
    $("table-status").textContent = r.body.name + " cannot be analysed as it is.";
    showProblems(out, r.body);
    return;
  }
  $("table-status").textContent = r.body.name + ": no problems found; it can be analysed.";
  const s = r.body.summary;
  out.replaceChildren();
  const facts = el("ul");
  facts.appendChild(el("li", s.individuals + " individuals: " + s.adults + " adult (from " + s.minimum_age + " years), " + s.subadults + " subadult, " + s.maturity_unknown + " of unknown or straddling age"));
  facts.appendChild(el("li", s.without_evidence + " with no trait recorded (kept in every output as not estimable)"));
  if (s.groups && s.groups.length) {
    facts.appendChild(el("li", "Groups: " + s.groups.map((g) => g.group + " (" + g.individuals + ")").join(", ")));
  }
  out.appendChild(facts);
  const regions = el("table");
  table(regions, ["body region", "traits", "individuals with any", "share"],
    s.regions.map((g) => [g.region, g.traits_in_file, g.individuals, fixed(100 * g.share, 0) + "%"]), [false, true, true, true]);
  out.appendChild(el("h3", "What survives"));
  out.appendChild(regions);
  const byTrait = el("details");
  byTrait.appendChild(el("summary", "By trait"));
  const traits = el("table");
  table(traits, ["trait", "recorded", "share", "as a range", "left", "right"],
    s.traits.map((t) => [t.trait_id, t.recorded, fixed(100 * t.share, 0) + "%", t.as_range, t.left, t.right]),
    [false, true, true, true, true, true]);
  byTrait.appendChild(traits);
  out.appendChild(byTrait);
  if (r.body.notes.length) {
    out.appendChild(el("h3", "To look at before trusting the results"));
    const ul = el("ul");
    r.body.notes.forEach((n) => ul.appendChild(el("li", n)));
    out.appendChild(ul);
  }
  settingsFor(r.body);
}

function settingsFor(t) {
  const group = $("group-by");
  group.replaceChildren();
  group.appendChild(new Option(t.has_group_column ? "the column `group`" : "none", ""));
  t.columns.forEach((c) => group.appendChild(new Option(c, c)));
  checkboxes($("by-sex"), t.columns, "by-sex-");
  $("by-sex-field").hidden = t.columns.length === 0;
  $("settings-step").hidden = false;
}

// 2. The analysis.
async function run(event) {
  event.preventDefault();
  if (!state.table) return;
  const options = {
    prior: $("prior").value,
    priors: $("priors").value,
    thresholds: $("thresholds").value,
    group_by: $("group-by").value,
    sides: $("sides").value,
    by_sex: Array.from(document.querySelectorAll("#by-sex input:checked")).map((b) => b.value),
    life_table_classes: $("life-table-classes").value,
    age_classes: $("age-classes").value,
    hazard_ages: $("hazard-ages").value,
    correlation_check: $("correlation-check").value,
    reference_ratio: Number($("reference-ratio").value || 105),
    draws: $("draws").value ? Number($("draws").value) : null,
    recalibrate: $("recalibrate").checked,
    seed: Number($("seed").value || 1),
  };
  const modelFile = $("model-file").files[0];
  if (modelFile) {
    options.model_name = modelFile.name;
    options.model_yaml = await modelFile.text();
  }
  const scaleFile = $("scale-map-file").files[0];
  if (scaleFile) {
    options.scale_map_name = scaleFile.name;
    options.scale_map_yaml = await scaleFile.text();
  }
  const mapping = currentMapping();
  if (Object.keys(mapping.columns).length) options.columns = mapping.columns;
  if (mapping.not_recorded.length) options.not_recorded = mapping.not_recorded;
  const button = $("run");
  button.disabled = true;
  $("run-status").textContent = "Running the analysis";
  $("run-status").className = "busy";
  const started = await ask("api/tables/" + state.table.table + "/start", {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify(options),
  });
  let r = started;
  if (started.status === 202) {
    // Poll the analysis until it answers, showing its stage and how far it has got.
    const bar = $("run-progress");
    bar.hidden = false;
    for (;;) {
      await new Promise((done) => setTimeout(done, 250));
      r = await ask("api/jobs/" + started.body.job);
      if (r.status !== 202) break;
      $("run-status").textContent = "Running: " + r.body.stage;
      bar.max = Math.max(1, r.body.steps);
      bar.value = Math.min(r.body.done, bar.max);
    }
    bar.hidden = true;
  }
  button.disabled = false;
  $("run-status").className = "";
  if (!r.ok) {
    showProblems($("run-status"), r.body || { error: "The server answered " + r.status + "." });
    return;
  }
  $("run-status").textContent = "Done.";
  state.results = r.body;
  showResults(r.body);
}

// 3. The results.
function showResults(r) {
  $("results-step").hidden = false;
  const cautions = $("cautions");
  cautions.replaceChildren();
  r.cautions.forEach((c) => cautions.appendChild(el("li", c)));
  const p = r.proportion_female;
  const head = $("headline");
  head.replaceChildren();
  head.appendChild(el("p", "Proportion female (" + p.model + "): " + fixed(p.mean, 3) + ", 95% interval " + fixed(p.lo, 3) + " to " + fixed(p.hi, 3) + ". Prior: " + r.prior + "; model: " + r.model + "; " + r.n_estimable + " of " + r.n_individuals + " individuals with usable evidence."));
  head.appendChild(el("p", "Input " + r.input + ", SHA-256 " + r.sha256, "note"));
  table($("categories"), ["category", "individuals"], r.categories.map((c) => [c.category, c.n]), [false, true]);
  // A fixed prior's row would only repeat its value: those are counted under the table.
  const free = r.sensitivity.filter((s, k) => k === 0 || !s.fixed);
  const fixedOnes = r.sensitivity.length - free.length;
  table($("sensitivity"), ["prior", "mean", "95% interval"], free.map((s) => [s.prior, fixed(s.mean, 3), fixed(s.lo, 3) + " to " + fixed(s.hi, 3)]), [false, true, true]);
  const more = $("sensitivity-more");
  more.textContent = fixedOnes ? "and " + fixedOnes + " priors that fix the proportion; every individual under each of them is shown when you open it." : "";
  $("groups-box").hidden = r.groups.length === 0;
  table($("groups"), ["group", "n", "proportion female", "95% interval"], r.groups.map((g) => [g.group, g.n, fixed(g.mean, 3), fixed(g.lo, 3) + " to " + fixed(g.hi, 3)]), [false, true, true, true]);
  const flagged = $("flagged");
  flagged.replaceChildren();
  if (r.flagged.length || r.notes.length) {
    flagged.appendChild(el("h3", "For a person to look at"));
    const ul = el("ul");
    r.flagged.concat(r.notes).forEach((f) => ul.appendChild(el("li", f)));
    flagged.appendChild(ul);
  }
  state.sort = { key: null, down: false };
  drawIndividuals();
  $("detail").hidden = true;
  const figures = $("figures");
  figures.replaceChildren();
  r.figures.forEach((f) => {
    const img = el("img");
    img.src = URL.createObjectURL(new Blob([f.svg], { type: "image/svg+xml" }));
    img.alt = "Figure " + f.name;
    figures.appendChild(img);
  });
  $("download").href = "api/runs/" + r.run + "/outputs.zip";
  $("command").textContent = r.command;
  $("methods").value = r.methods;
}

const columns = [
  ["id", (i) => i.id],
  ["group", (i) => i.group || ""],
  ["P(female)", (i) => i.p_female],
  ["category", (i) => i.category],
  ["log10 LR", (i) => i.log10_lr],
  ["the evidence alone", (i) => i.lr_words],
  ["depends on the prior", (i) => (i.prior_sensitive ? "yes" : "")],
];

function drawIndividuals() {
  const r = state.results;
  const filter = $("filter").value.trim().toLowerCase();
  let rows = r.individuals.map((ind, k) => ({ ind, k }));
  if (filter) {
    rows = rows.filter(({ ind }) => [ind.id, ind.group || "", ind.category, ind.lr_words].join(" ").toLowerCase().includes(filter));
  }
  if (state.sort.key !== null) {
    const get = columns[state.sort.key][1];
    rows.sort((a, b) => {
      const x = get(a.ind), y = get(b.ind);
      const c = x === y ? 0 : x === null ? 1 : y === null ? -1 : x < y ? -1 : 1;
      return state.sort.down ? -c : c;
    });
  }
  const t = $("individuals");
  t.replaceChildren();
  const thead = el("thead");
  const tr = el("tr");
  columns.forEach(([name], c) => {
    const th = el("th", name + (state.sort.key === c ? (state.sort.down ? " \u25be" : " \u25b4") : ""));
    th.addEventListener("click", () => {
      state.sort = { key: c, down: state.sort.key === c ? !state.sort.down : false };
      drawIndividuals();
    });
    tr.appendChild(th);
  });
  thead.appendChild(tr);
  const tbody = el("tbody");
  rows.forEach(({ ind, k }) => {
    const row = el("tr");
    row.dataset.k = k;
    [ind.id, ind.group || "", probability(ind.p_female), ind.category, fixed(ind.log10_lr, 2), ind.lr_words, ind.prior_sensitive ? "yes" : ""]
      .forEach((c, i) => row.appendChild(el("td", c, i === 2 || i === 4 ? "num" : "")));
    row.addEventListener("click", () => showIndividual(k));
    tbody.appendChild(row);
  });
  t.append(thead, tbody);
}

function showIndividual(k) {
  const ind = state.results.individuals[k];
  document.querySelectorAll("#individuals tbody tr").forEach((tr) => tr.classList.toggle("chosen", Number(tr.dataset.k) === k));
  const d = $("detail");
  d.replaceChildren();
  d.hidden = false;
  d.appendChild(el("h3", "Why " + ind.id + " is " + ind.category));
  if (!ind.estimable) {
    d.appendChild(el("p", "No usable evidence survives" + (ind.note ? " (" + ind.note + ")" : "") + ": not estimable, kept in every output."));
  } else {
    d.appendChild(el("p", "All the evidence: log10 likelihood ratio " + fixed(ind.log10_lr, 2) + " (" + ind.lr_words + "); P(female) " + probability(ind.p_female) + " under the " + state.results.prior + " prior."));
  }
  if (ind.category_note) d.appendChild(el("p", ind.category_note, "note"));
  const regions = el("table");
  table(regions, ["body region", "status", "log10 LR", "in words", "traits that entered", "note"], ind.regions.map((g) => [
    g.region, g.status.replace(/_/g, " "), fixed(g.log10_lr, 2), g.words, g.traits.join(", "), g.note,
  ]), [false, false, true, false, false, false]);
  d.appendChild(el("h4", "Evidence by body region (likelihood ratio female:male, no prior)"));
  d.appendChild(regions);
  const under = el("table");
  table(under, ["prior", "P(female)", "category"], ind.under_priors.map((u) => [u.prior, probability(u.p_female), u.category]), [false, true, false]);
  d.appendChild(el("h4", "Under every prior of the set"));
  d.appendChild(under);
  d.appendChild(el("p", "An estimate, not an identification; biological sex is not gender.", "note"));
}

// The one-case form.
async function caseForm(priors) {
  const r = await ask("api/catalogue");
  if (!r.ok) return;
  const box = $("case-traits");
  box.replaceChildren();
  const regions = [];
  r.body.traits.forEach((t) => { if (!regions.includes(t.region)) regions.push(t.region); });
  regions.forEach((region) => {
    const fs = el("fieldset", null, "field");
    fs.appendChild(el("legend", region));
    r.body.traits.filter((t) => t.region === region).forEach((t) => {
      const sides = t.bilateral ? [["_l", "left"], ["_r", "right"]] : [["", ""]];
      sides.forEach(([suffix, side]) => {
        const id = t.id + suffix;
        const line = el("div", null, "case-line");
        const label = el("label", t.name + (side ? ", " + side : "") + (t.kind === "measurement" ? " (" + t.scale.unit + ")" : ""));
        label.htmlFor = "case-" + id;
        let input;
        if (t.kind === "grade") {
          input = el("select");
          input.appendChild(new Option("not recorded", ""));
          for (let g = t.scale.lowest; g <= t.scale.highest; g++) input.appendChild(new Option(String(g), String(g)));
        } else {
          input = el("input");
          input.inputMode = "decimal";
          if (t.kind === "measurement") input.placeholder = t.scale.low + " to " + t.scale.high;
        }
        input.id = "case-" + id;
        input.dataset.column = id;
        input.title = t.definition + " (" + t.source + ")";
        line.append(label, " ", input);
        fs.appendChild(line);
      });
    });
    box.appendChild(fs);
  });
  checkboxes($("case-priors"), priors, "case-prior-");
}

async function weighCase(event) {
  event.preventDefault();
  const values = {};
  document.querySelectorAll("#case-traits [data-column]").forEach((i) => { if (i.value.trim()) values[i.dataset.column] = i.value.trim(); });
  const form = {
    values,
    age: $("case-age").value,
    priors: Array.from(document.querySelectorAll("#case-priors input:checked")).map((b) => b.value),
    case_number: $("case-number").value,
    analyst: $("case-analyst").value,
    reviewer: $("case-reviewer").value,
  };
  const r = await ask("api/case", { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(form) });
  const problems = $("case-problems");
  problems.replaceChildren();
  if (!r.ok) {
    $("case-result").hidden = true;
    showProblems(problems, r.body || { error: "The server answered " + r.status + "." });
    return;
  }
  const c = r.body.report;
  $("case-result").hidden = false;
  const cautions = $("case-cautions");
  cautions.replaceChildren();
  r.body.cautions.forEach((x) => cautions.appendChild(el("li", x)));
  $("case-headline").textContent = c.estimable
    ? "Likelihood ratio female:male over all the evidence: " + r.body.ratio + " (log10 " + fixed(c.log10_lr, 2) + "), " + c.support + "."
    : "No usable evidence: nothing was recorded that the model can use.";
  table($("case-regions"), ["body region", "status", "log10 LR", "in words"], c.regions.map((g) => [g.block, g.status.replace(/_/g, " "), g.status === "used" ? fixed(g.log10_lr, 2) : "–", g.support]), [false, false, true, false]);
  const alone = [];
  c.regions.forEach((g) => g.traits.forEach((t) => alone.push([g.block, t.name, t.side || "", t.recorded, t.log10_lr_alone === null ? "–" : fixed(t.log10_lr_alone, 2)])));
  table($("case-traits-alone"), ["body region", "trait", "side", "recorded", "log10 LR alone"], alone, [false, false, false, false, true]);
  const under = $("case-under");
  under.replaceChildren();
  if (c.under_priors.length) {
    under.appendChild(el("h3", "Probability of female under the priors ticked"));
    const t = el("table");
    table(t, ["prior", "prior probability of female", "P(female)", "category"], c.under_priors.map((u) => [u.prior, fixed(u.prior_female, 3), probability(u.p_female), u.category]), [false, true, true, false]);
    under.appendChild(t);
    under.appendChild(el("p", "The category depends on the prior; the words of the likelihood ratio describe the evidence alone.", "note"));
  }
  $("case-md").href = URL.createObjectURL(new Blob([r.body.markdown], { type: "text/markdown" }));
  $("case-html").href = URL.createObjectURL(new Blob([r.body.html], { type: "text/html" }));
}

async function about() {
  const r = await ask("api/about");
  if (!r.ok) return;
  const prior = $("prior");
  r.body.priors.forEach((p) => prior.appendChild(new Option(p, p, p === "flat", p === "flat")));
  caseForm(r.body.priors);
  $("footer-cautions").textContent = "tessera " + r.body.version + ". " + r.body.cautions.join(" ");
}

$("file").addEventListener("change", (e) => { if (e.target.files[0]) load(e.target.files[0]); });
const drop = $("drop");
drop.addEventListener("dragover", (e) => { e.preventDefault(); drop.classList.add("over"); });
drop.addEventListener("dragleave", () => drop.classList.remove("over"));
drop.addEventListener("drop", (e) => {
  e.preventDefault();
  drop.classList.remove("over");
  if (e.dataTransfer.files[0]) load(e.dataTransfer.files[0]);
});
$("settings").addEventListener("submit", run);
$("apply-mapping").addEventListener("click", applyMapping);
$("case-form").addEventListener("submit", weighCase);
$("save-profile").addEventListener("click", saveProfile);
$("filter").addEventListener("input", drawIndividuals);
$("copy-methods").addEventListener("click", async () => {
  try {
    await navigator.clipboard.writeText($("methods").value);
  } catch (_) {
    $("methods").select();
    document.execCommand("copy");
  }
});
about();
