//! Mass-spectrum evidence: ion types, formulas from a measured m/z, isotope fit, fragments.
//!
//! Entry points for the engine and the CLI:
//! - [`ion_neutral_mass`] / [`IonType`]: neutral mass ↔ ion m/z, electron mass included;
//! - [`candidate_formulas`]: every plausible formula for a [`MassQuery`], ranked;
//! - [`halogen_bounds_from_m2`]: allowed Cl / Br / S counts from the M+2 peak alone;
//! - [`match_fragments`] / [`match_catalogue`]: MS clues of the catalogue borne out by
//!   the observed fragment ions (soft evidence).
//!
//! Depends on `chem` (masses, isotopes, SENIOR / LEWIS) and on `rules`' model types for
//! the clues; knows nothing of IR.

pub mod best;
pub mod formula_search;
pub mod fragments;
pub mod heuristics;
pub mod ion;
pub mod isotope_fit;
pub mod ranges;
pub mod rank;

pub use best::{best_formulas, best_formulas_within, BestFormulas};
pub use fragments::{
    match_catalogue, match_fragments, FragmentMatch, ObservedFragment, DEFAULT_FRAGMENT_TOLERANCE,
};
pub use ion::{ion_neutral_mass, IonType, IonTypeError};
pub use isotope_fit::{
    halogen_bounds_from_m2, isotope_ratios, HalogenBounds, HalogenCombination, IsotopeFit,
    IsotopeRatios, MeasuredIsotopes,
};
pub use ranges::{ElementRange, ElementRanges, RangeError, RangeErrorKind, DEFAULT_RANGES};
pub use rank::{
    candidate_formulas, candidate_formulas_within, FormulaCandidate, MassQuery, MeasuredMz,
    QueryError, RankError, ScoreParts, Tolerance,
};
