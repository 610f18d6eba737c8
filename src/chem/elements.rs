//! The element table compiled into the binary: every stable (or primordial) isotope's
//! mass and natural abundance, each element's standard atomic weight, nominal mass and
//! standard valence.
//!
//! Sources, per column (every value was written `from memory` of the published tables and
//! then checked by the tests in this file and in `tests/element_data.rs`; the integration
//! test `tests/formula_reference.rs` also compares whole-molecule masses against an
//! independent library's tables):
//! - `Isotope::mass`: atomic masses in unified atomic mass units (u) from the AME2020
//!   atomic mass evaluation (Wang, Huang, Kondev, Audi, Naimi, Chinese Physics C 45, 030003,
//!   2021), rounded to at most 11 significant digits after the point. `from memory`.
//! - `Isotope::abundance`: amount fractions of the IUPAC/CIAAW "representative isotopic
//!   composition" (IUPAC Technical Report "Isotopic compositions of the elements 2013",
//!   Meija et al., Pure Appl. Chem. 88, 293, 2016), as fractions of 1. `from memory`.
//! - `Element::standard_atomic_weight`: the CIAAW conventional / abridged standard atomic
//!   weight (IUPAC "Standard atomic weights of the elements 2021", Prohaska et al., Pure
//!   Appl. Chem. 94, 573, 2022; table of abridged values). `from memory`.
//! - `Element::valence`: the lowest common valence used by the general DBE formula and by
//!   the SENIOR / LEWIS checks. `common practice`.
//! - Nominal mass: the mass number of the most abundant isotope (the trade's definition
//!   of nominal mass, `common practice`), derived from the isotope list, not stored.
//!
//! Radioactive isotopes with a natural abundance (⁴⁰K) are listed because they are part of
//! the natural isotopic composition that a mass spectrometer sees.

/// The mass of the electron in u, CODATA 2018 recommended value (`from memory`:
/// 5.485 799 090 65(16) × 10⁻⁴ u).
pub const ELECTRON_MASS: f64 = 5.485_799_090_65e-4;

/// One naturally occurring isotope of an element.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Isotope {
    /// Number of protons plus neutrons, e.g. 13 for ¹³C.
    pub mass_number: u16,
    /// Atomic mass in u (AME2020).
    pub mass: f64,
    /// Natural amount fraction, 0..=1 (IUPAC/CIAAW representative composition).
    pub abundance: f64,
}

/// One chemical element with its natural isotopes.
#[derive(Debug, PartialEq)]
pub struct Element {
    /// Symbol as printed, e.g. `Cl`.
    pub symbol: &'static str,
    /// English name.
    pub name: &'static str,
    /// Number of protons.
    pub atomic_number: u8,
    /// CIAAW conventional / abridged standard atomic weight.
    pub standard_atomic_weight: f64,
    /// Lowest common valence (H and halogens 1, O and S 2, N and P 3, C and Si 4 …).
    pub valence: u8,
    /// Natural isotopes, in increasing mass number.
    pub isotopes: &'static [Isotope],
}

impl Element {
    /// The most abundant isotope: the one that defines monoisotopic and nominal mass.
    pub fn most_abundant_isotope(&self) -> &'static Isotope {
        let mut best = &self.isotopes[0];
        for isotope in self.isotopes {
            if isotope.abundance > best.abundance {
                best = isotope;
            }
        }
        best
    }

    /// Mass of the most abundant isotope, in u.
    pub fn monoisotopic_mass(&self) -> f64 {
        self.most_abundant_isotope().mass
    }

    /// Mass number of the most abundant isotope (`common practice` definition of the
    /// element's nominal mass).
    pub fn nominal_mass(&self) -> u16 {
        self.most_abundant_isotope().mass_number
    }

    /// The natural isotope with this mass number, if the element has one.
    pub fn isotope(&self, mass_number: u16) -> Option<&'static Isotope> {
        self.isotopes.iter().find(|i| i.mass_number == mass_number)
    }

    /// Abundance-weighted mean of the isotope masses; agrees with the standard atomic
    /// weight to within the latter's stated interval (tested).
    pub fn isotope_weighted_mass(&self) -> f64 {
        self.isotopes.iter().map(|i| i.mass * i.abundance).sum()
    }
}

