//! Loading and validating a catalogue from `(file name, text)` pairs.
//!
//! The loader never stops at the first problem: every file is parsed, every list item is
//! read on its own, every value is checked, and all problems come back together, each
//! with `file:line:column`, the key path (`groups[3].bands[0].range`) and, for unknown
//! keys and ids, a "did you mean" hint. Only the CLI reads files; this module takes text.
//!
//! What is checked (docs/rules.md keeps the
//! list for authors):
//! - YAML syntax; unknown keys and wrong value types (via the raw serde types);
//! - ranges: `lo < hi`, both inside 400–4000 cm⁻¹ (shifts: `lo <= hi`, within ±1200);
//! - a non-empty `source` on every group, band, override, shift, MS clue and rule;
//! - ids: snake case, unique across all files and all kinds of rule;
//! - references (`subtype_of`, `excludes`, `requires_any`, `needs_any`, `supports`) name
//!   known group ids (`needs_any` may also name the reserved `sp3_carbon`);
//! - no cycle in the subtype graph;
//! - atoms, DBE and open bonds agree by the valence count
//!   `Σ nᵢ·(vᵢ − 2) + 2 − 2·(dbe − ring_closures) = open bonds`;
//! - every id of [`REQUIRED_GROUP_IDS`] exists.

use super::model::{
    ArtefactRule, BandOverride, BandRule, Catalogue, Group, GroupCheck, Ionic, MsClue, MsClueKind,
    OpenBonds, PatternRule, Range, RuleRef, Shift, SkeletonRule, TechniqueEffect,
};
use super::raw::{
    RawArtefact, RawBand, RawCheck, RawGroup, RawMsClue, RawPattern, RawRange, RawSkeleton,
    RawTechniqueEffect, SECTIONS,
};
use super::REQUIRED_GROUP_IDS;
use crate::chem::composition::standard_valence;
use crate::chem::Composition;
use crate::diag::{closest_match, Diagnostic, Position};
use crate::yaml::{self, KeyPath, Node, NodeKind, Step};
use petgraph::graph::{DiGraph, NodeIndex};
use serde::de::DeserializeOwned;
use sha2::{Digest, Sha256};
use std::collections::{BTreeMap, HashMap};

/// Lowest wavenumber a rule may name (cm⁻¹): the usual mid-IR lower limit.
pub const MIN_WAVENUMBER: f64 = 400.0;
/// Highest wavenumber a rule may name (cm⁻¹).
pub const MAX_WAVENUMBER: f64 = 4000.0;
/// The reserved `needs_any` condition: the candidate has at least one skeleton carbon.
pub const SP3_CARBON: &str = "sp3_carbon";
/// Largest shift a rule may document, either way (cm⁻¹).
const MAX_SHIFT: f64 = 1200.0;

/// Loads a catalogue from `(file name, text)` pairs and returns it with every problem
/// found. File names are kept as given (relative to the catalogue root) in diagnostics
/// and in each rule's `defined_at`. Files are read in name order, whatever the order
/// given. The catalogue is only trustworthy when no diagnostic is an error.
pub fn load<'a, I>(files: I) -> (Catalogue, Vec<Diagnostic>)
where
    I: IntoIterator<Item = (&'a str, &'a str)>,
{
    let mut files: Vec<(&str, &str)> = files.into_iter().collect();
    files.sort_by(|a, b| a.0.cmp(b.0));
    let mut loader = Loader::default();
    for (name, text) in &files {
        loader.read_file(name, text);
    }
    let mut catalogue = loader.cross_check();
    catalogue.digest = digest(&files);
    let mut diagnostics = loader.diagnostics;
    // File order, then place; problems without a file (a missing required id) come last.
    diagnostics.sort_by(|a, b| {
        let key = |d: &Diagnostic| (d.origin.starts_with('<'), d.origin.clone(), d.position);
        key(a).cmp(&key(b))
    });
    (catalogue, diagnostics)
}

/// Loads a catalogue and returns it only when it has no errors.
pub fn load_checked<'a, I>(files: I) -> Result<Catalogue, Vec<Diagnostic>>
where
    I: IntoIterator<Item = (&'a str, &'a str)>,
{
    let (catalogue, diagnostics) = load(files);
    if diagnostics.iter().any(Diagnostic::is_error) {
        Err(diagnostics)
    } else {
        Ok(catalogue)
    }
}

/// SHA-256 (hex) over the files in name order: for each file its name, a NUL byte, its
/// text and a NUL byte, so that renaming a file or moving text between files changes it.
pub fn digest(files: &[(&str, &str)]) -> String {
    let mut sorted: Vec<&(&str, &str)> = files.iter().collect();
    sorted.sort_by(|a, b| a.0.cmp(b.0));
    let mut hasher = Sha256::new();
    for (name, text) in sorted {
        hasher.update(name.as_bytes());
        hasher.update([0u8]);
        hasher.update(text.as_bytes());
        hasher.update([0u8]);
    }
    hasher
        .finalize()
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// One parsed file: its name, text and marked tree.
struct File<'a> {
    name: &'a str,
    text: &'a str,
    root: Node,
    /// Byte offset where each line starts, for fast offset-to-position conversion.
    line_starts: Vec<usize>,
}

