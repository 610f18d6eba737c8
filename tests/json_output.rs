//! The JSON contract (`solve --json`, `--report x.json`; docs/json-output.md) on every demo
//! case: the page documents every field the document holds and nothing it never holds;
//! every reason's rule reference resolves to a real catalogue entry at its file and line;
//! every case reference resolves to a real place in the case, and that place in the case
//! file holds the value; `--json` and the JSON report are the same bytes.

#[path = "support/cli.rs"]
mod cli;

use quiddity::cli::casefile::{load_case, report_text, solve, LoadOptions};
use quiddity::engine::SolveOptions;
use quiddity::report::json_view::{SCHEMA, SCHEMA_VERSION};
use quiddity::report::Format;
use quiddity::rules::{embedded_catalogue, Catalogue, RuleRef};
use serde_json::Value;
use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// Fields whose keys are catalogue group ids, not field names (the page says "map").
const MAP_FIELDS: [&str; 6] = [
    "candidates[].groups",
    "candidates[].families",
    "candidates[].alternatives",
    "near_misses[].groups",
    "conclusion.accepted",
    "library.hits[].groups",
];

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Every demo case with its JSON document, as `--report x.json` writes it.
fn demo_documents() -> Vec<(String, Value)> {
    let catalogue = embedded_catalogue().expect("catalogue");
    let mut paths: Vec<PathBuf> = std::fs::read_dir(root().join("cases"))
        .expect("cases/")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|e| e == "yaml"))
        .collect();
    paths.sort();
    paths
        .iter()
        .map(|p| {
            let name = format!(
                "cases/{}",
                p.file_name().unwrap_or_default().to_string_lossy()
            );
            let loaded = load_case(Path::new(&name), &LoadOptions::default())
                .unwrap_or_else(|e| panic!("{name}: {e:?}"));
            let outcome = solve(&loaded, &catalogue, &SolveOptions::default());
            let text = report_text(&loaded, &outcome, Format::Json, None);
            let doc = serde_json::from_str(&text).unwrap_or_else(|e| panic!("{name}: {e}"));
            (name, doc)
        })
        .collect()
}

/// The field paths a document holds (`candidates[].bands[].at`); maps end the walk.
fn field_paths(v: &Value, path: &str, out: &mut BTreeSet<String>) {
    if !path.is_empty() && !path.ends_with("[]") {
        out.insert(path.to_owned());
    }
    if MAP_FIELDS.contains(&path) {
        return;
    }
    match v {
        Value::Object(m) => {
            for (k, x) in m {
                let p = if path.is_empty() {
                    k.clone()
                } else {
                    format!("{path}.{k}")
                };
                field_paths(x, &p, out);
            }
        }
        Value::Array(items) => {
            for x in items {
                if x.is_object() || x.is_array() {
                    field_paths(x, &format!("{path}[]"), out);
                }
            }
        }
        _ => {}
    }
}

/// The paths in the first column of the page's field tables, and those marked as not
/// held by any demo case.
fn documented_paths() -> (BTreeSet<String>, BTreeSet<String>) {
    let page = std::fs::read_to_string(root().join("docs/json-output.md")).expect("page");
    let mut all = BTreeSet::new();
    let mut not_in_demos = BTreeSet::new();
    let fields = page.split("## Fields").nth(1).expect("a Fields section");
    for line in fields.lines() {
        let Some(rest) = line.strip_prefix("| `") else {
            continue;
        };
        let Some((path, _)) = rest.split_once('`') else {
            continue;
        };
        all.insert(path.to_owned());
        if line.contains("(not in the demo cases)") {
            not_in_demos.insert(path.to_owned());
        }
    }
    (all, not_in_demos)
}