const fn iso(mass_number: u16, mass: f64, abundance: f64) -> Isotope {
    Isotope {
        mass_number,
        mass,
        abundance,
    }
}

/// Every element quiddity knows, in increasing atomic number.
pub static ELEMENTS: &[Element] = &[
    Element {
        symbol: "H",
        name: "hydrogen",
        atomic_number: 1,
        standard_atomic_weight: 1.008,
        valence: 1,
        isotopes: &[
            iso(1, 1.007_825_032_23, 0.999_885),
            iso(2, 2.014_101_778_12, 0.000_115),
        ],
    },
    Element {
        symbol: "Li",
        name: "lithium",
        atomic_number: 3,
        standard_atomic_weight: 6.94,
        valence: 1,
        isotopes: &[
            iso(6, 6.015_122_887_4, 0.0759),
            iso(7, 7.016_003_434, 0.9241),
        ],
    },
    Element {
        symbol: "B",
        name: "boron",
        atomic_number: 5,
        standard_atomic_weight: 10.81,
        valence: 3,
        isotopes: &[iso(10, 10.012_936_95, 0.199), iso(11, 11.009_305_36, 0.801)],
    },
    Element {
        symbol: "C",
        name: "carbon",
        atomic_number: 6,
        standard_atomic_weight: 12.011,
        valence: 4,
        isotopes: &[iso(12, 12.0, 0.9893), iso(13, 13.003_354_835_07, 0.0107)],
    },
    Element {
        symbol: "N",
        name: "nitrogen",
        atomic_number: 7,
        standard_atomic_weight: 14.007,
        valence: 3,
        isotopes: &[
            iso(14, 14.003_074_004_43, 0.996_36),
            iso(15, 15.000_108_898_88, 0.003_64),
        ],
    },
    Element {
        symbol: "O",
        name: "oxygen",
        atomic_number: 8,
        standard_atomic_weight: 15.999,
        valence: 2,
        isotopes: &[
            iso(16, 15.994_914_619_57, 0.997_57),
            iso(17, 16.999_131_756_50, 0.000_38),
            iso(18, 17.999_159_612_86, 0.002_05),
        ],
    },
    Element {
        symbol: "F",
        name: "fluorine",
        atomic_number: 9,
        standard_atomic_weight: 18.998,
        valence: 1,
        isotopes: &[iso(19, 18.998_403_162_73, 1.0)],
    },
    Element {
        symbol: "Na",
        name: "sodium",
        atomic_number: 11,
        standard_atomic_weight: 22.990,
        valence: 1,
        isotopes: &[iso(23, 22.989_769_282_0, 1.0)],
    },
    Element {
        symbol: "Mg",
        name: "magnesium",
        atomic_number: 12,
        standard_atomic_weight: 24.305,
        valence: 2,
        isotopes: &[
            iso(24, 23.985_041_697, 0.7899),
            iso(25, 24.985_836_976, 0.1000),
            iso(26, 25.982_592_968, 0.1101),
        ],
    },
    Element {
        symbol: "Si",
        name: "silicon",
        atomic_number: 14,
        standard_atomic_weight: 28.085,
        valence: 4,
        isotopes: &[
            iso(28, 27.976_926_534_65, 0.922_23),
            iso(29, 28.976_494_664_90, 0.046_85),
            iso(30, 29.973_770_136, 0.030_92),
        ],
    },
    Element {
        symbol: "P",
        name: "phosphorus",
        atomic_number: 15,
        standard_atomic_weight: 30.974,
        valence: 3,
        isotopes: &[iso(31, 30.973_761_998_42, 1.0)],
    },
    Element {
        symbol: "S",
        name: "sulfur",
        atomic_number: 16,
        standard_atomic_weight: 32.06,
        valence: 2,
        isotopes: &[
            iso(32, 31.972_071_174_4, 0.9499),
            iso(33, 32.971_458_909_8, 0.0075),
            iso(34, 33.967_867_004, 0.0425),
            iso(36, 35.967_080_71, 0.0001),
        ],
    },
    Element {
        symbol: "Cl",
        name: "chlorine",
        atomic_number: 17,
        standard_atomic_weight: 35.45,
        valence: 1,
        isotopes: &[
            iso(35, 34.968_852_682, 0.7576),
            iso(37, 36.965_902_602, 0.2424),
        ],
    },
    Element {
        symbol: "K",
        name: "potassium",
        atomic_number: 19,
        standard_atomic_weight: 39.098,
        valence: 1,
        isotopes: &[
            iso(39, 38.963_706_486_4, 0.932_581),
            iso(40, 39.963_998_166, 0.000_117),
            iso(41, 40.961_825_257_9, 0.067_302),
        ],
    },
    Element {
        symbol: "Ca",
        name: "calcium",
        atomic_number: 20,
        standard_atomic_weight: 40.078,
        valence: 2,
        isotopes: &[
            iso(40, 39.962_590_863, 0.969_41),
            iso(42, 41.958_617_83, 0.006_47),
            iso(43, 42.958_766_44, 0.001_35),
            iso(44, 43.955_481_56, 0.020_86),
            iso(46, 45.953_689_0, 0.000_04),
            iso(48, 47.952_522_76, 0.001_87),
        ],
    },
    Element {
        symbol: "Fe",
        name: "iron",
        atomic_number: 26,
        standard_atomic_weight: 55.845,
        valence: 2,
        isotopes: &[
            iso(54, 53.939_608_99, 0.058_45),
            iso(56, 55.934_936_33, 0.917_54),
            iso(57, 56.935_392_84, 0.021_19),
            iso(58, 57.933_274_43, 0.002_82),
        ],
    },
    Element {
        symbol: "Cu",
        name: "copper",
        atomic_number: 29,
        standard_atomic_weight: 63.546,
        valence: 2,
        isotopes: &[
            iso(63, 62.929_597_72, 0.6915),
            iso(65, 64.927_789_70, 0.3085),
        ],
    },
    Element {
        symbol: "Zn",
        name: "zinc",
        atomic_number: 30,
        standard_atomic_weight: 65.38,
        valence: 2,
        isotopes: &[
            iso(64, 63.929_142_01, 0.4917),
            iso(66, 65.926_033_81, 0.2773),
            iso(67, 66.927_127_75, 0.0404),
            iso(68, 67.924_844_55, 0.1845),
            iso(70, 69.925_319_2, 0.0061),
        ],
    },
    Element {
        symbol: "Ge",
        name: "germanium",
        atomic_number: 32,
        standard_atomic_weight: 72.630,
        valence: 4,
        isotopes: &[
            iso(70, 69.924_248_75, 0.2057),
            iso(72, 71.922_075_826, 0.2745),
            iso(73, 72.923_458_956, 0.0775),
            iso(74, 73.921_177_761, 0.3650),
            iso(76, 75.921_402_726, 0.0773),
        ],
    },
    Element {
        symbol: "As",
        name: "arsenic",
        atomic_number: 33,
        standard_atomic_weight: 74.922,
        valence: 3,
        isotopes: &[iso(75, 74.921_594_57, 1.0)],
    },
    Element {
        symbol: "Se",
        name: "selenium",
        atomic_number: 34,
        standard_atomic_weight: 78.971,
        valence: 2,
        isotopes: &[
            iso(74, 73.922_475_934, 0.0089),
            iso(76, 75.919_213_704, 0.0937),
            iso(77, 76.919_914_154, 0.0763),
            iso(78, 77.917_309_28, 0.2377),
            iso(80, 79.916_521_8, 0.4961),
            iso(82, 81.916_699_5, 0.0873),
        ],
    },
    Element {
        symbol: "Br",
        name: "bromine",
        atomic_number: 35,
        standard_atomic_weight: 79.904,
        valence: 1,
        isotopes: &[iso(79, 78.918_337_6, 0.5069), iso(81, 80.916_289_7, 0.4931)],
    },
    Element {
        symbol: "Sn",
        name: "tin",
        atomic_number: 50,
        standard_atomic_weight: 118.71,
        valence: 4,
        isotopes: &[
            iso(112, 111.904_823_87, 0.0097),
            iso(114, 113.902_782_7, 0.0066),
            iso(115, 114.903_344_699, 0.0034),
            iso(116, 115.901_742_80, 0.1454),
            iso(117, 116.902_953_98, 0.0768),
            iso(118, 117.901_606_57, 0.2422),
            iso(119, 118.903_311_17, 0.0859),
            iso(120, 119.902_201_63, 0.3258),
            iso(122, 121.903_443_8, 0.0463),
            iso(124, 123.905_276_6, 0.0579),
        ],
    },
    Element {
        symbol: "I",
        name: "iodine",
        atomic_number: 53,
        standard_atomic_weight: 126.90,
        valence: 1,
        isotopes: &[iso(127, 126.904_471_9, 1.0)],
    },
    Element {
        symbol: "Hg",
        name: "mercury",
        atomic_number: 80,
        standard_atomic_weight: 200.59,
        valence: 2,
        isotopes: &[
            iso(196, 195.965_832_6, 0.0015),
            iso(198, 197.966_768_60, 0.0997),
            iso(199, 198.968_280_64, 0.1687),
            iso(200, 199.968_326_59, 0.2310),
            iso(201, 200.970_302_84, 0.1318),
            iso(202, 201.970_643_40, 0.2986),
            iso(204, 203.973_493_98, 0.0687),
        ],
    },
    Element {
        symbol: "Pb",
        name: "lead",
        atomic_number: 82,
        standard_atomic_weight: 207.2,
        valence: 4,
        isotopes: &[
            iso(204, 203.973_044_0, 0.014),
            iso(206, 205.974_465_7, 0.241),
            iso(207, 206.975_897_3, 0.221),
            iso(208, 207.976_652_5, 0.524),
        ],
    },
];

