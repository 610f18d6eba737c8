//! The library index: every reference's metadata, digests and signature, built once from
//! the library folder and kept in one file, so that a search never reads a spectrum.
//!
//! **Rebuilt when a file changes.** Each entry keeps the SHA-256 of its spectrum file (and
//! side file) and the file's size and modification time. On a rebuild an entry whose stamps
//! still match is reused without reading; a file whose stamps moved is read and hashed, and
//! reused when its digest is unchanged; anything else is read anew. The library's digest
//! (what reports and records name) is SHA-256 over the entries' paths and file digests.
//!
//! **File layout** (all integers little-endian), our own:
//!
//! ```text
//! magic     8 bytes  "QDYLIBX\n"
//! version   u32      INDEX_VERSION
//! json_len  u64      length of the JSON header
//! json      UTF-8    IndexHeader: grid parameters and every entry's metadata
//! n         u64      entries
//! points    u32      grid points per signature
//! data      n·points i16 signatures, entry order
//! check     32 bytes SHA-256 of everything before it
//! ```
//!
//! **Memory.** A signature is [`GRID_POINTS`] i16 values: 1 776 bytes. The metadata of an
//! entry (paths, digests, name, formula) takes about 300–400 bytes in memory; so about
//! 2.2 KB a reference, 550 MB for 250 000 references.

use super::grid::{
    GridSpectrum, CO2_WINDOW_CM1, FINGERPRINT_WEIGHT, GRID_LOW_CM1, GRID_POINTS, GRID_STEP_CM1,
};
use super::meta::Metadata;
use crate::diag::Diagnostic;
use crate::ir::SpectrumFileKind;
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};
use std::collections::HashMap;

/// Lower-case hex SHA-256 of `bytes`.
pub fn sha256_hex(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// The index file's name inside the library folder.
pub const INDEX_FILE_NAME: &str = "quiddity-library.idx";
/// The layout version this build writes and reads.
pub const INDEX_VERSION: u32 = 1;
const MAGIC: &[u8; 8] = b"QDYLIBX\n";

/// Size and modification time of a file: what decides whether it must be read again.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct Stamp {
    /// Bytes.
    pub size: u64,
    /// Modification time, nanoseconds since 1970 (0 when unknown).
    pub modified_ns: u64,
}

/// A side file of a reference.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct SideFile {
    /// Path relative to the library folder.
    pub path: String,
    /// SHA-256 of its bytes.
    pub sha256: String,
    /// Its stamp when indexed.
    pub stamp: Stamp,
}

/// One reference in the index.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Entry {
    /// Path relative to the library folder, `/`-separated.
    pub path: String,
    /// SHA-256 of the spectrum file.
    pub sha256: String,
    /// Its stamp when indexed.
    pub stamp: Stamp,
    /// The side file, when there is one.
    pub side: Option<SideFile>,
    /// What the reference is.
    pub meta: Metadata,
    /// First and last covered grid point.
    pub covered: (u16, u16),
    /// Warnings found when indexing (shown again on every rebuild).
    pub warnings: Vec<String>,
}

impl Entry {
    /// The covered range, cm⁻¹.
    pub fn range_cm1(&self) -> (f64, f64) {
        (
            super::grid::grid_x(usize::from(self.covered.0)),
            super::grid::grid_x(usize::from(self.covered.1)),
        )
    }
}

/// The grid an index was built on (a different grid is a different index).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct GridInfo {
    /// First point, cm⁻¹.
    pub low_cm1: f64,
    /// Spacing, cm⁻¹.
    pub step_cm1: f64,
    /// Points.
    pub points: usize,
    /// Weight below 1500 cm⁻¹.
    pub fingerprint_weight: f64,
    /// Window weighed 0, cm⁻¹.
    pub co2_window_cm1: (f64, f64),
}

impl GridInfo {
    /// The grid of this build.
    pub fn current() -> GridInfo {
        GridInfo {
            low_cm1: GRID_LOW_CM1,
            step_cm1: GRID_STEP_CM1,
            points: GRID_POINTS,
            fingerprint_weight: FINGERPRINT_WEIGHT,
            co2_window_cm1: CO2_WINDOW_CM1,
        }
    }
}

#[derive(Serialize, Deserialize)]
struct IndexHeader {
    format: String,
    grid: GridInfo,
    entries: Vec<Entry>,
}

