//! Isotope patterns against the analyst's rules of thumb (`common practice`: the
//! ratios every mass spectrometrist reads off a molecular-ion cluster).

use quiddity::chem::{aggregated_pattern, Formula};

/// Relative intensity (most abundant = 100) at nominal mass M+k of `formula`; peaks are
/// found by their offset from the monoisotopic mass, since a large mass defect (C40H82 at
/// 562.64) defeats rounding the m/z itself.
fn relative_at(formula: &str, k: u64) -> f64 {
    let f = Formula::parse(formula).expect("valid formula");
    aggregated_pattern(&f)
        .relative(0.0)
        .iter()
        .find(|p| (p.mz - f.monoisotopic_mass()).round() as u64 == k)
        .map_or(0.0, |p| p.relative)
}

#[test]
fn one_chlorine_gives_m_plus_2_near_a_third_of_m() {
    // common practice: 35Cl:37Cl ≈ 3:1, so M+2 ≈ 32 % of M.
    for formula in ["CH3Cl", "C2H3Cl", "C6H5Cl"] {
        let m2 = relative_at(formula, 2);
        assert!((m2 - 32.0).abs() < 1.5, "{formula}: M+2 = {m2}");
    }
}

#[test]
fn one_bromine_gives_m_plus_2_nearly_equal_to_m() {
    // common practice: 79Br:81Br ≈ 1:1, so M+2 ≈ 97–98 % of M.
    for formula in ["CH3Br", "C6H5Br"] {
        let m2 = relative_at(formula, 2);
        assert!((m2 - 97.3).abs() < 1.5, "{formula}: M+2 = {m2}");
    }
}

#[test]
fn two_bromines_give_1_2_1() {
    // common practice: Br2 gives M : M+2 : M+4 ≈ 1 : 2 : 1.
    let (m, m2, m4) = (
        relative_at("CH2Br2", 0),
        relative_at("CH2Br2", 2),
        relative_at("CH2Br2", 4),
    );
    assert_eq!(m2, 100.0);
    assert!((m / m2 - 0.5).abs() < 0.04, "M/M+2 = {}", m / m2);
    assert!((m4 / m2 - 0.5).abs() < 0.04, "M+4/M+2 = {}", m4 / m2);
}

#[test]
fn two_chlorines_give_100_64_10() {
    // common practice: Cl2 gives M : M+2 : M+4 ≈ 100 : 65 : 10.
    assert!((relative_at("CH2Cl2", 2) - 64.0).abs() < 2.0);
    assert!((relative_at("CH2Cl2", 4) - 10.2).abs() < 1.0);
}

#[test]
fn each_carbon_adds_about_1_1_percent_to_m_plus_1() {
    // common practice: M+1 ≈ 1.1 % × n(C) (plus 0.015 % per H, 0.37 % per N).
    for n in [1u32, 5, 10, 20, 40] {
        let alkane = format!("C{n}H{}", 2 * n + 2);
        let m1 = relative_at(&alkane, 1);
        let expected = 1.1 * f64::from(n) + 0.015 * f64::from(2 * n + 2);
        assert!(
            (m1 - expected).abs() < 0.03 * expected + 0.05,
            "{alkane}: M+1 = {m1}, rule of thumb {expected}"
        );
    }
}

#[test]
fn sulfur_adds_about_4_4_percent_to_m_plus_2() {
    // common practice: each S adds ≈ 4.4 % to M+2 (34S).
    let m2 = relative_at("H2S", 2);
    assert!((m2 - 4.4).abs() < 0.2, "H2S M+2 = {m2}");
}

#[test]
fn caffeine_cluster_matches_the_done_when_values() {
    // common practice: ≈ 1.1 % per C plus the N contributions: 8 C, 4 N → M+1 ≈ 10.3 %.
    assert_eq!(relative_at("C8H10N4O2", 0), 100.0);
    assert!((relative_at("C8H10N4O2", 1) - 10.3).abs() < 0.1);
}