/// Every element symbol of the periodic table (1–118), used to tell "not a symbol" from
/// "a real element quiddity has no data for". `common practice`.
pub static ALL_SYMBOLS: &[&str] = &[
    "H", "He", "Li", "Be", "B", "C", "N", "O", "F", "Ne", "Na", "Mg", "Al", "Si", "P", "S", "Cl",
    "Ar", "K", "Ca", "Sc", "Ti", "V", "Cr", "Mn", "Fe", "Co", "Ni", "Cu", "Zn", "Ga", "Ge", "As",
    "Se", "Br", "Kr", "Rb", "Sr", "Y", "Zr", "Nb", "Mo", "Tc", "Ru", "Rh", "Pd", "Ag", "Cd", "In",
    "Sn", "Sb", "Te", "I", "Xe", "Cs", "Ba", "La", "Ce", "Pr", "Nd", "Pm", "Sm", "Eu", "Gd", "Tb",
    "Dy", "Ho", "Er", "Tm", "Yb", "Lu", "Hf", "Ta", "W", "Re", "Os", "Ir", "Pt", "Au", "Hg", "Tl",
    "Pb", "Bi", "Po", "At", "Rn", "Fr", "Ra", "Ac", "Th", "Pa", "U", "Np", "Pu", "Am", "Cm", "Bk",
    "Cf", "Es", "Fm", "Md", "No", "Lr", "Rf", "Db", "Sg", "Bh", "Hs", "Mt", "Ds", "Rg", "Cn", "Nh",
    "Fl", "Mc", "Lv", "Ts", "Og",
];