#[test]
fn the_page_documents_every_field_and_only_fields_that_exist() {
    let mut emitted = BTreeSet::new();
    for (_, doc) in demo_documents() {
        field_paths(&doc, "", &mut emitted);
    }
    // One document with a timestamp, for the field only `--timestamp` adds.
    let catalogue = embedded_catalogue().expect("catalogue");
    let loaded = load_case(
        Path::new("cases/lab-0105-ester.yaml"),
        &LoadOptions::default(),
    )
    .expect("case");
    let outcome = solve(&loaded, &catalogue, &SolveOptions::default());
    let stamped = report_text(
        &loaded,
        &outcome,
        Format::Json,
        Some("2026-01-01T00:00:00Z".into()),
    );
    field_paths(
        &serde_json::from_str(&stamped).expect("json"),
        "",
        &mut emitted,
    );
    let (documented, not_in_demos) = documented_paths();
    let undocumented: Vec<_> = emitted.difference(&documented).collect();
    assert!(
        undocumented.is_empty(),
        "fields missing from docs/json-output.md: {undocumented:?}"
    );
    let never: Vec<_> = documented
        .difference(&emitted)
        .filter(|p| !not_in_demos.contains(*p))
        .collect();
    assert!(
        never.is_empty(),
        "documented but no demo case holds them (mark them \"(not in the demo cases)\" if they are real): {never:?}"
    );
    assert!(emitted.len() >= 150, "only {} fields", emitted.len());
}

#[test]
fn every_document_names_its_schema_and_version() {
    for (name, doc) in demo_documents() {
        assert_eq!(doc["schema"], SCHEMA, "{name}");
        assert_eq!(
            doc["schema_version"].as_u64(),
            Some(u64::from(SCHEMA_VERSION)),
            "{name}"
        );
        let kinds: Vec<&str> = doc["cautions"]
            .as_array()
            .expect("cautions")
            .iter()
            .filter_map(|c| c["kind"].as_str())
            .collect();
        // The usual cautions of the trade (common practice): a screening lead, confirm
        // with a reference standard, treat the unknown as hazardous, local regulations.
        for k in [
            "screening_lead",
            "confirm_with_reference",
            "treat_as_hazardous",
            "local_regulations",
        ] {
            assert!(kinds.contains(&k), "{name}: caution {k} missing: {kinds:?}");
        }
    }
}

/// What a walk of one document found.
#[derive(Default)]
struct Resolved {
    /// Rule references resolved, by kind.
    rules: BTreeMap<String, usize>,
    /// Case references resolved, by kind.
    cases: BTreeMap<String, usize>,
    /// Reasons seen, by kind.
    reasons: BTreeMap<String, usize>,
    /// Every reference that did not resolve, with its path.
    problems: Vec<String>,
}

/// The `(file, line)` of a catalogue entry named by a rule reference.
fn catalogue_place(c: &Catalogue, kind: &str, id: &str, index: Option<usize>) -> Option<RuleRef> {
    let group = || c.group(id);
    match kind {
        "group" => group().map(|g| g.defined_at.clone()),
        "group_band" => group()?.bands.get(index?).map(|b| b.defined_at.clone()),
        "group_ms" => group()?.ms.get(index?).map(|m| m.defined_at.clone()),
        "group_check" => group()?.checks.get(index?).map(|k| k.defined_at.clone()),
        "skeleton" => c
            .skeleton
            .iter()
            .find(|s| s.id == id)
            .map(|s| s.band.defined_at.clone()),
        "pattern" => c
            .patterns
            .iter()
            .find(|p| p.id == id)
            .map(|p| p.defined_at.clone()),
        "artefact" => c
            .artefacts
            .iter()
            .chain(&c.hydrate_bands)
            .find(|a| a.id == id)
            .map(|a| a.defined_at.clone()),
        _ => None,
    }
}

fn check_rule(r: &Value, path: &str, c: &Catalogue, out: &mut Resolved) {
    let kind = r["kind"].as_str().unwrap_or("?");
    let id = r["id"].as_str().unwrap_or("?");
    let index = r["index"].as_u64().map(|i| i as usize);
    *out.rules.entry(kind.to_owned()).or_default() += 1;
    if kind == "built_in" {
        if !quiddity::engine::BUILT_IN_RULES.contains(&id) || !r["file"].is_null() {
            out.problems
                .push(format!("{path}: unknown built-in rule {r}"));
        }
        return;
    }
    let Some(place) = catalogue_place(c, kind, id, index) else {
        out.problems
            .push(format!("{path}: no catalogue entry {kind} {id} {index:?}"));
        return;
    };
    let (file, line) = (r["file"].as_str(), r["line"].as_u64());
    if file != Some(place.file.as_str()) || line != Some(place.line as u64) {
        out.problems.push(format!(
            "{path}: {kind} {id} is at {}:{}, the reference says {file:?}:{line:?}",
            place.file, place.line
        ));
        return;
    }
    let text = std::fs::read_to_string(root().join("rules").join(&place.file)).unwrap_or_default();
    if text
        .lines()
        .nth(place.line.saturating_sub(1))
        .is_none_or(|l| l.trim().is_empty())
    {
        out.problems.push(format!(
            "{path}: rules/{}:{} holds no entry",
            place.file, place.line
        ));
    }
}

