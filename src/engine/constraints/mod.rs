//! One module per kind of constraint: the check, its wording and its tests together.

pub mod band_explanation;
pub mod bonds;
pub mod composition;
pub mod dbe;
pub mod diagnostic_bands;
pub mod ionic;
pub mod ms;
pub mod relations;
