//! Data-driven: every directory under `tests/fixtures/rules-broken/` (except `_base`) is a
//! deliberately broken catalogue with an `expected.txt` holding the exact diagnostics the
//! loader must report (`file:line:column: key path: message`, then any hint). One test
//! walks them all and fails if it finds none. `UPDATE_EXPECT=1 cargo test` rewrites the
//! expected files on purpose; review the diff before committing.

use quiddity::rules::load;
use std::path::Path;

/// The `(name, text)` yaml files of one fixture directory, links followed, name order.
fn fixture_files(dir: &Path) -> Vec<(String, String)> {
    let mut files: Vec<(String, String)> = std::fs::read_dir(dir)
        .expect("fixture directory is readable")
        .map(|e| e.expect("readable entry").path())
        .filter(|p| p.extension().is_some_and(|x| x == "yaml"))
        .map(|p| {
            let name = p
                .file_name()
                .expect("a file name")
                .to_string_lossy()
                .into_owned();
            let text = std::fs::read_to_string(&p).expect("fixture file is readable");
            (name, text)
        })
        .collect();
    files.sort();
    files
}

/// What the loader reports for the files, one diagnostic per line (plus hint lines).
fn report(files: &[(String, String)]) -> String {
    let (_, diagnostics) = load(files.iter().map(|(n, t)| (n.as_str(), t.as_str())));
    let mut out = String::new();
    for d in &diagnostics {
        out.push_str(&d.to_string());
        out.push('\n');
        if let Some(help) = &d.help {
            out.push_str(&format!("  = help: {help}\n"));
        }
    }
    out
}

#[test]
fn every_broken_catalogue_fails_with_its_expected_places() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/rules-broken");
    let mut dirs: Vec<_> = std::fs::read_dir(&root)
        .expect("fixtures exist")
        .map(|e| e.expect("readable entry").path())
        .filter(|p| p.is_dir())
        .filter(|p| {
            !p.file_name()
                .is_some_and(|n| n.to_string_lossy().starts_with('_'))
        })
        .collect();
    dirs.sort();
    assert!(
        dirs.len() >= 10,
        "expected at least 10 broken catalogues, found {}",
        dirs.len()
    );
    let update = std::env::var_os("UPDATE_EXPECT").is_some();
    let mut failures = Vec::new();
    for dir in &dirs {
        let files = fixture_files(dir);
        assert!(!files.is_empty(), "{} holds no yaml files", dir.display());
        let actual = report(&files);
        assert!(
            actual.starts_with("error: "),
            "{} produced no error; a broken fixture must fail",
            dir.display()
        );
        let expected_path = dir.join("expected.txt");
        if update {
            std::fs::write(&expected_path, &actual).expect("expected.txt is writable");
            continue;
        }
        let expected = std::fs::read_to_string(&expected_path).unwrap_or_default();
        if expected != actual {
            failures.push(format!(
                "== {}\n-- expected\n{expected}-- actual\n{actual}",
                dir.display()
            ));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn the_base_of_the_fixtures_is_itself_valid() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/rules-broken/_base");
    let files = fixture_files(&root);
    assert_eq!(report(&files), "");
}