impl File<'_> {
    /// The 0-based position of a byte offset (same result as `Position::of_offset`, but
    /// by binary search: the loader converts hundreds of offsets per file).
    fn position(&self, offset: usize) -> Position {
        let mut offset = offset.min(self.text.len());
        while !self.text.is_char_boundary(offset) {
            offset -= 1;
        }
        let line = self.line_starts.partition_point(|&start| start <= offset) - 1;
        let column = self.text[self.line_starts[line]..offset].chars().count();
        Position { line, column }
    }
}

/// Where a loaded item sits: its file (index into `Loader::files`) and key path.
#[derive(Clone, Debug)]
struct Place {
    file: usize,
    path: Vec<Step>,
}

impl Place {
    fn child(&self, step: Step) -> Place {
        let mut path = self.path.clone();
        path.push(step);
        Place {
            file: self.file,
            path,
        }
    }

    fn key(&self, key: &str) -> Place {
        self.child(Step::Key(key.to_owned()))
    }

    fn index(&self, i: usize) -> Place {
        self.child(Step::Index(i))
    }
}

/// Every id defined anywhere, with what defines it and where (for duplicates).
struct IdDef {
    place: Place,
}

#[derive(Default)]
struct Loader<'a> {
    files: Vec<File<'a>>,
    diagnostics: Vec<Diagnostic>,
    groups: Vec<(Group, Place)>,
    skeleton: Vec<(SkeletonRule, Place)>,
    artefacts: Vec<(ArtefactRule, Place)>,
    patterns: Vec<(PatternRule, Place)>,
    effects: Vec<(TechniqueEffect, Place)>,
    hydrate_bands: Vec<(ArtefactRule, Place)>,
}

impl<'a> Loader<'a> {
    /// A diagnostic at `place` (the deepest point of its path that exists in the file).
    fn diag_at(&self, place: &Place, message: impl Into<String>) -> Diagnostic {
        let file = &self.files[place.file];
        let offset = yaml::offset_of(&file.root, &place.path);
        let position = file.position(offset);
        let d = Diagnostic::error(file.name, message).at(file.text, position);
        if place.path.is_empty() {
            d
        } else {
            d.with_key_path(KeyPath(place.path.clone()).to_string())
        }
    }

    fn error(&mut self, place: &Place, message: impl Into<String>) {
        let d = self.diag_at(place, message);
        self.diagnostics.push(d);
    }

    fn error_with_help(&mut self, place: &Place, message: impl Into<String>, help: String) {
        let d = self.diag_at(place, message).with_help(help);
        self.diagnostics.push(d);
    }

    fn rule_ref(&self, place: &Place) -> RuleRef {
        let file = &self.files[place.file];
        let offset = yaml::offset_of(&file.root, &place.path);
        RuleRef {
            file: file.name.to_owned(),
            line: file.position(offset).line + 1,
        }
    }

    /// Parses one file and reads every item of every section.
    fn read_file(&mut self, name: &'a str, text: &'a str) {
        let root = match yaml::parse_tree(text) {
            Ok(Some(root)) => root,
            Ok(None) => return, // an empty file holds no rules
            Err(e) => {
                let mut d = Diagnostic::error(name, format!("invalid YAML: {}", e.message));
                if let Some(offset) = e.offset {
                    d = d.at_offset(text, offset);
                }
                self.diagnostics.push(d);
                return;
            }
        };
        let file_index = self.files.len();
        let line_starts = std::iter::once(0)
            .chain(text.match_indices('\n').map(|(i, _)| i + 1))
            .collect();
        self.files.push(File {
            name,
            text,
            root,
            line_starts,
        });
        let top = Place {
            file: file_index,
            path: Vec::new(),
        };
        let root = self.files[file_index].root.clone();
        if !matches!(root.kind, NodeKind::Map(_)) {
            self.error(
                &top,
                format!(
                    "a rules file is a mapping with the sections {}",
                    SECTIONS.join(", ")
                ),
            );
            return;
        }
        for entry in root.entries() {
            let place = top.key(&entry.key);
            if !SECTIONS.contains(&entry.key.as_str()) {
                let message = format!("unknown section \"{}\"", entry.key);
                match closest_match(&entry.key, SECTIONS) {
                    Some(s) => {
                        self.error_with_help(&place, message, format!("did you mean \"{s}\"?"))
                    }
                    None => self.error_with_help(
                        &place,
                        message,
                        format!("expected one of {}", SECTIONS.join(", ")),
                    ),
                }
                continue;
            }
            if entry.value.is_null() {
                continue;
            }
            if !matches!(entry.value.kind, NodeKind::Seq(_)) {
                self.error(&place, format!("section \"{}\" must be a list", entry.key));
                continue;
            }
            for (i, item) in entry.value.items().iter().enumerate() {
                let item_place = place.index(i);
                match entry.key.as_str() {
                    "groups" => {
                        if let Some(raw) = self.item::<RawGroup>(&item_place, item) {
                            self.add_group(raw, item_place);
                        }
                    }
                    "skeleton" => {
                        if let Some(raw) = self.item::<RawSkeleton>(&item_place, item) {
                            self.add_skeleton(raw, item_place);
                        }
                    }
                    "artefacts" => {
                        if let Some(raw) = self.item::<RawArtefact>(&item_place, item) {
                            let rule = self.artefact(raw, &item_place);
                            self.artefacts.push((rule, item_place));
                        }
                    }
                    "hydrate_bands" => {
                        if let Some(raw) = self.item::<RawArtefact>(&item_place, item) {
                            let rule = self.artefact(raw, &item_place);
                            self.hydrate_bands.push((rule, item_place));
                        }
                    }
                    "patterns" => {
                        if let Some(raw) = self.item::<RawPattern>(&item_place, item) {
                            self.add_pattern(raw, item_place);
                        }
                    }
                    _ => {
                        if let Some(raw) = self.item::<RawTechniqueEffect>(&item_place, item) {
                            self.add_effect(raw, item_place);
                        }
                    }
                }
            }
        }
    }