fn check_case_ref(r: &Value, path: &str, doc: &Value, out: &mut Resolved) {
    let e = &doc["evidence"];
    let kind = r["kind"].as_str().unwrap_or("?");
    let index = r["index"].as_u64().map(|i| i as usize);
    let listed = |list: &str| index.and_then(|i| e[list].as_array()?.get(i)).is_some();
    let real = match kind {
        "formula" => e["formula"].is_object(),
        "band" => listed("bands"),
        "residual_band" => listed("residual_bands"),
        "band_list" => e["ir_window"].is_array(),
        "molecular_ion" | "m_plus_1" | "m_plus_2" => e[kind].is_object(),
        "fragment" => listed("fragments"),
        _ => false,
    };
    *out.cases.entry(kind.to_owned()).or_default() += 1;
    if !real {
        out.problems
            .push(format!("{path}: {r} names no place in the case"));
    }
}

/// Resolves every reference in `v`, a part of `doc` at `path`.
fn walk(v: &Value, path: &str, doc: &Value, c: &Catalogue, out: &mut Resolved) {
    match v {
        Value::Object(m) => {
            if m.contains_key("text") && m.contains_key("rule") && m.contains_key("case") {
                let kind = m["kind"].as_str().unwrap_or("?");
                *out.reasons.entry(kind.to_owned()).or_default() += 1;
                let ruleless = kind == "unexplained";
                if m["rule"].is_null() != ruleless {
                    out.problems
                        .push(format!("{path}: a {kind} reason with rule {}", m["rule"]));
                }
                // What each kind of reason must point at in the case.
                let needs: &[&str] = match kind {
                    "band_seen" | "unexplained" => &["band", "residual_band"],
                    "ms_clue_seen" => &["fragment"],
                    "allowed_absent" | "support_missing" | "missing_band" => &["band_list"],
                    "bonds" => &["formula", "molecular_ion"],
                    _ => &[],
                };
                let points = m["case"]
                    .as_array()
                    .into_iter()
                    .flatten()
                    .any(|r| needs.contains(&r["kind"].as_str().unwrap_or("")));
                if !needs.is_empty() && !points {
                    out.problems.push(format!(
                        "{path}: a {kind} reason points at none of {needs:?}"
                    ));
                }
            }
            for (k, x) in m {
                let p = format!("{path}.{k}");
                match (k.as_str(), x) {
                    ("rule", Value::Object(_)) => check_rule(x, &p, c, out),
                    ("case" | "item", Value::Object(_)) => check_case_ref(x, &p, doc, out),
                    ("rules", Value::Array(items)) => {
                        for (i, r) in items.iter().enumerate() {
                            check_rule(r, &format!("{p}[{i}]"), c, out);
                        }
                    }
                    ("case", Value::Array(items)) => {
                        for (i, r) in items.iter().enumerate() {
                            check_case_ref(r, &format!("{p}[{i}]"), doc, out);
                        }
                    }
                    _ => walk(x, &p, doc, c, out),
                }
            }
        }
        Value::Array(items) => {
            for (i, x) in items.iter().enumerate() {
                walk(x, &format!("{path}[{i}]"), doc, c, out);
            }
        }
        _ => {}
    }
}

/// A number as a case file writes it (`1684`, `4.4`).
fn written(v: &Value) -> String {
    match v.as_f64() {
        Some(x) if x.fract() == 0.0 => format!("{}", x as i64),
        Some(x) => format!("{x}"),
        None => v.as_str().unwrap_or_default().to_owned(),
    }
}