/// The library index in memory: entries and their signatures side by side.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct LibraryIndex {
    entries: Vec<Entry>,
    signatures: Vec<i16>,
}

/// Why an index file cannot be used (it is then rebuilt).
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum IndexFileError {
    /// Not an index file.
    NotAnIndex,
    /// Written by another layout version.
    Version(u32),
    /// Cut short or damaged (the check digest disagrees).
    Damaged(String),
    /// Built on another grid.
    OtherGrid,
}

impl std::fmt::Display for IndexFileError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            IndexFileError::NotAnIndex => f.write_str("not a quiddity library index"),
            IndexFileError::Version(v) => write!(
                f,
                "index layout version {v}, this quiddity reads version {INDEX_VERSION}"
            ),
            IndexFileError::Damaged(why) => write!(f, "the index file is damaged: {why}"),
            IndexFileError::OtherGrid => f.write_str("the index was built on another grid"),
        }
    }
}

impl LibraryIndex {
    /// The entries, in path order.
    pub fn entries(&self) -> &[Entry] {
        &self.entries
    }

    /// Number of references.
    pub fn len(&self) -> usize {
        self.entries.len()
    }

    /// True without references.
    pub fn is_empty(&self) -> bool {
        self.entries.is_empty()
    }

    /// The signature of entry `i`.
    pub fn signature(&self, i: usize) -> &[i16] {
        &self.signatures[i * GRID_POINTS..(i + 1) * GRID_POINTS]
    }

    /// Every signature, entry after entry.
    pub fn signatures(&self) -> &[i16] {
        &self.signatures
    }

    /// The entry of `path`, if any.
    pub fn position(&self, path: &str) -> Option<usize> {
        self.entries
            .binary_search_by(|e| e.path.as_str().cmp(path))
            .ok()
    }

    /// SHA-256 over the entries' paths and digests, in path order: the library's identity
    /// in reports and records.
    pub fn digest(&self) -> String {
        let mut h = Sha256::new();
        for e in &self.entries {
            h.update(e.path.as_bytes());
            h.update([0]);
            h.update(e.sha256.as_bytes());
            h.update([0]);
            if let Some(s) = &e.side {
                h.update(s.path.as_bytes());
                h.update([0]);
                h.update(s.sha256.as_bytes());
            }
            h.update([0]);
        }
        h.finalize().iter().map(|b| format!("{b:02x}")).collect()
    }

    /// Bytes held in memory by the signatures and the entries (an estimate for the
    /// entries: their strings' lengths plus the fixed parts).
    pub fn memory_bytes(&self) -> usize {
        let strings: usize = self
            .entries
            .iter()
            .map(|e| {
                e.path.len()
                    + e.sha256.len()
                    + e.meta.name.len()
                    + e.meta.formula.as_ref().map_or(0, String::len)
                    + e.meta.formula_written.as_ref().map_or(0, String::len)
                    + e.side.as_ref().map_or(0, |s| s.path.len() + s.sha256.len())
            })
            .sum();
        self.signatures.len() * 2 + strings + self.entries.len() * std::mem::size_of::<Entry>()
    }

    /// The index as file bytes (see the module text for the layout).
    pub fn to_bytes(&self) -> Vec<u8> {
        let header = IndexHeader {
            format: "quiddity-library-index".to_owned(),
            grid: GridInfo::current(),
            entries: self.entries.clone(),
        };
        let json = serde_json::to_vec(&header).unwrap_or_default();
        let mut out = Vec::with_capacity(json.len() + self.signatures.len() * 2 + 64);
        out.extend_from_slice(MAGIC);
        out.extend_from_slice(&INDEX_VERSION.to_le_bytes());
        out.extend_from_slice(&(json.len() as u64).to_le_bytes());
        out.extend_from_slice(&json);
        out.extend_from_slice(&(self.entries.len() as u64).to_le_bytes());
        out.extend_from_slice(&(GRID_POINTS as u32).to_le_bytes());
        for v in &self.signatures {
            out.extend_from_slice(&v.to_le_bytes());
        }
        let check = Sha256::digest(&out);
        out.extend_from_slice(&check);
        out
    }

