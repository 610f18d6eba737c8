//! Case-file parsing: every bad input is reported with its place and a hint.

use super::*;

const GOOD: &str = "\
# invented test case
case: T-1
title: test
formula: C3H6O
ms:
  molecular_ion: 58
  ion: \"M+.\"
ir:
  technique: ATR
  bands:
    - { at: 2965, strength: medium }
    - { at: 1715, strength: strong, shape: sharp }
";

fn first_error(src: &str) -> Diagnostic {
    let (case, diagnostics) = parse(src, "t.yaml");
    assert!(case.is_none(), "expected an error for:\n{src}");
    diagnostics
        .into_iter()
        .find(Diagnostic::is_error)
        .expect("an error diagnostic")
}

#[test]
fn a_good_case_validates_with_places() {
    let (case, diagnostics) = parse(GOOD, "t.yaml");
    assert!(diagnostics.is_empty(), "{diagnostics:?}");
    let case = case.expect("valid case");
    assert_eq!(
        case.formula.as_ref().map(|f| f.composition.to_string()),
        Some("C3H6O".into())
    );
    let ir = case.ir.expect("ir");
    assert_eq!(ir.technique, Some(crate::rules::Technique::Atr));
    assert_eq!(ir.bands.len(), 2);
    assert_eq!(ir.bands[1].place.display(), "t.yaml:12:7");
    assert_eq!(ir.bands[1].place.key_path, "ir.bands[1]");
}

#[test]
fn bad_inputs_are_reported_with_place_key_path_and_hint() {
    // (replace, with, expected rendering of the first error, expected help)
    let table: &[(&str, &str, &str, Option<&str>)] = &[
        (
            "strength: strong, shape",
            "strength: strnog, shape",
            "error: t.yaml:12:29: ir.bands[1].strength: unknown strength \"strnog\"",
            Some("did you mean \"strong\"?"),
        ),
        (
            "at: 1715",
            "at: 4715",
            "error: t.yaml:12:13: ir.bands[1].at: band at 4715 cm⁻¹ is outside 400–4000 cm⁻¹",
            None,
        ),
        (
            "technique: ATR",
            "technique: ATRR",
            "error: t.yaml:9:14: ir.technique: unknown technique \"ATRR\"",
            Some("did you mean \"ATR\"?"),
        ),
        (
            "shape: sharp",
            "shape: sharpp",
            "error: t.yaml:12:44: ir.bands[1].shape: unknown shape \"sharpp\"",
            Some("did you mean \"sharp\"?"),
        ),
        (
            "formula: C3H6O",
            "formula: C3H6Xq",
            "error: t.yaml:4:14: formula: invalid formula \"C3H6Xq\": unknown element symbol \"Xq\"",
            None,
        ),
        (
            "ion: \"M+.\"",
            "ion: \"[M+H]\"",
            "error: t.yaml:7:8: ms.ion: unknown ion type \"[M+H]\"",
            Some("did you mean \"[M+H]+\"?"),
        ),
    ];
    for (from, to, expected, help) in table {
        let src = GOOD.replacen(from, to, 1);
        let d = first_error(&src);
        assert_eq!(&d.to_string(), expected, "for {to}");
        assert_eq!(d.help.as_deref(), *help, "for {to}");
    }
}

#[test]
fn unknown_keys_are_errors_with_a_suggestion() {
    let src = GOOD.replacen("strength: strong, shape", "strenght: strong, shape", 1);
    let d = first_error(&src);
    assert!(d.to_string().starts_with("error: t.yaml:12:"), "{d}");
    assert!(
        d.message.contains("unknown field \"strenght\""),
        "{}",
        d.message
    );
    assert_eq!(d.help.as_deref(), Some("did you mean \"strength\"?"));

    let src = GOOD.replacen("title:", "titl:", 1);
    let d = first_error(&src);
    assert_eq!(d.position.map(|p| p.line), Some(2));
    assert_eq!(d.help.as_deref(), Some("did you mean \"title\"?"));
}

#[test]
fn a_case_without_formula_or_bands_is_refused() {
    let d = first_error("case: X\nir:\n  technique: ATR\n");
    assert!(
        d.to_string().contains("ir: the ir block holds no bands"),
        "{d}"
    );
    let (_, diagnostics) = parse("case: X\n", "t.yaml");
    assert!(diagnostics
        .iter()
        .any(|d| d.message.starts_with("no formula")));
}

#[test]
fn all_problems_are_reported_in_one_run() {
    let src = GOOD
        .replacen("strength: medium", "strength: mid", 1)
        .replacen("at: 1715", "at: 200", 1);
    let (_, diagnostics) = parse(&src, "t.yaml");
    assert_eq!(diagnostics.len(), 2, "{diagnostics:?}");
}

#[test]
fn block_style_bands_are_located_too() {
    let src = "formula: CH4O\nir:\n  bands:\n  - at: 3350\n    strength: strong\n  - at: 1030\n    strength: stronk\n";
    let d = first_error(src);
    assert_eq!(
        d.to_string(),
        "error: t.yaml:7:15: ir.bands[1].strength: unknown strength \"stronk\""
    );
}

#[test]
fn spectrum_files_are_listed_for_the_cli_and_refused_until_wired() {
    let src = "formula: CH4O\nir:\n  spectrum: s/a.jdx\n";
    let raw = parse_raw(src, "t.yaml").expect("raw");
    assert_eq!(referenced_files(&raw), vec!["s/a.jdx".to_owned()]);
    let d = first_error(src);
    assert!(d.message.contains("not available in this build"), "{d}");
}