    /// Reads one list item into its raw type, reporting a failure at its place.
    fn item<T: DeserializeOwned>(&mut self, place: &Place, node: &Node) -> Option<T> {
        let file = &self.files[place.file];
        match yaml::deserialize_item::<T>(file.text, node) {
            Ok(raw) => Some(raw),
            Err(e) => {
                // Rebuild the full key path; an unknown key is located in the tree itself,
                // so the caret sits on the misspelt key rather than on its mapping.
                let mut inner = e
                    .inner_path
                    .as_deref()
                    .map(yaml::parse_path)
                    .unwrap_or_default();
                let unknown_key = unknown_field(&e.message);
                if let Some(key) = &unknown_key {
                    inner.push(Step::Key(key.clone()));
                }
                let mut full = place.path.clone();
                full.extend(inner.iter().cloned());
                let key_path = KeyPath(full).to_string();
                let position = match (&unknown_key, e.position) {
                    (Some(_), _) | (None, None) => file.position(yaml::offset_of(node, &inner)),
                    (None, Some(p)) => p,
                };
                let mut d = Diagnostic::error(file.name, e.message.clone())
                    .at(file.text, position)
                    .with_key_path(key_path);
                if let Some(help) = suggest_from_serde(&e.message) {
                    d = d.with_help(help);
                }
                self.diagnostics.push(d);
                None
            }
        }
    }

    fn check_source(&mut self, place: &Place, source: &Option<String>) -> String {
        match source.as_deref().map(str::trim) {
            Some(s) if !s.is_empty() => s.to_owned(),
            Some(_) => {
                self.error(&place.key("source"), "source is empty");
                String::new()
            }
            None => {
                self.error(
                    place,
                    "missing source (name a handbook table or paper, or write `common practice`; add `from memory` where recalled)",
                );
                String::new()
            }
        }
    }

    fn check_id(&mut self, place: &Place, id: &str) {
        let snake = !id.is_empty()
            && id.starts_with(|c: char| c.is_ascii_lowercase())
            && id
                .chars()
                .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_');
        if !snake {
            self.error(
                &place.key("id"),
                format!("id \"{id}\" must be snake case (a-z, 0-9, _; starting with a letter)"),
            );
        }
        if id == SP3_CARBON {
            self.error(
                &place.key("id"),
                format!("\"{SP3_CARBON}\" is reserved for `needs_any`"),
            );
        }
    }

    fn check_text(&mut self, place: &Place, key: &str, value: &str) {
        if value.trim().is_empty() {
            self.error(&place.key(key), format!("{key} is empty"));
        }
    }

    /// A range in cm⁻¹: `lo < hi`, inside 400–4000.
    fn range(&mut self, place: &Place, raw: RawRange) -> Range {
        let [lo, hi] = raw;
        if !(lo.is_finite() && hi.is_finite()) {
            self.error(place, "range bounds must be finite numbers");
        } else if lo >= hi {
            self.error(
                place,
                format!("inverted or empty range [{lo}, {hi}]: write the lower wavenumber first"),
            );
        } else if lo < MIN_WAVENUMBER || hi > MAX_WAVENUMBER {
            self.error(
                place,
                format!(
                    "range [{lo}, {hi}] leaves the {MIN_WAVENUMBER}–{MAX_WAVENUMBER} cm⁻¹ window"
                ),
            );
        }
        Range { lo, hi }
    }

    fn band(&mut self, place: &Place, raw: RawBand) -> BandRule {
        self.check_text(place, "label", &raw.label);
        let range = self.range(&place.key("range"), raw.range);
        let source = self.check_source(place, &raw.source);
        if let Some(tag) = &raw.one_of {
            if raw.role != super::model::BandRole::Diagnostic {
                self.error(
                    &place.key("one_of"),
                    format!("one_of \"{tag}\" only makes sense on a diagnostic band"),
                );
            }
        }
        let mut by_technique = BTreeMap::new();
        for (technique, o) in raw.by_technique {
            let o_place = place.key("by_technique").key(technique.word());
            let o_range = o.range.map(|r| self.range(&o_place.key("range"), r));
            let o_source = self.check_source(&o_place, &o.source);
            by_technique.insert(
                technique,
                BandOverride {
                    range: o_range,
                    strength: o.strength,
                    shape: o.shape,
                    may_be_absent: o.may_be_absent,
                    source: o_source,
                },
            );
        }
        let mut shifts = Vec::new();
        for (i, s) in raw.shifts.into_iter().enumerate() {
            let s_place = place.key("shifts").index(i);
            let [lo, hi] = s.by;
            if !(lo.is_finite() && hi.is_finite()) || lo > hi {
                self.error(
                    &s_place.key("by"),
                    format!("inverted shift [{lo}, {hi}]: write the more negative end first"),
                );
            } else if lo < -MAX_SHIFT || hi > MAX_SHIFT {
                self.error(
                    &s_place.key("by"),
                    format!("shift [{lo}, {hi}] is larger than ±{MAX_SHIFT} cm⁻¹"),
                );
            }
            self.check_text(&s_place, "cause", &s.cause);
            let source = self.check_source(&s_place, &s.source);
            shifts.push(Shift {
                cause: s.cause,
                by: Range { lo, hi },
                source,
            });
        }
        BandRule {
            label: raw.label,
            range,
            strength: raw.strength,
            shape: raw.shape,
            role: raw.role,
            one_of: raw.one_of,
            may_be_absent: raw.may_be_absent,
            by_technique,
            shifts,
            source,
            defined_at: self.rule_ref(place),
        }
    }

