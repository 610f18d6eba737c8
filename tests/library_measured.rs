//! The reference library against real measured spectra: the 64 gas-phase files of
//! `tests/fixtures/ir/measured-gas/` (from the PyPI package `jcamp` 1.3.2; origins in
//! `tests/fixtures/ir/SOURCES.md`), compounds and formulas from `tests/corpus/expected.tsv`.
//!
//! - With its own file in the library, every spectrum must be its own first hit.
//! - With its own file left out, the search must not report it; where the corpus holds a
//!   second file of the same compound (two sources), that file must come first. The rest
//!   is judged honestly and printed: how often the first hit is a compound of the same
//!   functional-group class (same set of group families in `expected.tsv`).

#![allow(clippy::unwrap_used, clippy::expect_used)] // a test panics on purpose

use quiddity::library::{
    search, Builder, LibraryIndex, Phase, Query, SearchOptions, SourceFile, Stamp,
};
use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;

const DIR: &str = "tests/fixtures/ir/measured-gas";

struct Expected {
    compound: String,
    formula: String,
    groups: String,
}

fn expected() -> BTreeMap<String, Expected> {
    let text = std::fs::read_to_string("tests/corpus/expected.tsv").expect("expected.tsv");
    let mut out = BTreeMap::new();
    for line in text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
    {
        let cols: Vec<&str> = line.split('\t').collect();
        let file = cols[0].rsplit('/').next().unwrap().to_owned();
        out.insert(
            file,
            Expected {
                compound: cols[1].to_owned(),
                formula: cols[2].to_owned(),
                groups: cols[3].to_owned(),
            },
        );
    }
    out
}

/// A file name and its bytes.
type FileBytes = (String, Vec<u8>);

/// The library, the readable files, the duplicates left out.
type Corpus = (LibraryIndex, Vec<FileBytes>, Vec<(String, String)>);

/// The library of the corpus, every readable file's bytes, and the duplicates left out as
/// `(file, the file it repeats)`.
fn build() -> Corpus {
    let mut files: Vec<String> = std::fs::read_dir(DIR)
        .expect("corpus")
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".jdx"))
        .collect();
    files.sort();
    assert_eq!(files.len(), 64, "the corpus holds 64 files");
    let mut builder = Builder::new(None);
    let mut bytes_of = Vec::new();
    for name in &files {
        let bytes = std::fs::read(Path::new(DIR).join(name)).unwrap();
        let file = SourceFile {
            path: name.clone(),
            origin: format!("{DIR}/{name}"),
            stamp: Stamp::default(),
            side: None,
        };
        builder.add(&file, &bytes, None);
        bytes_of.push((name.clone(), bytes));
    }
    let (index, diagnostics, stats) = builder.finish();
    // One file cannot be read, and is reported with its place while the rest are used:
    // the sulfur hexafluoride file's ##DELTAX=0.0625 disagrees by 3.7 % with its own
    // (LASTX − FIRSTX)/(NPOINTS − 1), which the JCAMP-DX reader refuses.
    let errors: Vec<String> = diagnostics
        .iter()
        .filter(|d| d.is_error())
        .map(ToString::to_string)
        .collect();
    assert_eq!(errors.len(), 2, "{errors:?}");
    assert!(errors[0].contains("sulphur-hexafluoride.jdx: unreadable reference spectrum"));
    assert!(errors[1].contains("sulphur-hexafluoride.jdx:29:1: DELTAX=0.0625"));
    // Two files hold the same data under different headers (titles "Butane" and
    // "n-Butane", the same 3 327 ordinates): the second is a duplicate spectrum.
    let duplicates: Vec<(String, String)> = diagnostics
        .iter()
        .filter(|d| d.message.contains("(duplicate spectrum)"))
        .map(|d| {
            let file = d.origin.rsplit('/').next().unwrap().to_owned();
            let first = d.message.trim_start_matches("the same spectrum as ");
            (file, first.split(' ').next().unwrap().to_owned())
        })
        .collect();
    assert_eq!(
        duplicates,
        [("n-butane.jdx".to_owned(), "butane.jdx".to_owned())]
    );
    assert_eq!((stats.n_indexed, stats.n_left_out), (63, 2));
    assert_eq!(index.len(), 62);
    let readable = bytes_of
        .into_iter()
        .filter(|(name, _)| !name.starts_with("sulphur-hexafluoride"))
        .collect();
    (index, readable, duplicates)
}

