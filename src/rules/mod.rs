//! The rules catalogue: functional groups with their atoms, unsaturation, open bonds, IR
//! bands and MS clues; skeleton, artefact, pattern and technique rules. Data plus its
//! schema: `raw` mirrors the YAML, `load` validates it into `model`, the validated form
//! the engine consumes; `embedded` holds the shipped `rules/*.yaml`; `lookup` answers
//! "which rules cover this wavenumber".

pub mod embedded;
pub mod load;
pub mod lookup;
pub mod model;
pub mod raw;

pub use embedded::{embedded_catalogue, EMBEDDED_FILES};
pub use load::{digest, load, load_checked, MAX_WAVENUMBER, MIN_WAVENUMBER, SP3_CARBON};
pub use lookup::{rules_at, Coverage, CoverageKind};
pub use model::*;
/// Group ids every catalogue must define, with the meaning the trade gives the name
/// (DEVELOPERS.md, "Contracts"). Finer subtypes map onto these through `subtype_of`.
pub const REQUIRED_GROUP_IDS: &[&str] = &[
    "alkene",
    "alkyne_terminal",
    "alkyne_internal",
    "aromatic_ring",
    "alcohol",
    "phenol",
    "ether",
    "aldehyde",
    "ketone",
    "carboxylic_acid",
    "ester",
    "anhydride",
    "acyl_halide",
    "amine_primary",
    "amine_secondary",
    "amine_tertiary",
    "amide_primary",
    "amide_secondary",
    "amide_tertiary",
    "nitrile",
    "nitro",
    "imine",
    "isocyanate",
    "thiol",
    "sulfide",
    "sulfoxide",
    "sulfone",
    "sulfonamide",
    "fluoro",
    "chloro",
    "bromo",
    "iodo",
    "pyridine_ring",
    "carbamate",
    "urea",
    "nitrate_ester",
    "phosphate_ester",
    "ring",
];