    fn ms_clue(&mut self, place: &Place, raw: RawMsClue) -> Option<MsClue> {
        let source = self.check_source(place, &raw.source);
        self.check_text(place, "label", &raw.label);
        let kind = match (raw.ion, raw.loss) {
            (Some(mz), None) if mz > 0.0 && mz.is_finite() => MsClueKind::Ion { mz },
            (None, Some(mass)) if mass > 0.0 && mass.is_finite() => MsClueKind::Loss { mass },
            (Some(_), None) => {
                self.error(&place.key("ion"), "ion m/z must be a positive number");
                return None;
            }
            (None, Some(_)) => {
                self.error(&place.key("loss"), "loss must be a positive number of u");
                return None;
            }
            _ => {
                self.error(place, "an MS clue names exactly one of `ion` or `loss`");
                return None;
            }
        };
        Some(MsClue {
            kind,
            label: raw.label,
            source,
            defined_at: self.rule_ref(place),
        })
    }

    fn check(&mut self, place: &Place, raw: RawCheck) -> GroupCheck {
        self.check_text(place, "text", &raw.text);
        let source = self.check_source(place, &raw.source);
        GroupCheck {
            kind: raw.kind,
            text: raw.text,
            source,
            defined_at: self.rule_ref(place),
        }
    }

    fn add_group(&mut self, mut raw: RawGroup, place: Place) {
        self.check_id(&place, &raw.id);
        self.check_text(&place, "name", &raw.name);
        let source = self.check_source(&place, &raw.source);
        let mut atoms = Composition::new();
        let mut valence_known = true;
        let mut twice_sum: i64 = 0;
        for (symbol, n) in &raw.atoms {
            let a_place = place.key("atoms").key(symbol);
            match standard_valence(symbol) {
                Some(v) => twice_sum += i64::from(*n) * (i64::from(v) - 2),
                None => {
                    valence_known = false;
                    let known = [
                        "C", "H", "N", "O", "S", "P", "F", "Cl", "Br", "I", "Si", "B",
                    ];
                    let message = format!("unknown element symbol \"{symbol}\"");
                    match closest_match(symbol, known) {
                        Some(s) => self.error_with_help(
                            &a_place,
                            message,
                            format!("did you mean \"{s}\"?"),
                        ),
                        None => self.error(&a_place, message),
                    }
                }
            }
            if *n == 0 {
                self.error(
                    &a_place,
                    format!(
                        "atom count of {symbol} must be at least 1 (leave the symbol out instead)"
                    ),
                );
            }
            atoms.add(symbol, *n);
        }
        let bonds = OpenBonds {
            hetero: raw.bonds.hetero,
            hetero_or_h: raw.bonds.hetero_or_h,
            carbon: raw.bonds.carbon,
            carbon_or_h: raw.bonds.carbon_or_h,
        };
        if raw.ring_closures > raw.dbe {
            self.error(
                &place.key("ring_closures"),
                format!(
                    "ring_closures ({}) cannot exceed dbe ({}): each closed ring is one DBE",
                    raw.ring_closures, raw.dbe
                ),
            );
        } else if valence_known {
            // Valence count of a connected fragment: Σ nᵢ·vᵢ = 2·(internal bonds) + open,
            // internal bonds = (atoms − 1) + rings + pi bonds inside the fragment; rings
            // closed through outside atoms are part of `dbe` but use no internal bond.
            let inside = i64::from(raw.dbe) - i64::from(raw.ring_closures);
            let open = twice_sum + 2 - 2 * inside;
            if open != i64::from(bonds.total()) {
                self.error_with_help(
                    &place.key("bonds"),
                    format!(
                        "atoms, dbe and bonds disagree: the valence count gives {open} open bonds, `bonds` lists {}",
                        bonds.total()
                    ),
                    "open bonds = Σ n·(valence − 2) + 2 − 2·(dbe − ring_closures), valences H 1, O 2, N 3, C 4 ...".to_owned(),
                );
            }
        }
        if bonds.carbon + bonds.carbon_or_h > 0 && atoms.count("C") == 0 {
            self.error(
                &place.key("bonds"),
                "carbon or carbon_or_h bonds need a carbon among the atoms",
            );
        }
        if bonds.hetero + bonds.hetero_or_h > 0 && atoms.n_heteroatoms() == 0 {
            self.error(
                &place.key("bonds"),
                "hetero or hetero_or_h bonds need a heteroatom among the atoms",
            );
        }
        let mut bands = Vec::new();
        for (i, b) in std::mem::take(&mut raw.bands).into_iter().enumerate() {
            bands.push(self.band(&place.key("bands").index(i), b));
        }
        let mut ms = Vec::new();
        for (i, m) in std::mem::take(&mut raw.ms).into_iter().enumerate() {
            if let Some(clue) = self.ms_clue(&place.key("ms").index(i), m) {
                ms.push(clue);
            }
        }
        let mut checks = Vec::new();
        for (i, c) in std::mem::take(&mut raw.checks).into_iter().enumerate() {
            checks.push(self.check(&place.key("checks").index(i), c));
        }
        let ionic = self.ionic(&raw, &place);
        let group = Group {
            ionic,
            salt_of: raw.salt_of,
            id: raw.id,
            name: raw.name,
            atoms,
            dbe: raw.dbe,
            ring_closures: raw.ring_closures,
            bonds,
            subtype_of: raw.subtype_of,
            excludes: raw.excludes,
            requires_any: raw.requires_any,
            bands,
            ms,
            checks,
            note: raw.note,
            source,
            defined_at: self.rule_ref(&place),
        };
        self.groups.push((group, place));
    }

