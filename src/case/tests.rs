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
fn every_schema_error_of_a_case_is_reported_at_once_with_its_place() {
    // Three independent problems: a misspelt top-level key, a misspelt band key, and a
    // molecular ion that is not a number. Each comes with file:line:col and key path, in
    // file order, and none is invented by the search (no "missing field").
    let src = GOOD
        .replacen("title:", "titl:", 1)
        .replacen("strength: strong, shape", "strenght: strong, shape", 1)
        .replacen("molecular_ion: 58", "molecular_ion: fifty-eight", 1);
    let (case, diagnostics) = parse(&src, "t.yaml");
    assert!(case.is_none());
    let shown: Vec<String> = diagnostics
        .iter()
        .map(|d| {
            let p = d.position.expect("a place");
            format!(
                "{}:{} {} {}",
                p.line + 1,
                p.column + 1,
                d.key_path.as_deref().unwrap_or("-"),
                d.message.split(',').next().unwrap_or("")
            )
        })
        .collect();
    assert_eq!(
        shown,
        [
            "3:1 - unknown field \"titl\"",
            "6:18 ms.molecular_ion invalid type: string \"fifty-eight\"",
            "12:19 ir.bands[1] unknown field \"strenght\"",
        ],
        "{diagnostics:#?}"
    );
    let one = *parse_raw(&src, "t.yaml").expect_err("a schema error");
    assert!(
        diagnostics.contains(&one),
        "the first error is among them: {one:?}"
    );
    assert_eq!(
        diagnostics[0].help.as_deref(),
        Some("did you mean \"title\"?")
    );
    assert_eq!(
        diagnostics[2].help.as_deref(),
        Some("did you mean \"strength\"?")
    );
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
fn spectrum_files_are_listed_for_the_caller_and_required_for_validation() {
    let src = "formula: CH4O\nir:\n  spectrum: s/a.jdx\n";
    let raw = parse_raw(src, "t.yaml").expect("raw");
    assert_eq!(referenced_files(&raw), vec!["s/a.jdx".to_owned()]);
    let d = first_error(src);
    assert_eq!(
        d.to_string(),
        "error: t.yaml:3:13: ir.spectrum: the spectrum file \"s/a.jdx\" was not read"
    );
}

/// A small invented two-column absorbance trace with one strong band near 1715 cm⁻¹.
fn two_column_trace() -> Vec<u8> {
    let mut s = String::new();
    let mut x = 4000.0;
    while x >= 600.0 {
        let d: f64 = (x - 1715.0) / 8.0;
        let w: f64 = (x - 1100.0) / 10.0;
        let y = 0.01 + 1.0 / (1.0 + d * d) + 0.3 / (1.0 + w * w);
        s.push_str(&format!("{x:.1}\t{y:.6}\n"));
        x -= 1.0;
    }
    s.into_bytes()
}

#[test]
fn picked_bands_join_the_written_ones_and_written_bands_win() {
    let src =
        "formula: C3H6O\nir:\n  spectrum: s.txt\n  bands:\n    - { at: 1713, strength: medium }\n";
    let raw = parse_raw(src, "t.yaml").expect("raw");
    let files = vec![ReferencedFile {
        written: "s.txt".into(),
        origin: "dir/s.txt".into(),
        bytes: two_column_trace(),
    }];
    let (case, diagnostics) = validate_with_files(&raw, src, "t.yaml", &files);
    assert!(diagnostics.iter().all(|d| !d.is_error()), "{diagnostics:?}");
    let ir = case.expect("case").ir.expect("ir");
    let spectrum = ir.spectrum.expect("spectrum source");
    assert_eq!(spectrum.n_overridden, 1, "the picked 1715 band is replaced");
    let near_1715: Vec<_> = ir
        .bands
        .iter()
        .filter(|b| (b.band.at - 1715.0).abs() < 5.0)
        .collect();
    assert_eq!(near_1715.len(), 1);
    assert_eq!(near_1715[0].band.strength, crate::ir::Strength::Medium);
    assert!(ir
        .bands
        .iter()
        .any(|b| (b.band.at - 1100.0).abs() < 3.0 && b.place.origin == "dir/s.txt"));
}

#[test]
fn metadata_blocks_are_checked() {
    let with = |extra: &str| format!("{GOOD}{extra}");
    let d = first_error(&with("sample:\n  received: 2026-02-30\n"));
    assert_eq!(
        d.to_string(),
        "error: t.yaml:14:13: sample.received: date \"2026-02-30\" is not a calendar date written YYYY-MM-DD"
    );
    let d = first_error(&with("review:\n  verdict: agreeed\n"));
    assert_eq!(d.help.as_deref(), Some("did you mean \"agreed\"?"));
    let d = first_error(&with("sample:\n  analsyt: X\n"));
    assert_eq!(d.help.as_deref(), Some("did you mean \"analyst\"?"));
    assert_eq!(d.position.map(|p| (p.line, p.column)), Some((13, 2)));
    let (case, ds) = parse(
        &with("conclusion:\n  accepted: { ketone_saturated: 1 }\nnotes: seen\nreview:\n  verdict: agreed\n  date: 2024-02-29\n"),
        "t.yaml",
    );
    assert!(ds.is_empty(), "{ds:?}");
    let case = case.expect("case");
    assert_eq!(
        case.conclusion.expect("c").accepted.get("ketone_saturated"),
        Some(&1)
    );
    assert_eq!(case.review.expect("r").verdict, Some(Verdict::Agreed));
}
