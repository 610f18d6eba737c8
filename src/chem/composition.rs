//! Element counts of a neutral molecule: the currency between the formula parser and the
//! deduction engine, which needs only "how many atoms of each element" and the degree of
//! unsaturation, not isotopes or charges.

use std::collections::BTreeMap;
use std::fmt;

/// Element counts keyed by element symbol (isotopes folded into their element, D into H).
#[derive(Clone, Debug, Default, PartialEq, Eq, Hash, PartialOrd, Ord, serde::Serialize)]
#[serde(transparent)]
pub struct Composition {
    counts: BTreeMap<String, u32>,
}

/// Lowest common valence used for the degree of unsaturation and for bond bookkeeping.
/// Source: common practice (the valences of the general DBE formula: H and halogens 1,
/// O and S 2, N and P 3, C and Si 4; alkali metals 1, alkaline earths 2, B 3).
pub fn standard_valence(symbol: &str) -> Option<u32> {
    Some(match symbol {
        "H" | "D" | "F" | "Cl" | "Br" | "I" | "Li" | "Na" | "K" => 1,
        "O" | "S" | "Se" | "Mg" | "Ca" | "Zn" | "Cu" | "Hg" | "Fe" => 2,
        "N" | "P" | "B" | "As" => 3,
        "C" | "Si" | "Sn" | "Pb" | "Ge" => 4,
        _ => return None,
    })
}

impl Composition {
    /// An empty composition.
    pub fn new() -> Composition {
        Composition::default()
    }

    /// Builds a composition from `(symbol, count)` pairs; zero counts are dropped and
    /// repeated symbols add up.
    pub fn from_pairs<'a, I>(pairs: I) -> Composition
    where
        I: IntoIterator<Item = (&'a str, u32)>,
    {
        let mut composition = Composition::new();
        for (symbol, count) in pairs {
            composition.add(symbol, count);
        }
        composition
    }

    /// Adds `count` atoms of `symbol`.
    pub fn add(&mut self, symbol: &str, count: u32) {
        if count > 0 {
            *self.counts.entry(symbol.to_owned()).or_insert(0) += count;
        }
    }

    /// How many atoms of `symbol` (0 when absent).
    pub fn count(&self, symbol: &str) -> u32 {
        self.counts.get(symbol).copied().unwrap_or(0)
    }

    /// `(symbol, count)` in alphabetical order of symbol.
    pub fn iter(&self) -> impl Iterator<Item = (&str, u32)> + '_ {
        self.counts.iter().map(|(s, n)| (s.as_str(), *n))
    }

    /// Total number of atoms.
    pub fn n_atoms(&self) -> u32 {
        self.counts.values().sum()
    }

    /// Atoms other than C and H.
    pub fn n_heteroatoms(&self) -> u32 {
        self.iter()
            .filter(|(s, _)| *s != "C" && *s != "H")
            .map(|(_, n)| n)
            .sum()
    }

    /// Degree of unsaturation (rings plus pi bonds) by the general valence formula
    /// DBE = 1 + ½ Σ nᵢ (vᵢ − 2). `None` when an element has no standard valence.
    pub fn dbe(&self) -> Option<f64> {
        let mut twice = 2i64;
        for (symbol, n) in self.iter() {
            let v = i64::from(standard_valence(symbol)?);
            twice += i64::from(n) * (v - 2);
        }
        Some(twice as f64 / 2.0)
    }
}

impl fmt::Display for Composition {
    /// Hill order: C, then H, then the rest alphabetically; without carbon, all alphabetical.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let has_carbon = self.count("C") > 0;
        let mut ordered: Vec<(&str, u32)> = Vec::new();
        if has_carbon {
            ordered.push(("C", self.count("C")));
            if self.count("H") > 0 {
                ordered.push(("H", self.count("H")));
            }
        }
        for (s, n) in self.iter() {
            if has_carbon && (s == "C" || s == "H") {
                continue;
            }
            ordered.push((s, n));
        }
        for (s, n) in ordered {
            if n == 1 {
                write!(f, "{s}")?;
            } else {
                write!(f, "{s}{n}")?;
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dbe_follows_the_general_valence_formula() {
        // common practice: benzene C6H6 has DBE 4; hexane C6H14 has DBE 0.
        let benzene = Composition::from_pairs([("C", 6), ("H", 6)]);
        assert_eq!(benzene.dbe(), Some(4.0));
        let hexane = Composition::from_pairs([("C", 6), ("H", 14)]);
        assert_eq!(hexane.dbe(), Some(0.0));
        // common practice: pyridine C5H5N has DBE 4; chloroethene C2H3Cl has DBE 1.
        let pyridine = Composition::from_pairs([("C", 5), ("H", 5), ("N", 1)]);
        assert_eq!(pyridine.dbe(), Some(4.0));
        let vinyl_chloride = Composition::from_pairs([("C", 2), ("H", 3), ("Cl", 1)]);
        assert_eq!(vinyl_chloride.dbe(), Some(1.0));
    }

    #[test]
    fn prints_in_hill_order() {
        let c = Composition::from_pairs([("O", 1), ("H", 6), ("C", 2), ("Cl", 1)]);
        assert_eq!(c.to_string(), "C2H6ClO");
        let inorganic = Composition::from_pairs([("O", 1), ("H", 2)]);
        assert_eq!(inorganic.to_string(), "H2O");
    }
}