    /// Reads index file bytes.
    pub fn from_bytes(bytes: &[u8]) -> Result<LibraryIndex, IndexFileError> {
        if bytes.len() < 8 || &bytes[..8] != MAGIC {
            return Err(IndexFileError::NotAnIndex);
        }
        let damaged = |why: &str| IndexFileError::Damaged(why.to_owned());
        if bytes.len() < 8 + 4 + 8 + 32 {
            return Err(damaged("cut short"));
        }
        let (body, check) = bytes.split_at(bytes.len() - 32);
        let mut at = 8;
        let take = |at: &mut usize, n: usize| -> Result<&[u8], IndexFileError> {
            let end = at.checked_add(n).filter(|e| *e <= body.len());
            let Some(end) = end else {
                return Err(IndexFileError::Damaged("cut short".to_owned()));
            };
            let s = &body[*at..end];
            *at = end;
            Ok(s)
        };
        let version = u32::from_le_bytes(
            take(&mut at, 4)?
                .try_into()
                .map_err(|_| damaged("version"))?,
        );
        if version != INDEX_VERSION {
            return Err(IndexFileError::Version(version));
        }
        if Sha256::digest(body).as_slice() != check {
            return Err(damaged("its check digest does not match its contents"));
        }
        let json_len = u64::from_le_bytes(
            take(&mut at, 8)?
                .try_into()
                .map_err(|_| damaged("length"))?,
        );
        let json_len = usize::try_from(json_len).map_err(|_| damaged("length"))?;
        let header: IndexHeader = serde_json::from_slice(take(&mut at, json_len)?)
            .map_err(|e| IndexFileError::Damaged(format!("header: {e}")))?;
        if header.grid != GridInfo::current() {
            return Err(IndexFileError::OtherGrid);
        }
        let n = u64::from_le_bytes(take(&mut at, 8)?.try_into().map_err(|_| damaged("count"))?);
        let points = u32::from_le_bytes(
            take(&mut at, 4)?
                .try_into()
                .map_err(|_| damaged("points"))?,
        );
        if points as usize != GRID_POINTS || n as usize != header.entries.len() {
            return Err(damaged("counts disagree"));
        }
        let data = take(&mut at, header.entries.len() * GRID_POINTS * 2)?;
        if at != body.len() {
            return Err(damaged("trailing bytes"));
        }
        let signatures = data
            .chunks_exact(2)
            .map(|c| i16::from_le_bytes([c[0], c[1]]))
            .collect();
        let index = LibraryIndex {
            entries: header.entries,
            signatures,
        };
        if index.entries.windows(2).any(|w| w[0].path >= w[1].path) {
            return Err(damaged("entries out of order"));
        }
        Ok(index)
    }
}

/// A library file as the caller listed it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SourceFile {
    /// Path relative to the library folder, `/`-separated.
    pub path: String,
    /// The name diagnostics use (the path as opened).
    pub origin: String,
    /// Its stamp.
    pub stamp: Stamp,
    /// Its side file: relative path, origin and stamp.
    pub side: Option<(String, String, Stamp)>,
}

/// How a rebuild went.
#[derive(Clone, Debug, Default, PartialEq, Eq, Serialize)]
pub struct BuildStats {
    /// Files listed.
    pub n_files: usize,
    /// Entries reused because their stamps matched.
    pub n_unchanged: usize,
    /// Entries reused after reading: the stamps moved, the digests did not.
    pub n_same_digest: usize,
    /// Files read and indexed anew.
    pub n_indexed: usize,
    /// Of those, files whose earlier entry had another digest.
    pub n_changed: usize,
    /// Entries of the earlier index whose file is gone.
    pub n_removed: usize,
    /// Files left out (unreadable, unusable or duplicates).
    pub n_left_out: usize,
}

impl BuildStats {
    /// True when the rebuild changed nothing an index file holds except stamps.
    pub fn content_unchanged(&self) -> bool {
        self.n_indexed == 0 && self.n_removed == 0
    }
}

/// Builds an index from the listed files, reusing what an earlier index holds.
#[derive(Debug)]
pub struct Builder<'a> {
    old: Option<&'a LibraryIndex>,
    entries: Vec<Entry>,
    signatures: Vec<i16>,
    by_digest: HashMap<String, String>,
    by_signature: HashMap<Vec<i16>, String>,
    diagnostics: Vec<Diagnostic>,
    stats: BuildStats,
    seen_old: Vec<bool>,
}

