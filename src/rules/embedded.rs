//! The shipped catalogue, compiled into the binary so that quiddity works with no files
//! around it. Every `rules/*.yaml` must be listed here; a test fails when one is not.

use super::load::load_checked;
use super::model::Catalogue;
use crate::diag::Diagnostic;

/// `(file name, text)` of every shipped rules file, names relative to `rules/`.
pub const EMBEDDED_FILES: &[(&str, &str)] = &[
    ("artefacts.yaml", include_str!("../../rules/artefacts.yaml")),
    ("carbonyl.yaml", include_str!("../../rules/carbonyl.yaml")),
    ("halogens.yaml", include_str!("../../rules/halogens.yaml")),
    (
        "hydrocarbons.yaml",
        include_str!("../../rules/hydrocarbons.yaml"),
    ),
    ("nitrogen.yaml", include_str!("../../rules/nitrogen.yaml")),
    ("oxygen.yaml", include_str!("../../rules/oxygen.yaml")),
    ("patterns.yaml", include_str!("../../rules/patterns.yaml")),
    ("salts.yaml", include_str!("../../rules/salts.yaml")),
    ("skeleton.yaml", include_str!("../../rules/skeleton.yaml")),
    (
        "sulfur_phosphorus.yaml",
        include_str!("../../rules/sulfur_phosphorus.yaml"),
    ),
];

/// The shipped catalogue, validated. An error here is a bug in `rules/`, which the test
/// suite catches; callers still get the diagnostics rather than a panic.
pub fn embedded_catalogue() -> Result<Catalogue, Vec<Diagnostic>> {
    load_checked(EMBEDDED_FILES.iter().copied())
}