    fn add_skeleton(&mut self, raw: RawSkeleton, place: Place) {
        self.check_id(&place, &raw.id);
        if raw.needs_any.is_empty() {
            self.error(
                &place.key("needs_any"),
                "needs_any must name at least one group id or sp3_carbon",
            );
        }
        let band = self.band(&place.key("band"), raw.band);
        self.skeleton.push((
            SkeletonRule {
                id: raw.id,
                band,
                needs_any: raw.needs_any,
            },
            place,
        ));
    }

    fn artefact(&mut self, raw: RawArtefact, place: &Place) -> ArtefactRule {
        self.check_id(place, &raw.id);
        self.check_text(place, "label", &raw.label);
        let range = self.range(&place.key("range"), raw.range);
        let source = self.check_source(place, &raw.source);
        ArtefactRule {
            id: raw.id,
            label: raw.label,
            range,
            techniques: raw.techniques,
            shape: raw.shape,
            source,
            defined_at: self.rule_ref(place),
        }
    }

    /// `ionic` and `salt_of` go together: a salt form names its neutral parent.
    fn ionic(&mut self, raw: &RawGroup, place: &Place) -> Option<Ionic> {
        let ionic = match raw.ionic.as_deref() {
            None => None,
            Some(word) => match Ionic::ALL.iter().find(|(_, w)| *w == word) {
                Some((v, _)) => Some(*v),
                None => {
                    let words = Ionic::ALL.map(|(_, w)| w);
                    let help = closest_match(word, words)
                        .map(|m| format!("did you mean \"{m}\"?"))
                        .unwrap_or_else(|| "expected cation or anion".to_owned());
                    self.error_with_help(
                        &place.key("ionic"),
                        format!("unknown ionic form \"{word}\""),
                        help,
                    );
                    None
                }
            },
        };
        if raw.ionic.is_some() && raw.salt_of.is_none() {
            self.error(
                &place.key("ionic"),
                "a salt-form group (ionic) must name its neutral parent with salt_of",
            );
        }
        if raw.salt_of.is_some() && raw.ionic.is_none() {
            self.error(
                &place.key("salt_of"),
                "salt_of needs ionic: cation or anion",
            );
        }
        ionic
    }

    fn add_pattern(&mut self, raw: RawPattern, place: Place) {
        self.check_id(&place, &raw.id);
        self.check_text(&place, "feature", &raw.feature);
        let source = self.check_source(&place, &raw.source);
        if raw.bands.is_empty() {
            self.error(&place.key("bands"), "a pattern needs at least one band");
        }
        let mut bands = Vec::new();
        for (i, b) in raw.bands.into_iter().enumerate() {
            bands.push(self.band(&place.key("bands").index(i), b));
        }
        let rule = PatternRule {
            id: raw.id,
            feature: raw.feature,
            supports: raw.supports,
            bands,
            source,
            defined_at: self.rule_ref(&place),
        };
        self.patterns.push((rule, place));
    }

    fn add_effect(&mut self, raw: RawTechniqueEffect, place: Place) {
        self.check_id(&place, &raw.id);
        self.check_text(&place, "label", &raw.label);
        let range = self.range(&place.key("range"), raw.range);
        let source = self.check_source(&place, &raw.source);
        if !(1..=3).contains(&raw.weaker_by) {
            self.error(
                &place.key("weaker_by"),
                format!(
                    "weaker_by {} must be 1, 2 or 3 strength classes",
                    raw.weaker_by
                ),
            );
        }
        let rule = TechniqueEffect {
            id: raw.id,
            technique: raw.technique,
            range,
            weaker_by: raw.weaker_by,
            label: raw.label,
            source,
            defined_at: self.rule_ref(&place),
        };
        self.effects.push((rule, place));
    }