/// The element with this exact (case-sensitive) symbol, if quiddity has data for it.
pub fn element(symbol: &str) -> Option<&'static Element> {
    ELEMENTS.iter().find(|e| e.symbol == symbol)
}

/// The element with this atomic number, if quiddity has data for it.
pub fn element_by_atomic_number(atomic_number: u8) -> Option<&'static Element> {
    ELEMENTS
        .binary_search_by_key(&atomic_number, |e| e.atomic_number)
        .ok()
        .map(|i| &ELEMENTS[i])
}

/// Symbols of every element with data, in increasing atomic number (for "did you mean").
pub fn known_symbols() -> impl Iterator<Item = &'static str> {
    ELEMENTS.iter().map(|e| e.symbol)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn abundances_of_every_element_sum_to_one() {
        for e in ELEMENTS {
            let total: f64 = e.isotopes.iter().map(|i| i.abundance).sum();
            assert!(
                (total - 1.0).abs() < 1e-9,
                "{}: abundances sum to {total}",
                e.symbol
            );
        }
    }

    #[test]
    fn table_is_ordered_and_internally_consistent() {
        for pair in ELEMENTS.windows(2) {
            assert!(pair[0].atomic_number < pair[1].atomic_number);
        }
        for e in ELEMENTS {
            assert_eq!(ALL_SYMBOLS[usize::from(e.atomic_number) - 1], e.symbol);
            assert!(!e.isotopes.is_empty());
            for pair in e.isotopes.windows(2) {
                assert!(pair[0].mass_number < pair[1].mass_number, "{}", e.symbol);
            }
            for i in e.isotopes {
                // An atomic mass lies within 0.1 u of its mass number for every stable
                // nuclide up to lead (common practice: mass defects stay below 0.1 u).
                assert!(
                    (i.mass - f64::from(i.mass_number)).abs() < 0.1,
                    "{} {}",
                    e.symbol,
                    i.mass_number
                );
                assert!(i.abundance > 0.0 && i.abundance <= 1.0);
            }
            // The abundance-weighted mass must reproduce the abridged standard atomic
            // weight to within its rounding (a typo in a mass or abundance shows here);
            // 0.02 because lead's natural variation is wide (CIAAW interval 206.14–207.94).
            let weighted = e.isotope_weighted_mass();
            assert!(
                (weighted - e.standard_atomic_weight).abs() < 0.02,
                "{}: weighted {weighted} vs standard {}",
                e.symbol,
                e.standard_atomic_weight
            );
            assert_eq!(element(e.symbol), Some(e));
            assert_eq!(element_by_atomic_number(e.atomic_number), Some(e));
        }
    }

    #[test]
    fn valences_agree_with_composition() {
        for e in ELEMENTS {
            assert_eq!(
                crate::chem::composition::standard_valence(e.symbol),
                Some(u32::from(e.valence)),
                "{}",
                e.symbol
            );
        }
    }

    #[test]
    fn required_elements_are_present() {
        for s in [
            "H", "B", "C", "N", "O", "F", "Na", "Mg", "Si", "P", "S", "Cl", "K", "Ca", "Fe", "Cu",
            "Zn", "As", "Se", "Br", "Sn", "I", "Hg", "Pb",
        ] {
            assert!(element(s).is_some(), "{s} missing");
        }
        assert_eq!(ALL_SYMBOLS.len(), 118);
    }

    #[test]
    fn nominal_mass_is_the_most_abundant_mass_number() {
        // common practice: nominal masses C 12, H 1, Fe 56, Se 80, Sn 120, Hg 202, B 11.
        let expect = [
            ("C", 12),
            ("H", 1),
            ("Fe", 56),
            ("Se", 80),
            ("Sn", 120),
            ("Hg", 202),
            ("B", 11),
        ];
        for (s, n) in expect {
            assert_eq!(element(s).map(Element::nominal_mass), Some(n), "{s}");
        }
    }
}
