//! Chemistry core: elements and isotopes, formulas, masses, unsaturation, isotope patterns.
//! Knows nothing of IR or of functional groups.

pub mod composition;

pub use composition::Composition;
