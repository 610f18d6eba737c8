//! Chemistry core: elements and isotopes, formulas, masses, unsaturation, isotope patterns.
//! Knows nothing of IR or of functional groups.

pub mod composition;
pub mod elements;
pub mod fine_structure;
pub mod formula;
pub mod isotopes;

pub use composition::Composition;
pub use elements::{Element, Isotope, ELECTRON_MASS};
pub use formula::{
    Atom, Formula, FormulaArithmeticError, FormulaError, FormulaErrorKind, LewisCheck,
    NitrogenRule, SeniorCheck,
};
pub use isotopes::{
    aggregated_pattern, fine_isotopologues, fine_structure_pattern, IsotopePattern, Peak,
    RelativePeak,
};