impl<'a> Builder<'a> {
    /// A builder that may reuse the entries of `old`.
    pub fn new(old: Option<&'a LibraryIndex>) -> Builder<'a> {
        Builder {
            old,
            entries: Vec::new(),
            signatures: Vec::new(),
            by_digest: HashMap::new(),
            by_signature: HashMap::new(),
            diagnostics: Vec::new(),
            stats: BuildStats::default(),
            seen_old: vec![false; old.map_or(0, LibraryIndex::len)],
        }
    }

    fn old_entry(&mut self, path: &str) -> Option<(usize, &'a Entry)> {
        let old = self.old?;
        let i = old.position(path)?;
        self.seen_old[i] = true;
        Some((i, &old.entries()[i]))
    }

    /// The earlier entry of `file` when its stamps (and its side file's) still match:
    /// the caller then need not read the file; pass the answer to [`Builder::reuse`].
    pub fn unchanged(&mut self, file: &SourceFile) -> Option<usize> {
        let (i, e) = self.old_entry(&file.path)?;
        let side_same = match (&e.side, &file.side) {
            (None, None) => true,
            (Some(a), Some((path, _, stamp))) => a.path == *path && a.stamp == *stamp,
            _ => false,
        };
        (e.stamp == file.stamp && side_same && e.stamp.modified_ns != 0).then_some(i)
    }

    /// Reuses entry `i` of the earlier index (found by [`Builder::unchanged`]).
    pub fn reuse(&mut self, i: usize, origin: &str) {
        let Some(old) = self.old else { return };
        let entry = old.entries()[i].clone();
        let signature = old.signature(i).to_vec();
        self.stats.n_files += 1;
        self.stats.n_unchanged += 1;
        self.push(entry, signature, origin);
    }

    /// Adds a file read by the caller: `bytes` of the spectrum, and the side file's text
    /// when there is one. Reuses the earlier entry when the digests match.
    pub fn add(&mut self, file: &SourceFile, bytes: &[u8], side_text: Option<&str>) {
        self.stats.n_files += 1;
        let sha256 = sha256_hex(bytes);
        let side_sha = side_text.map(|t| sha256_hex(t.as_bytes()));
        let side = file
            .side
            .as_ref()
            .zip(side_sha.clone())
            .map(|((path, _, stamp), sha256)| SideFile {
                path: path.clone(),
                sha256,
                stamp: *stamp,
            });
        if let Some((i, e)) = self.old_entry(&file.path) {
            let same_side = e.side.as_ref().map(|s| &s.sha256) == side_sha.as_ref();
            if e.sha256 == sha256 && same_side {
                let mut entry = e.clone();
                entry.stamp = file.stamp;
                entry.side = side;
                let signature = self
                    .old
                    .map(|o| o.signature(i).to_vec())
                    .unwrap_or_default();
                self.stats.n_same_digest += 1;
                self.push(entry, signature, &file.origin);
                return;
            }
            self.stats.n_changed += 1;
        }
        let stem = file
            .path
            .rsplit('/')
            .next()
            .unwrap_or(&file.path)
            .rsplit_once('.')
            .map_or(file.path.as_str(), |(s, _)| s)
            .to_owned();
        let (header, grid) = match super::grid::read_grid(bytes, &file.origin) {
            Ok(x) => x,
            Err(super::grid::GridError::Unreadable(mut d)) => {
                self.stats.n_left_out += 1;
                self.diagnostics.push(
                    Diagnostic::error(
                        &file.origin,
                        "unreadable reference spectrum: left out of the library",
                    )
                    .with_help("the problems in the file are listed below"),
                );
                self.diagnostics.append(&mut d);
                return;
            }
            Err(e) => {
                self.stats.n_left_out += 1;
                self.diagnostics.push(Diagnostic::error(
                    &file.origin,
                    format!("{e}: left out of the library"),
                ));
                return;
            }
        };
        let is_jcamp = header.kind == SpectrumFileKind::Jcamp;
        let side_pair = file
            .side
            .as_ref()
            .zip(side_text)
            .map(|((_, origin, _), text)| (text, origin.as_str()));
        let (meta, found) =
            super::meta::metadata(is_jcamp.then_some(&header), &file.origin, &stem, side_pair);
        let warnings: Vec<String> = found
            .iter()
            .filter(|d| !d.is_error())
            .map(|d| d.message.clone())
            .collect();
        let failed = found.iter().any(Diagnostic::is_error);
        self.diagnostics.extend(found);
        let Some(meta) = meta.filter(|_| !failed) else {
            self.stats.n_left_out += 1;
            self.diagnostics.push(Diagnostic::error(
                &file.origin,
                "its side file cannot be used: left out of the library",
            ));
            return;
        };
        let entry = entry_of(file, sha256, side, meta, &grid, warnings);
        self.stats.n_indexed += 1;
        self.push(entry, grid.signature, &file.origin);
    }

    fn push(&mut self, entry: Entry, signature: Vec<i16>, origin: &str) {
        if let Some(first) = self.by_digest.get(&entry.sha256) {
            self.stats.n_left_out += 1;
            self.diagnostics.push(
                Diagnostic::warning(
                    origin,
                    format!("a byte-for-byte copy of {first}: left out (duplicate file)"),
                )
                .with_help("remove one of the two files"),
            );
            return;
        }
        if let Some(first) = self.by_signature.get(&signature) {
            self.stats.n_left_out += 1;
            self.diagnostics.push(
                Diagnostic::warning(
                    origin,
                    format!("the same spectrum as {first} (identical on the library grid): left out (duplicate spectrum)"),
                )
                .with_help("remove one of the two files, or keep the one whose header is right"),
            );
            return;
        }
        for w in &entry.warnings {
            if !self
                .diagnostics
                .iter()
                .any(|d| d.origin == origin && &d.message == w)
            {
                self.diagnostics
                    .push(Diagnostic::warning(origin, w.clone()));
            }
        }
        self.by_digest
            .insert(entry.sha256.clone(), entry.path.clone());
        self.by_signature
            .insert(signature.clone(), entry.path.clone());
        self.entries.push(entry);
        self.signatures.extend_from_slice(&signature);
    }

    /// The index (entries in path order), every problem found, and the statistics.
    pub fn finish(mut self) -> (LibraryIndex, Vec<Diagnostic>, BuildStats) {
        self.stats.n_removed = self.seen_old.iter().filter(|s| !**s).count();
        let mut order: Vec<usize> = (0..self.entries.len()).collect();
        order.sort_by(|&a, &b| self.entries[a].path.cmp(&self.entries[b].path));
        let mut entries = Vec::with_capacity(order.len());
        let mut signatures = Vec::with_capacity(self.signatures.len());
        for i in order {
            entries.push(self.entries[i].clone());
            signatures.extend_from_slice(&self.signatures[i * GRID_POINTS..(i + 1) * GRID_POINTS]);
        }
        (
            LibraryIndex {
                entries,
                signatures,
            },
            self.diagnostics,
            self.stats,
        )
    }
}

fn entry_of(
    file: &SourceFile,
    sha256: String,
    side: Option<SideFile>,
    meta: Metadata,
    grid: &GridSpectrum,
    warnings: Vec<String>,
) -> Entry {
    Entry {
        path: file.path.clone(),
        sha256,
        stamp: file.stamp,
        side,
        meta,
        covered: (grid.first as u16, grid.last as u16),
        warnings,
    }
}

/// An index straight from signatures and metadata (benchmarks and tests build synthetic
/// libraries this way); entries are sorted by path, duplicates are not checked.
pub fn index_from_parts(parts: Vec<(Entry, Vec<i16>)>) -> LibraryIndex {
    let mut parts = parts;
    parts.sort_by(|a, b| a.0.path.cmp(&b.0.path));
    let mut index = LibraryIndex::default();
    for (entry, signature) in parts {
        if signature.len() != GRID_POINTS {
            continue;
        }
        index.entries.push(entry);
        index.signatures.extend_from_slice(&signature);
    }
    index
}

/// A bare entry for a synthetic reference (no files behind it).
pub fn synthetic_entry(path: &str, meta: Metadata, grid: &GridSpectrum) -> Entry {
    Entry {
        path: path.to_owned(),
        sha256: sha256_hex(path.as_bytes()),
        stamp: Stamp::default(),
        side: None,
        meta,
        covered: (grid.first as u16, grid.last as u16),
        warnings: Vec::new(),
    }
}