/// Every place of `evidence` in the case file holds the value it states there; a
/// picked band's place is the spectrum file the case names.
fn check_places(doc: &Value, out: &mut Resolved) {
    let e = &doc["evidence"];
    let origin = e["origin"].as_str().unwrap_or_default();
    let case_text = std::fs::read_to_string(root().join(origin)).unwrap_or_default();
    let mut placed: Vec<(&Value, &Value)> = Vec::new();
    for key in ["molecular_ion", "m_plus_1", "m_plus_2"] {
        if e[key].is_object() {
            placed.push((&e[key]["value"], &e[key]["place"]));
        }
    }
    if e["formula"].is_object() {
        placed.push((&e["formula"]["written"], &e["formula"]["place"]));
    }
    for f in e["fragments"].as_array().into_iter().flatten() {
        placed.push((&f["mz"], &f["place"]));
    }
    for b in e["bands"].as_array().into_iter().flatten() {
        if b["source"] == "picked" {
            let dir = Path::new(origin).parent().unwrap_or(Path::new(""));
            let spectrum = dir.join(e["spectrum_file"].as_str().unwrap_or("?"));
            let place = b["place"].as_str().unwrap_or_default();
            if !place.starts_with(&spectrum.display().to_string())
                || !root().join(&spectrum).is_file()
            {
                out.problems.push(format!(
                    "picked band {b} is not in the spectrum file {spectrum:?}"
                ));
            }
        } else {
            placed.push((&b["at"], &b["place"]));
        }
    }
    for (value, place) in placed {
        let place = place.as_str().unwrap_or_default();
        let mut parts = place.rsplitn(3, ':');
        let (_col, line, file) = (parts.next(), parts.next(), parts.next());
        let line: usize = line.and_then(|l| l.parse().ok()).unwrap_or(0);
        let holds = file == Some(origin)
            && case_text
                .lines()
                .nth(line.saturating_sub(1))
                .is_some_and(|l| l.contains(&written(value)));
        if !holds {
            out.problems
                .push(format!("{place} does not hold {value} in {origin}"));
        }
    }
}

fn resolve(doc: &Value, catalogue: &Catalogue) -> Resolved {
    let mut out = Resolved::default();
    walk(doc, "", doc, catalogue, &mut out);
    check_places(doc, &mut out);
    let e = &doc["evidence"];
    for (ci, c) in doc["candidates"]
        .as_array()
        .into_iter()
        .flatten()
        .enumerate()
    {
        for b in c["bands"].as_array().into_iter().flatten() {
            let i = b["case"]["index"].as_u64().unwrap_or(u64::MAX) as usize;
            let list = match b["case"]["kind"].as_str() {
                Some("residual_band") => "residual_bands",
                _ => "bands",
            };
            if e[list].get(i).map(|x| &x["at"]) != Some(&b["at"]) {
                out.problems.push(format!(
                    "candidates[{ci}]: band {b} is not evidence.{list}[{i}]"
                ));
            }
        }
    }
    // A residual band that is one of the case's own is that band.
    for r in e["residual_bands"].as_array().into_iter().flatten() {
        if let Some(i) = r["case_band"].as_u64() {
            let own = &e["bands"][i as usize];
            if own["at"] != r["at"] || own["place"] != r["place"] {
                out.problems
                    .push(format!("residual band {r} is not evidence.bands[{i}]"));
            }
        }
    }
    out
}