/// The group families of an expected.tsv group list (`alcohol_primary:1` → `alcohol`).
fn class(groups: &str) -> BTreeSet<String> {
    if groups == "-" {
        return BTreeSet::new();
    }
    groups
        .split(',')
        .map(|g| {
            let id = g.split(':').next().unwrap();
            let family = ["alcohol", "ester", "ether", "ketone", "alkyne"]
                .into_iter()
                .find(|f| id.starts_with(f));
            family.unwrap_or(id).to_owned()
        })
        .collect()
}

#[test]
fn formulas_and_phases_come_from_the_files_own_headers() {
    let (index, _, _) = build();
    let expected = expected();
    let mut checked = 0;
    for e in index.entries() {
        assert_eq!(
            e.meta.phase(),
            Phase::Vapour,
            "{}: ##STATE= says gas or vapour",
            e.path
        );
        if let Some(x) = expected.get(&e.path) {
            assert_eq!(
                e.meta.formula.as_deref(),
                Some(x.formula.as_str()),
                "{}",
                e.path
            );
            checked += 1;
        } else {
            assert!(
                e.meta.formula.is_some(),
                "{}: the inorganic ones state a formula too",
                e.path
            );
        }
    }
    assert_eq!(
        checked, 55,
        "56 organic files, one of them a duplicate left out"
    );
}

#[test]
fn each_spectrum_is_its_own_first_hit_and_never_its_own_hit_when_left_out() {
    let (index, files, duplicates) = build();
    assert_eq!(files.len(), 63);
    let expected = expected();
    let mut same_class = 0;
    let mut judged = 0;
    let mut twins_first = Vec::new();
    let mut lines = Vec::new();
    for (name, bytes) in &files {
        let grid = quiddity::library::grid_from_bytes(bytes, name).expect("grid");
        let query = Query::new(grid, Phase::Vapour);
        let with = search(&index, &query, &SearchOptions::default());
        let own = match index.position(name) {
            Some(i) => i,
            None => {
                // A duplicate left out of the library: the file it repeats is its hit.
                let (_, first) = duplicates
                    .iter()
                    .find(|(d, _)| d == name)
                    .expect("a duplicate");
                index.position(first).expect("indexed")
            }
        };
        // In: first, with a similarity of 1.
        assert_eq!(with.hits[0].entry, own, "{name}: its own file ranks first");
        assert!(
            with.hits[0].score > 0.9999,
            "{name}: {}",
            with.hits[0].score
        );
        // Out: never reported, nothing crashes; judged against the expected answers.
        let out = search(
            &index,
            &query,
            &SearchOptions {
                exclude: Some(own),
                ..SearchOptions::default()
            },
        );
        assert!(
            !out.hits.is_empty(),
            "{name}: other references are compared"
        );
        assert!(
            out.hits.iter().all(|h| h.entry != own),
            "{name}: left out, not reported"
        );
        assert!(
            out.hits[0].score < 0.9999,
            "{name}: no other file holds its data"
        );
        let first = &index.entries()[out.hits[0].entry];
        if let (Some(me), Some(top)) = (expected.get(name), expected.get(&first.path)) {
            judged += 1;
            let same = class(&me.groups) == class(&top.groups);
            if same {
                same_class += 1;
            }
            if me.compound == top.compound {
                twins_first.push(name.clone());
            }
            lines.push(format!(
                "{name:<36} -> {:<36} {:.3} {}",
                first.path,
                out.hits[0].score,
                if me.compound == top.compound {
                    "same compound"
                } else if same {
                    "same class"
                } else {
                    ""
                }
            ));
        }
    }
    for l in &lines {
        println!("{l}");
    }
    println!(
        "leave-one-out: first hit of the same functional-group class for {same_class} of {judged} organic spectra"
    );
    // Files of one compound from two sources match each other first (expected.tsv names
    // the compound of each file): 1,3-butadiene, 1,3- and 1,4-dimethylbenzene.
    let mut by_compound: BTreeMap<&str, Vec<&String>> = BTreeMap::new();
    for (file, e) in &expected {
        if index.position(file).is_some() {
            by_compound
                .entry(e.compound.as_str())
                .or_default()
                .push(file);
        }
    }
    let twins: Vec<&String> = by_compound
        .values()
        .filter(|files| files.len() > 1)
        .flatten()
        .copied()
        .collect();
    assert_eq!(
        twins.len(),
        6,
        "three compounds with two distinct files each: {twins:?}"
    );
    for file in twins {
        assert!(
            twins_first.contains(file),
            "{file}: its twin should come first\n{}",
            lines.join("\n")
        );
    }
    // Not a promise of the method, a floor under it: most first hits share the class.
    assert!(2 * same_class > judged, "{same_class} of {judged}");
}
