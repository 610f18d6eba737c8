//! The element table against published values, one line per value with its source.
//!
//! Sources (all `from memory`, then read against the molmass 2026.1.8 isotope table,
//! which carries the same AME2020 / IUPAC 2013 values, while writing these tests):
//! - AME2020: Wang et al., "The AME 2020 atomic mass evaluation (II)", Chinese Physics C
//!   45, 030003 (2021) — atomic masses in u.
//! - IUPAC 2013: Meija et al., "Isotopic compositions of the elements 2013 (IUPAC
//!   Technical Report)", Pure Appl. Chem. 88, 293 (2016) — representative isotopic
//!   compositions (amount fractions).
//! - CIAAW 2021: Prohaska et al., "Standard atomic weights of the elements 2021",
//!   Pure Appl. Chem. 94, 573 (2022) — abridged standard atomic weights.
//! - CODATA 2018: electron mass in u.

use quiddity::chem::elements::{element, ELECTRON_MASS};

/// (element, mass number, atomic mass in u, abundance, source of both numbers)
const PUBLISHED_ISOTOPES: &[(&str, u16, f64, f64, &str)] = &[
    ("H", 1, 1.007_825_032_23, 0.999_885, "AME2020; IUPAC 2013"),
    ("H", 2, 2.014_101_778_12, 0.000_115, "AME2020; IUPAC 2013"),
    (
        "C",
        12,
        12.0,
        0.9893,
        "exact by definition of u; IUPAC 2013",
    ),
    ("C", 13, 13.003_354_835_07, 0.0107, "AME2020; IUPAC 2013"),
    ("N", 14, 14.003_074_004_43, 0.996_36, "AME2020; IUPAC 2013"),
    ("N", 15, 15.000_108_898_88, 0.003_64, "AME2020; IUPAC 2013"),
    ("O", 16, 15.994_914_619_57, 0.997_57, "AME2020; IUPAC 2013"),
    ("O", 17, 16.999_131_756_50, 0.000_38, "AME2020; IUPAC 2013"),
    ("O", 18, 17.999_159_612_86, 0.002_05, "AME2020; IUPAC 2013"),
    ("S", 32, 31.972_071_174_4, 0.9499, "AME2020; IUPAC 2013"),
    ("S", 33, 32.971_458_909_8, 0.0075, "AME2020; IUPAC 2013"),
    ("S", 34, 33.967_867_004, 0.0425, "AME2020; IUPAC 2013"),
    ("S", 36, 35.967_080_71, 0.0001, "AME2020; IUPAC 2013"),
    ("Cl", 35, 34.968_852_682, 0.7576, "AME2020; IUPAC 2013"),
    ("Cl", 37, 36.965_902_602, 0.2424, "AME2020; IUPAC 2013"),
    (
        "Br",
        79,
        78.918_337_6,
        0.5069,
        "AME2020; IUPAC 2013 (50.69(7) %)",
    ),
    (
        "Br",
        81,
        80.916_289_7,
        0.4931,
        "AME2020; IUPAC 2013 (49.31(7) %)",
    ),
];

/// (element, abridged standard atomic weight), CIAAW 2021.
const STANDARD_ATOMIC_WEIGHTS: &[(&str, f64)] = &[
    ("H", 1.008),
    ("C", 12.011),
    ("N", 14.007),
    ("O", 15.999),
    ("S", 32.06),
    ("Cl", 35.45),
    ("Br", 79.904),
];

#[test]
fn isotope_masses_and_abundances_match_the_published_tables() {
    for (symbol, mass_number, mass, abundance, source) in PUBLISHED_ISOTOPES {
        let e = element(symbol).unwrap_or_else(|| panic!("{symbol} missing"));
        let i = e
            .isotope(*mass_number)
            .unwrap_or_else(|| panic!("{mass_number}{symbol} missing"));
        // Published uncertainties of these masses are below 1e-8 u.
        assert!(
            (i.mass - mass).abs() < 1e-8,
            "{mass_number}{symbol} mass {} vs {mass} ({source})",
            i.mass
        );
        assert!(
            (i.abundance - abundance).abs() < 1e-9,
            "{mass_number}{symbol} abundance {} vs {abundance} ({source})",
            i.abundance
        );
    }
}

#[test]
fn the_listed_elements_have_no_other_natural_isotopes() {
    for symbol in ["H", "C", "N", "O", "S", "Cl", "Br"] {
        let published = PUBLISHED_ISOTOPES
            .iter()
            .filter(|(s, ..)| s == &symbol)
            .count();
        let e = element(symbol).unwrap_or_else(|| panic!("{symbol} missing"));
        assert_eq!(e.isotopes.len(), published, "{symbol}");
    }
}

#[test]
fn hydrogen_1_agrees_with_its_mass_excess() {
    // AME2020 mass excess of 1H: 7288.971064(13) keV; 1 u = 931494.10242 keV (CODATA
    // 2018). Converting independently must land within 1e-9 u of the tabulated mass.
    let from_excess = 1.0 + 7_288.971_064 / 931_494.102_42;
    let h1 = element("H").and_then(|e| e.isotope(1)).expect("1H");
    assert!((h1.mass - from_excess).abs() < 1e-9, "{}", h1.mass);
}

#[test]
fn standard_atomic_weights_match_ciaaw() {
    for (symbol, weight) in STANDARD_ATOMIC_WEIGHTS {
        let e = element(symbol).unwrap_or_else(|| panic!("{symbol} missing"));
        assert_eq!(e.standard_atomic_weight, *weight, "{symbol} (CIAAW 2021)");
    }
}

#[test]
fn electron_mass_is_codata_2018() {
    // CODATA 2018: 5.485 799 090 65(16) × 10⁻⁴ u.
    assert_eq!(ELECTRON_MASS, 5.485_799_090_65e-4);
}