#[test]
fn every_reference_resolves_to_a_catalogue_rule_and_a_place_in_the_case() {
    let catalogue = embedded_catalogue().expect("catalogue");
    let mut rules: BTreeMap<String, usize> = BTreeMap::new();
    let mut cases: BTreeMap<String, usize> = BTreeMap::new();
    let mut reasons: BTreeMap<String, usize> = BTreeMap::new();
    let docs = demo_documents();
    for (name, doc) in &docs {
        let r = resolve(doc, &catalogue);
        assert!(r.problems.is_empty(), "{name}:\n{}", r.problems.join("\n"));
        for (k, n) in r.rules {
            *rules.entry(k).or_default() += n;
        }
        for (k, n) in r.cases {
            *cases.entry(k).or_default() += n;
        }
        for (k, n) in r.reasons {
            *reasons.entry(k).or_default() += n;
        }
    }
    // Not vacuous: the demo cases exercise each kind of reference many times.
    assert!(docs.len() >= 18, "{} demo cases", docs.len());
    for kind in [
        "group",
        "group_band",
        "group_ms",
        "group_check",
        "skeleton",
        "artefact",
    ] {
        assert!(
            rules.get(kind).copied().unwrap_or(0) >= 3,
            "rule references of kind {kind}: {rules:?}"
        );
    }
    assert!(rules.contains_key("built_in"), "{rules:?}");
    assert!(rules.values().sum::<usize>() >= 500, "{rules:?}");
    for kind in ["formula", "band", "band_list", "molecular_ion", "fragment"] {
        assert!(
            cases.get(kind).copied().unwrap_or(0) >= 3,
            "case references of kind {kind}: {cases:?}"
        );
    }
    assert!(cases.values().sum::<usize>() >= 500, "{cases:?}");
    for kind in [
        "band_seen",
        "ms_clue_seen",
        "unexplained",
        "missing_band",
        "relation",
    ] {
        assert!(
            reasons.get(kind).copied().unwrap_or(0) >= 3,
            "reasons of kind {kind}: {reasons:?}"
        );
    }
    assert!(reasons.contains_key("bonds"), "{reasons:?}");
}

#[test]
fn the_checker_catches_a_broken_reference() {
    let catalogue = embedded_catalogue().expect("catalogue");
    let (name, doc) = demo_documents()
        .into_iter()
        .find(|(n, _)| n.ends_with("lab-0101-carbonyl.yaml"))
        .expect("the carbonyl demo");
    assert!(resolve(&doc, &catalogue).problems.is_empty(), "{name}");

    let mut wrong_line = doc.clone();
    let line = &mut wrong_line["candidates"][0]["supporting"][0]["rule"]["line"];
    *line = Value::from(line.as_u64().expect("a line") + 1);
    let p = resolve(&wrong_line, &catalogue).problems;
    assert!(
        p.len() == 1 && p[0].contains("candidates[0].supporting[0].rule"),
        "{p:?}"
    );

    let mut no_such_group = doc.clone();
    no_such_group["ruled_out"][0]["rule"]["id"] = Value::from("ketone_imaginary");
    let p = resolve(&no_such_group, &catalogue).problems;
    assert!(p.len() == 1 && p[0].contains("no catalogue entry"), "{p:?}");

    let mut no_such_band = doc.clone();
    no_such_band["candidates"][0]["weakening"][0]["case"][0]["index"] = Value::from(999);
    let p = resolve(&no_such_band, &catalogue).problems;
    assert!(p.len() == 1 && p[0].contains("names no place"), "{p:?}");

    let mut no_place = doc.clone();
    no_place["candidates"][0]["supporting"][0]["case"] = Value::Array(Vec::new());
    let p = resolve(&no_place, &catalogue).problems;
    assert!(p.len() == 1 && p[0].contains("points at none"), "{p:?}");

    let mut moved_band = doc.clone();
    moved_band["evidence"]["bands"][2]["place"] = Value::from("cases/lab-0101-carbonyl.yaml:14:7");
    let p = resolve(&moved_band, &catalogue).problems;
    assert!(p.len() == 1 && p[0].contains("does not hold"), "{p:?}");
}

#[test]
fn solve_json_and_the_json_report_are_the_same_bytes() {
    let dir = tempfile::tempdir().expect("tempdir");
    for case in [
        "cases/lab-0101-carbonyl.yaml",
        "cases/lab-0114-library.yaml",
    ] {
        let report = dir.path().join("out.json");
        let report_arg = report.display().to_string();
        let out = cli::quiddity(["solve", case, "--json", "--report", report_arg.as_str()]).run();
        out.status_is(0);
        let written = std::fs::read_to_string(&report).expect("report written");
        assert_eq!(out.stdout, written, "{case}");
        assert!(written.contains(&format!("\"schema_version\": {SCHEMA_VERSION}")));
    }
}
