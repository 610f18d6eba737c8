//! Reference library: a folder of the laboratory's own reference spectra (JCAMP-DX or
//! two-column text, each with a name and a formula from its own header or a side file),
//! indexed once, searched by spectral similarity. Knows nothing of functional groups: it
//! says which references look like the unknown and where they agree; `verdict` checks the
//! hits against the case and the deduction.
//!
//! - [`grid`]: one spectrum on the common grid (profile and signature).
//! - [`meta`]: name, formula, phase of a reference; side files.
//! - [`index`]: the index, its file, rebuilding it from the folder's files.
//! - [`search`]: similarity, hits, region-by-region agreement.
//!
//! The library reads no file: the CLI lists the folder, reads the bytes and hands them in.

pub mod grid;
pub mod index;
pub mod meta;
pub mod search;

pub use grid::{grid_from_bytes, read_grid, GridError, GridSpectrum};
pub use index::{BuildStats, Builder, Entry, LibraryIndex, SourceFile, Stamp, INDEX_FILE_NAME};
pub use meta::{Metadata, Phase};
pub use search::{search, Agreement, Hit, PhaseRule, Query, SearchOptions, SearchOutcome};

/// File extensions read as reference spectra (lower case).
pub const SPECTRUM_EXTENSIONS: [&str; 5] = ["jdx", "dx", "jcm", "jcamp", "csv"];
/// Extensions of side files.
pub const SIDE_EXTENSIONS: [&str; 2] = ["yaml", "yml"];
