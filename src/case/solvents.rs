//! Solvents of solution-cell spectra and the regions where each is opaque: a band rule of
//! a group that falls there cannot be observed, so its absence is "not observable", never
//! "absent" (the group is not ruled out for it). Values are the strong solvent bands that
//! leave little or no transmission in a 0.1 mm cell, recalled (`from memory`) from
//! Silverstein, Webster & Kiemle, 7th ed., ch. 2 (solvent transparency chart).

/// One solvent: the words a case may use for it and its opaque regions (cm⁻¹, low first).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Solvent {
    /// The case-file word.
    pub word: &'static str,
    /// Regions where the solvent leaves no usable transmission.
    pub opaque: &'static [(f64, f64)],
}

/// Solvents a case may name in `ir.solvent`.
pub const SOLVENTS: &[Solvent] = &[
    // C–Cl stretches 700–850 and a combination band near 1550 (from memory).
    Solvent {
        word: "CCl4",
        opaque: &[(700.0, 850.0), (1540.0, 1560.0)],
    },
    // C–H stretch near 3020, C–H bend near 1215, C–Cl stretches 650–800 (from memory).
    Solvent {
        word: "CHCl3",
        opaque: &[(650.0, 800.0), (1200.0, 1240.0), (3000.0, 3040.0)],
    },
    // C=S stretches 1450–1600 and 2100–2200 (from memory).
    Solvent {
        word: "CS2",
        opaque: &[(1400.0, 1600.0), (2100.0, 2250.0)],
    },
    // C–H stretches 2850–3000, CH2/CH3 bends 1350–1480 (from memory).
    Solvent {
        word: "hexane",
        opaque: &[(2840.0, 3000.0), (1350.0, 1480.0)],
    },
];

/// The solvent named by `word` (exact), if known.
pub fn solvent(word: &str) -> Option<&'static Solvent> {
    SOLVENTS.iter().find(|s| s.word == word)
}
