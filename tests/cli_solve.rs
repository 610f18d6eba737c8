//! Black-box tests of `quiddity solve`: stdout JSON shape, stderr places, exit status.

use std::path::Path;
use std::process::{Command, Output};

fn quiddity(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_quiddity"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap_or_else(|e| panic!("cannot run quiddity: {e}"))
}

fn json(out: &Output) -> serde_json::Value {
    serde_json::from_slice(&out.stdout).unwrap_or_else(|e| {
        panic!(
            "stdout is not one JSON document ({e}):\n{}",
            String::from_utf8_lossy(&out.stdout)
        )
    })
}

fn temp_case(name: &str, text: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("quiddity-cli-solve-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap_or_else(|e| panic!("{e}"));
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap_or_else(|e| panic!("{e}"));
    path
}

#[test]
fn every_demo_case_solves_with_the_json_contract() {
    let mut n = 0;
    for entry in std::fs::read_dir(Path::new(env!("CARGO_MANIFEST_DIR")).join("cases"))
        .unwrap_or_else(|e| panic!("{e}"))
    {
        let path = entry.unwrap_or_else(|e| panic!("{e}")).path();
        if path.extension().is_none_or(|e| e != "yaml") {
            continue;
        }
        n += 1;
        let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{e}"));
        assert!(
            text.to_lowercase().contains("invented"),
            "{} must say it is invented",
            path.display()
        );
        let out = quiddity(&["solve", path.to_str().unwrap_or_default(), "--json"]);
        let v = json(&out);
        let candidates = v["candidates"]
            .as_array()
            .unwrap_or_else(|| panic!("candidates array"));
        assert!(v["ruled_out"].is_array() && v["conflicts"].is_array());
        if candidates.is_empty() {
            assert_eq!(out.status.code(), Some(1), "{}", path.display());
            assert!(!v["conflicts"].as_array().unwrap_or(&Vec::new()).is_empty());
        } else {
            assert_eq!(out.status.code(), Some(0), "{}", path.display());
            assert!(v["conflicts"].as_array().is_some_and(|c| c.is_empty()));
            for (i, c) in candidates.iter().enumerate() {
                assert_eq!(c["rank"].as_u64(), Some(i as u64 + 1));
                assert!(
                    c["groups"].is_object() && c["score"].is_number() && c["families"].is_object()
                );
            }
            let scores: Vec<f64> = candidates
                .iter()
                .filter_map(|c| c["score"].as_f64())
                .collect();
            assert!(
                scores.windows(2).all(|w| w[0] >= w[1]),
                "best first: {scores:?}"
            );
        }
    }
    assert!(n >= 4, "expected the demo cases, found {n}");
}

#[test]
fn the_carbonyl_demo_ranks_an_aryl_ketone_first() {
    let out = quiddity(&["solve", "cases/lab-0101-carbonyl.yaml", "--json"]);
    let v = json(&out);
    let top = &v["candidates"][0];
    assert_eq!(top["families"]["ketone"].as_u64(), Some(1), "{top}");
    assert_eq!(top["families"]["aromatic_ring"].as_u64(), Some(1), "{top}");
}

#[test]
fn the_conflict_demo_exits_1_and_names_its_evidence() {
    let out = quiddity(&["solve", "cases/lab-0104-conflict.yaml"]);
    assert_eq!(out.status.code(), Some(1));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("conflict"), "{text}");
    assert!(text.contains("formula C6H14"), "{text}");
    assert!(text.contains("band at 1716"), "{text}");
    assert!(
        text.contains("a screening lead, not an identification"),
        "{text}"
    );
}

#[test]
fn bad_input_exits_2_with_the_place_on_stderr() {
    let path = temp_case(
        "bad.yaml",
        "formula: C3H6O\nir:\n  bands:\n    - { at: 1715, strength: strnog }\n",
    );
    let out = quiddity(&["solve", path.to_str().unwrap_or_default(), "--json"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(out.stdout.is_empty(), "nothing on stdout");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("bad.yaml:4:29: ir.bands[0].strength: unknown strength \"strnog\""),
        "{err}"
    );
    assert!(err.contains("did you mean \"strong\"?"), "{err}");

    let path = temp_case(
        "far.yaml",
        "formula: C3H6O\nir:\n  bands:\n    - { at: 4500, strength: strong }\n",
    );
    let out = quiddity(&["solve", path.to_str().unwrap_or_default()]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("outside 400–4000"));

    let out = quiddity(&["solve", "cases/does-not-exist.yaml"]);
    assert_eq!(out.status.code(), Some(2));

    let out = quiddity(&["solve", "cases/lab-0101-carbonyl.yaml", "--tolerance", "-3"]);
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn max_limits_the_list_and_says_so() {
    let out = quiddity(&[
        "solve",
        "cases/lab-0101-carbonyl.yaml",
        "--json",
        "--max",
        "2",
    ]);
    let v = json(&out);
    assert_eq!(v["candidates"].as_array().map(Vec::len), Some(2));
    assert_eq!(v["list_truncated"].as_bool(), Some(true));
}