    /// Checks that need the whole catalogue and assembles it.
    fn cross_check(&mut self) -> Catalogue {
        self.check_unique_ids();
        let group_ids: Vec<String> = self.groups.iter().map(|(g, _)| g.id.clone()).collect();
        let refs: Vec<(Place, String, Vec<String>)> = self
            .groups
            .iter()
            .flat_map(|(g, place)| {
                [
                    (place.key("subtype_of"), g.id.clone(), g.subtype_of.clone()),
                    (place.key("excludes"), g.id.clone(), g.excludes.clone()),
                    (
                        place.key("requires_any"),
                        g.id.clone(),
                        g.requires_any.clone(),
                    ),
                ]
            })
            .collect();
        for (place, own_id, ids) in refs {
            for (i, id) in ids.iter().enumerate() {
                let p = place.index(i);
                if *id == own_id {
                    self.error(&p, format!("group \"{own_id}\" refers to itself"));
                } else {
                    self.check_reference(&p, id, &group_ids, false);
                }
            }
        }
        let needs: Vec<(Place, Vec<String>)> = self
            .skeleton
            .iter()
            .map(|(r, place)| (place.key("needs_any"), r.needs_any.clone()))
            .collect();
        for (place, ids) in needs {
            for (i, id) in ids.iter().enumerate() {
                self.check_reference(&place.index(i), id, &group_ids, true);
            }
        }
        let supports: Vec<(Place, String)> = self
            .patterns
            .iter()
            .map(|(r, place)| (place.key("supports"), r.supports.clone()))
            .collect();
        for (place, id) in supports {
            self.check_reference(&place, &id, &group_ids, false);
        }
        self.check_salt_forms(&group_ids);
        self.check_subtype_cycles();
        self.check_required(&group_ids);
        Catalogue {
            groups: self.groups.iter().map(|(g, _)| g.clone()).collect(),
            skeleton: self.skeleton.iter().map(|(r, _)| r.clone()).collect(),
            artefacts: self.artefacts.iter().map(|(r, _)| r.clone()).collect(),
            patterns: self.patterns.iter().map(|(r, _)| r.clone()).collect(),
            technique_effects: self.effects.iter().map(|(r, _)| r.clone()).collect(),
            hydrate_bands: self.hydrate_bands.iter().map(|(r, _)| r.clone()).collect(),
            digest: String::new(),
        }
    }

    /// `salt_of` names a known neutral group (not itself a salt form, not the group).
    fn check_salt_forms(&mut self, group_ids: &[String]) {
        let refs: Vec<(Place, String, String)> = self
            .groups
            .iter()
            .filter_map(|(g, place)| {
                g.salt_of
                    .clone()
                    .map(|s| (place.key("salt_of"), g.id.clone(), s))
            })
            .collect();
        for (place, own_id, parent) in refs {
            if parent == own_id {
                self.error(&place, format!("group \"{own_id}\" refers to itself"));
                continue;
            }
            self.check_reference(&place, &parent, group_ids, false);
            let parent_is_ionic = self
                .groups
                .iter()
                .any(|(g, _)| g.id == parent && g.ionic.is_some());
            if parent_is_ionic {
                self.error(
                    &place,
                    format!(
                        "salt_of must name a neutral group; \"{parent}\" is itself a salt form"
                    ),
                );
            }
        }
    }

    fn check_reference(&mut self, place: &Place, id: &str, group_ids: &[String], allow_sp3: bool) {
        if group_ids.iter().any(|g| g == id) || (allow_sp3 && id == SP3_CARBON) {
            return;
        }
        let message = format!("unknown group id \"{id}\"");
        let mut candidates: Vec<&str> = group_ids.iter().map(String::as_str).collect();
        if allow_sp3 {
            candidates.push(SP3_CARBON);
        }
        match closest_match(id, candidates) {
            Some(s) => self.error_with_help(place, message, format!("did you mean \"{s}\"?")),
            None => self.error(place, message),
        }
    }

    fn check_unique_ids(&mut self) {
        let mut all: Vec<(String, Place)> = Vec::new();
        all.extend(self.groups.iter().map(|(g, p)| (g.id.clone(), p.clone())));
        all.extend(self.skeleton.iter().map(|(r, p)| (r.id.clone(), p.clone())));
        all.extend(
            self.artefacts
                .iter()
                .map(|(r, p)| (r.id.clone(), p.clone())),
        );
        all.extend(self.patterns.iter().map(|(r, p)| (r.id.clone(), p.clone())));
        all.extend(self.effects.iter().map(|(r, p)| (r.id.clone(), p.clone())));
        all.extend(
            self.hydrate_bands
                .iter()
                .map(|(r, p)| (r.id.clone(), p.clone())),
        );
        let mut first: HashMap<String, IdDef> = HashMap::new();
        for (id, place) in all {
            match first.get(&id) {
                Some(def) => {
                    let earlier = self.diag_at(&def.place, "").place();
                    self.error_with_help(
                        &place.key("id"),
                        format!("duplicate id \"{id}\""),
                        format!("first defined at {earlier}"),
                    );
                }
                None => {
                    first.insert(id, IdDef { place });
                }
            }
        }
    }

    fn check_subtype_cycles(&mut self) {
        let mut graph: DiGraph<usize, ()> = DiGraph::new();
        let mut index: HashMap<&str, NodeIndex> = HashMap::new();
        for (i, (g, _)) in self.groups.iter().enumerate() {
            index
                .entry(g.id.as_str())
                .or_insert_with(|| graph.add_node(i));
        }
        for (g, _) in &self.groups {
            for parent in &g.subtype_of {
                if let (Some(&a), Some(&b)) = (index.get(g.id.as_str()), index.get(parent.as_str()))
                {
                    if a != b {
                        graph.add_edge(a, b, ());
                    }
                }
            }
        }
        let mut cycles: Vec<Vec<usize>> = petgraph::algo::tarjan_scc(&graph)
            .into_iter()
            .filter(|component| component.len() > 1)
            .map(|component| {
                let mut members: Vec<usize> = component.iter().map(|n| graph[*n]).collect();
                members.sort_unstable();
                members
            })
            .collect();
        cycles.sort();
        for members in cycles {
            let ids: Vec<&str> = members
                .iter()
                .map(|&i| self.groups[i].0.id.as_str())
                .collect();
            let message = format!("subtype cycle among {}", ids.join(", "));
            let place = self.groups[members[0]].1.key("subtype_of");
            self.error(&place, message);
        }
    }

    fn check_required(&mut self, group_ids: &[String]) {
        let missing: Vec<&str> = REQUIRED_GROUP_IDS
            .iter()
            .copied()
            .filter(|r| !group_ids.iter().any(|g| g == r))
            .collect();
        if missing.is_empty() {
            return;
        }
        self.diagnostics.push(
            Diagnostic::error(
                "<catalogue>",
                format!("required group ids missing: {}", missing.join(", ")),
            )
            .with_help(
                "every catalogue defines the required group ids (DEVELOPERS.md, \"Contracts\")",
            ),
        );
    }
}

/// The key named by serde's `unknown field "x", ...` message.
fn unknown_field(message: &str) -> Option<String> {
    let rest = message.strip_prefix("unknown field \"")?;
    rest.split_once('"').map(|(word, _)| word.to_owned())
}

/// The closest candidate to `word`: by edit distance, else a candidate with the same
/// letters in another order (a transposition such as `rnage` for `range`).
fn suggest<'c>(word: &str, candidates: &[&'c str]) -> Option<&'c str> {
    closest_match(word, candidates.iter().copied()).or_else(|| {
        let mut sorted: Vec<char> = word.chars().collect();
        sorted.sort_unstable();
        candidates.iter().copied().find(|c| {
            let mut other: Vec<char> = c.chars().collect();
            other.sort_unstable();
            other == sorted
        })
    })
}

/// A "did you mean" hint for serde's unknown-field and unknown-variant messages, which
/// read `unknown field "x", expected one of "a", "b"` (quotes already turned to `"`).
fn suggest_from_serde(message: &str) -> Option<String> {
    let rest = message
        .strip_prefix("unknown field \"")
        .or_else(|| message.strip_prefix("unknown variant \""))?;
    let (word, tail) = rest.split_once('"')?;
    let expected = tail.split_once("expected")?.1;
    let candidates: Vec<&str> = expected
        .split('"')
        .enumerate()
        .filter(|(i, _)| i % 2 == 1)
        .map(|(_, s)| s)
        .collect();
    suggest(word, &candidates).map(|s| format!("did you mean \"{s}\"?"))
}

#[cfg(test)]
mod tests {
    use super::*;

    const KETONE: &str = "\
groups:
  - id: ketone_x
    name: test ketone
    atoms: { C: 1, O: 1 }
    dbe: 1
    bonds: { carbon: 2 }
    source: common practice
    bands:
      - label: C=O stretch
        range: [1700, 1730]
        strength: strong
        role: diagnostic
        source: common practice
";

    fn messages(diagnostics: &[Diagnostic]) -> Vec<String> {
        diagnostics
            .iter()
            .filter(|d| !d.message.starts_with("required group ids missing"))
            .map(ToString::to_string)
            .collect()
    }

    #[test]
    fn rules_remember_the_line_they_are_defined_on() {
        let (catalogue, diagnostics) = load([("k.yaml", KETONE)]);
        assert!(messages(&diagnostics).is_empty(), "{diagnostics:?}");
        let g = catalogue.group("ketone_x").expect("loaded");
        assert_eq!(
            g.defined_at,
            RuleRef {
                file: "k.yaml".into(),
                line: 2
            }
        );
        assert_eq!(g.bands[0].defined_at.line, 9);
        assert_eq!(g.atoms.to_string(), "CO");
    }

    #[test]
    fn digest_depends_on_names_and_text_but_not_on_order() {
        let a = [("a.yaml", "groups: []\n"), ("b.yaml", KETONE)];
        let b = [("b.yaml", KETONE), ("a.yaml", "groups: []\n")];
        assert_eq!(digest(&a), digest(&b));
        assert_ne!(
            digest(&a),
            digest(&[("a.yaml", "groups: []\n"), ("c.yaml", KETONE)])
        );
        assert_ne!(
            digest(&a),
            digest(&[("a.yaml", "groups: [] \n"), ("b.yaml", KETONE)])
        );
        assert_eq!(digest(&a).len(), 64);
        // SHA-256 of the empty input (FIPS 180-4 test vector, common practice).
        let mut h = Sha256::new();
        h.update(b"");
        let empty: String = h.finalize().iter().map(|b| format!("{b:02x}")).collect();
        assert_eq!(
            empty,
            "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"
        );
    }

    #[test]
    fn files_are_read_in_name_order() {
        let other = KETONE.replace("ketone_x", "ketone_y");
        let (catalogue, _) = load([("z.yaml", KETONE), ("a.yaml", other.as_str())]);
        let ids: Vec<&str> = catalogue.groups.iter().map(|g| g.id.as_str()).collect();
        assert_eq!(ids, ["ketone_y", "ketone_x"]);
    }

    #[test]
    fn a_ring_closed_through_the_skeleton_is_counted_by_ring_closures() {
        let lactone = "groups:\n  - { id: lac, name: l, atoms: { C: 1, O: 2 }, dbe: 2, ring_closures: 1, bonds: { carbon: 1, hetero: 1 }, source: s }\n";
        let (_, diagnostics) = load([("l.yaml", lactone)]);
        assert!(messages(&diagnostics).is_empty(), "{diagnostics:?}");
        let too_many = lactone.replace("ring_closures: 1", "ring_closures: 3");
        let (_, diagnostics) = load([("l.yaml", too_many.as_str())]);
        assert_eq!(
            messages(&diagnostics),
            ["error: l.yaml:2:56: groups[0].ring_closures: ring_closures (3) cannot exceed dbe (2): each closed ring is one DBE"]
        );
    }

    #[test]
    fn every_bad_item_of_a_file_is_reported() {
        let text = "groups:\n  - { id: a, nme: x }\n  - { id: b, name: y, atoms: {}, dbe: x }\n";
        let (_, diagnostics) = load([("t.yaml", text)]);
        let m = messages(&diagnostics);
        assert_eq!(m.len(), 2, "{m:?}");
        assert!(
            m[0].starts_with("error: t.yaml:2:14: groups[0].nme: unknown field \"nme\""),
            "{m:?}"
        );
        assert!(m[1].starts_with("error: t.yaml:3:"), "{m:?}");
        assert_eq!(
            diagnostics[0].help.as_deref(),
            Some("did you mean \"name\"?")
        );
    }

    #[test]
    fn columns_count_characters_after_non_ascii_text() {
        let text = "artefacts:\n  - { id: x, label: \"µ cm⁻¹\", range: [3000, 2000], source: s }\n";
        let (_, diagnostics) = load([("u.yaml", text)]);
        let m = messages(&diagnostics);
        let col = text
            .lines()
            .nth(1)
            .expect("line")
            .chars()
            .position(|c| c == 'r')
            .expect("r");
        assert_eq!(m.len(), 1, "{m:?}");
        // `range` is the first `r` of that line.
        assert!(
            m[0].starts_with(&format!(
                "error: u.yaml:2:{}: artefacts[0].range: inverted",
                col + 1
            )),
            "{m:?}"
        );
    }

    #[test]
    fn empty_files_and_empty_sections_hold_no_rules() {
        let (catalogue, diagnostics) = load([
            ("e.yaml", ""),
            ("n.yaml", "groups:\n"),
            ("c.yaml", "# only a comment\n"),
        ]);
        assert!(messages(&diagnostics).is_empty(), "{diagnostics:?}");
        assert!(catalogue.groups.is_empty());
    }

    #[test]
    fn a_file_must_be_one_mapping() {
        let (_, d) = load([("l.yaml", "- a\n- b\n")]);
        assert!(
            messages(&d)[0].contains("a rules file is a mapping"),
            "{d:?}"
        );
        let (_, d) = load([("m.yaml", "groups: []\n---\ngroups: []\n")]);
        assert!(
            messages(&d)[0].starts_with(
                "error: m.yaml:2:1: invalid YAML: a rules file holds one YAML document"
            ),
            "{d:?}"
        );
        let (_, d) = load([("s.yaml", "groups: 3\n")]);
        assert_eq!(
            messages(&d),
            ["error: s.yaml:1:1: groups: section \"groups\" must be a list"]
        );
    }

    #[test]
    fn the_valence_equation_accepts_the_textbook_fragments() {
        // common practice: open valences of familiar fragments by the valence count.
        let cases = [
            ("{ C: 1, H: 1, O: 1 }", 1, "{ carbon_or_h: 1 }"), // aldehyde -CHO
            ("{ C: 1, N: 1 }", 2, "{ carbon_or_h: 1 }"),       // nitrile -C#N
            ("{ C: 6 }", 4, "{ carbon_or_h: 6 }"),             // benzene ring
            ("{ N: 1, O: 2 }", 1, "{ hetero: 1 }"),            // nitro -NO2
            ("{ S: 1, O: 2 }", 0, "{ hetero: 2 }"),            // sulfone
            ("{ N: 3 }", 2, "{ hetero: 1 }"),                  // azide -N3
            ("{ P: 1, O: 4 }", 0, "{ hetero: 3 }"),            // phosphate triester
        ];
        for (atoms, dbe, bonds) in cases {
            let text = format!("groups:\n  - {{ id: g, name: g, atoms: {atoms}, dbe: {dbe}, bonds: {bonds}, source: s }}\n");
            let (_, d) = load([("v.yaml", text.as_str())]);
            assert!(messages(&d).is_empty(), "{atoms}: {d:?}");
            let wrong = text.replace(&format!("dbe: {dbe}"), &format!("dbe: {}", dbe + 1));
            let (_, d) = load([("v.yaml", wrong.as_str())]);
            assert_eq!(
                messages(&d).len(),
                1,
                "{atoms} with one DBE too many must fail"
            );
        }
    }

    #[test]
    fn a_clean_catalogue_needs_every_required_id() {
        let (_, d) = load([("k.yaml", KETONE)]);
        let last = d.last().expect("a diagnostic");
        assert!(last
            .message
            .starts_with("required group ids missing: alkene,"));
        assert_eq!(last.place(), "<catalogue>");
        assert!(load_checked([("k.yaml", KETONE)]).is_err());
    }
}
