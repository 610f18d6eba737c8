//! The prepared problem: the case's active evidence and the catalogue's concrete groups
//! turned into indexed, precomputed tables that the enumeration and the per-candidate
//! checks read without searching.
//!
//! Variables are the counts of concrete groups (groups without subtypes, `ring`
//! included). Everything per band and per group that does not depend on the other groups
//! of a candidate is computed here once.

use super::constraints::{band_explanation, diagnostic_bands};
use super::SolveOptions;
use crate::case::{Case, ObservedBand};
use crate::chem::Composition;
use crate::rules::{Catalogue, Group, Technique};
use std::collections::BTreeSet;

/// One item of evidence that a conflict search can set aside.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, serde::Serialize)]
#[serde(rename_all = "snake_case", tag = "kind", content = "index")]
pub enum EvidenceItem {
    /// The stated molecular formula (composition and DBE).
    Formula,
    /// The observed band at this index of `ir.bands`.
    Band(usize),
    /// The stated molecular ion.
    MolecularIon,
    /// The stated M+2 percentage.
    MPlus2,
}

/// A set of concrete group indices: a bit set that grows with the largest index, so a
/// catalogue may hold any number of groups.
#[derive(Clone, Debug, Default)]
pub struct GroupSet(Vec<u64>);

impl GroupSet {
    /// Adds group `i`.
    pub fn insert(&mut self, i: usize) {
        let word = i / 64;
        if word >= self.0.len() {
            self.0.resize(word + 1, 0);
        }
        self.0[word] |= 1 << (i % 64);
    }

    /// Removes group `i`.
    pub fn remove(&mut self, i: usize) {
        if let Some(w) = self.0.get_mut(i / 64) {
            *w &= !(1 << (i % 64));
        }
    }

    /// Empties the set, keeping its storage.
    pub fn clear(&mut self) {
        self.0.iter_mut().for_each(|w| *w = 0);
    }

    /// True when group `i` is in the set.
    pub fn contains(&self, i: usize) -> bool {
        self.0.get(i / 64).is_some_and(|w| w & (1 << (i % 64)) != 0)
    }

    /// How many groups the two sets share.
    pub fn intersection_count(&self, other: &GroupSet) -> u32 {
        self.0
            .iter()
            .zip(&other.0)
            .map(|(a, b)| (a & b).count_ones())
            .sum()
    }

    /// True when the sets share a group.
    pub fn intersects(&self, other: &GroupSet) -> bool {
        self.0.iter().zip(&other.0).any(|(a, b)| a & b != 0)
    }

    /// The set of `items`.
    pub fn of(items: impl IntoIterator<Item = usize>) -> GroupSet {
        let mut s = GroupSet::default();
        for i in items {
            s.insert(i);
        }
        s
    }
}

impl PartialEq for GroupSet {
    /// Equal when they hold the same groups (trailing empty words do not count).
    fn eq(&self, other: &GroupSet) -> bool {
        let n = self.0.len().max(other.0.len());
        (0..n).all(|k| self.0.get(k).unwrap_or(&0) == other.0.get(k).unwrap_or(&0))
    }
}

impl Eq for GroupSet {}

/// A concrete group with its numbers pulled out.
#[derive(Clone, Debug)]
pub struct GroupData<'c> {
    /// The catalogue entry.
    pub group: &'c Group,
    /// Index of the group in `Catalogue::groups`.
    pub catalogue_idx: usize,
    /// `id` and ancestors.
    pub lineage: Vec<String>,
    /// Carbon atoms held.
    pub c: u32,
    /// Fixed hydrogens held.
    pub h: u32,
    /// Heteroatoms held, by element index of `Problem::elements`.
    pub hetero: Vec<(usize, u32)>,
    /// True when the group holds an element the formula lacks (or an unknown one).
    pub foreign_element: Option<String>,
    /// True when the group holds at least one atom (a node of the molecular graph).
    pub has_atoms: bool,
    /// True when the group holds a carbon in a saturated environment with H (dbe 0,
    /// carbon and fixed hydrogen present): it provides sp3 C–H like the skeleton.
    pub sp3_ch: bool,
    /// Presence verdict from the observed bands.
    pub presence: diagnostic_bands::Presence,
}

/// The prepared problem.
#[derive(Clone, Debug)]
pub struct Problem<'c> {
    /// The catalogue.
    pub catalogue: &'c Catalogue,
    /// Tolerance in cm⁻¹.
    pub tolerance: f64,
    /// Technique.
    pub technique: Option<Technique>,
    /// Measured window.
    pub window: (f64, f64),
    /// Formula when active.
    pub formula: Option<Composition>,
    /// Heteroatom element symbols of the formula and of the groups.
    pub elements: Vec<String>,
    /// Heteroatom counts of the formula by element index.
    pub formula_hetero: Vec<u32>,
    /// Carbon count of the formula.
    pub formula_c: u32,
    /// Hydrogen count of the formula.
    pub formula_h: u32,
    /// DBE of the formula when it is a whole non-negative number.
    pub formula_dbe: Option<u32>,
    /// Active observed bands and their index in `ir.bands`.
    pub bands: Vec<(usize, &'c ObservedBand)>,
    /// True when the case has IR evidence (an `ir:` block), active or not.
    pub has_ir: bool,
    /// Concrete groups in catalogue order.
    pub groups: Vec<GroupData<'c>>,
    /// Per active band: how it can be explained.
    pub explainers: Vec<band_explanation::BandExplainers>,
    /// Per concrete group: concrete groups it cannot share a candidate with.
    pub excludes: Vec<Vec<usize>>,
    /// Per concrete group: the sets (by `requires_any`) of concrete groups of which one
    /// must be present; empty when the group requires nothing.
    pub requires: Vec<Vec<usize>>,
    /// Per skeleton rule: concrete groups that satisfy `needs_any`, and whether
    /// `sp3_carbon` is among its needs.
    pub skeleton_needs: Vec<(Vec<usize>, bool)>,
    /// Per concrete group: `excludes` as a set.
    pub exclude_sets: Vec<GroupSet>,
    /// Per concrete group: `requires` as a set.
    pub require_sets: Vec<GroupSet>,
    /// Per active band: when the band is demanded and nothing but groups can explain it
    /// (no artefact, no sp3 skeleton rule), the groups that can (directly, through a
    /// pattern, or as the needs of a skeleton rule); the enumeration prunes with it.
    pub band_needs: Vec<Option<GroupSet>>,
    /// Salt-form groups the organic part of a salt must hold (none for a neutral formula).
    pub ionic_sites: super::constraints::ionic::IonicSites,
    /// True when an observed band lies in an sp3 C–H stretch range (see
    /// `score::sp3_ch_stretch_seen`).
    pub sp3_ch_stretch_seen: bool,
    /// Per concrete group: it takes part in splits of hydrocarbon unsaturation (see
    /// `collapse::is_split_group`).
    pub split_group: Vec<bool>,
    /// Per active band: the concrete groups whose band rules or patterns explain it.
    pub explained_by_groups: Vec<GroupSet>,
}

impl<'c> Problem<'c> {
    /// Prepares `case` with every evidence item except those in `set_aside`.
    pub fn new(
        case: &'c Case,
        catalogue: &'c Catalogue,
        options: &SolveOptions,
        set_aside: &BTreeSet<EvidenceItem>,
    ) -> Problem<'c> {
        let formula = case
            .formula
            .as_ref()
            .filter(|_| !set_aside.contains(&EvidenceItem::Formula))
            .map(|f| f.composition.clone());
        let ir = ActiveIr::of(case, set_aside);
        let elements = heteroatom_elements(formula.as_ref());
        let formula_hetero: Vec<u32> = elements
            .iter()
            .map(|e| formula.as_ref().map_or(0, |f| f.count(e)))
            .collect();
        let formula_dbe = formula
            .as_ref()
            .and_then(super::constraints::dbe::whole_dbe);
        let groups: Vec<GroupData> = concrete_groups(catalogue, options)
            .into_iter()
            .map(|(catalogue_idx, g)| {
                let presence = ir.presence(case, g, catalogue, options);
                GroupData::new(
                    catalogue,
                    catalogue_idx,
                    g,
                    &elements,
                    formula.is_some(),
                    presence,
                )
            })
            .collect();
        let relations = Relations::of(catalogue, &groups);
        let explainers = ir.explainers(catalogue, &groups, options);
        let band_needs = band_needs(&explainers, &relations.skeleton_needs);
        let explained_by_groups = explainers.iter().map(explaining_groups).collect();
        let mut problem = Problem {
            catalogue,
            tolerance: options.tolerance_cm1,
            technique: ir.technique,
            window: ir.window,
            formula_c: formula.as_ref().map_or(0, |f| f.count("C")),
            formula_h: formula.as_ref().map_or(0, |f| f.count("H")),
            formula,
            elements,
            formula_hetero,
            formula_dbe,
            bands: ir.bands,
            has_ir: case.ir.is_some(),
            groups,
            explainers,
            exclude_sets: relations
                .excludes
                .iter()
                .map(|e| GroupSet::of(e.iter().copied()))
                .collect(),
            require_sets: relations
                .requires
                .iter()
                .map(|r| GroupSet::of(r.iter().copied()))
                .collect(),
            excludes: relations.excludes,
            requires: relations.requires,
            skeleton_needs: relations.skeleton_needs,
            band_needs,
            ionic_sites: options.ionic_sites,
            sp3_ch_stretch_seen: false,
            split_group: Vec::new(),
            explained_by_groups,
        };
        problem.sp3_ch_stretch_seen = super::score::sp3_ch_stretch_seen(&problem);
        problem.split_group = (0..problem.groups.len())
            .map(|g| super::collapse::is_split_group(&problem, g))
            .collect();
        problem
    }

    /// Concrete groups allowed by the observed bands (no demanded band missing) and by
    /// the formula's elements.
    pub fn allowed_groups(&self) -> Vec<usize> {
        (0..self.groups.len())
            .filter(|&i| {
                self.groups[i].presence.missing.is_empty()
                    && self.groups[i].foreign_element.is_none()
            })
            .collect()
    }

    /// Concrete groups the formula's elements allow, whatever the bands say.
    pub fn composable_groups(&self) -> Vec<usize> {
        (0..self.groups.len())
            .filter(|&i| self.groups[i].foreign_element.is_none())
            .collect()
    }
}

/// The case's IR evidence with the set-aside bands split off.
struct ActiveIr<'c> {
    /// The sampling technique, when stated.
    technique: Option<Technique>,
    /// The measured window.
    window: (f64, f64),
    /// Active observed bands and their index in `ir.bands`.
    bands: Vec<(usize, &'c ObservedBand)>,
    /// The active bands alone, as the presence check takes them.
    band_refs: Vec<&'c ObservedBand>,
    /// Bands set aside by a conflict search.
    set_aside: Vec<&'c ObservedBand>,
}

impl<'c> ActiveIr<'c> {
    /// Splits the case's bands into active and set aside.
    fn of(case: &'c Case, set_aside: &BTreeSet<EvidenceItem>) -> Self {
        let indexed = || case.ir.iter().flat_map(|ir| ir.bands.iter().enumerate());
        let bands: Vec<(usize, &ObservedBand)> = indexed()
            .filter(|(i, _)| !set_aside.contains(&EvidenceItem::Band(*i)))
            .collect();
        Self {
            technique: case.ir.as_ref().and_then(|i| i.technique),
            window: case
                .ir
                .as_ref()
                .map_or_else(|| crate::case::default_window(None), |i| i.window),
            band_refs: bands.iter().map(|(_, b)| *b).collect(),
            bands,
            set_aside: indexed()
                .filter(|(i, _)| set_aside.contains(&EvidenceItem::Band(*i)))
                .map(|(_, b)| b)
                .collect(),
        }
    }

    /// The presence verdict of group `g` from the active bands (none without IR).
    fn presence(
        &self,
        case: &Case,
        g: &Group,
        catalogue: &Catalogue,
        options: &SolveOptions,
    ) -> diagnostic_bands::Presence {
        let Some(case_ir) = &case.ir else {
            return diagnostic_bands::Presence::default();
        };
        diagnostic_bands::presence(
            &g.bands,
            &self.band_refs,
            &self.set_aside,
            catalogue,
            self.technique,
            diagnostic_bands::Observable {
                window: self.window,
                opaque: &case_ir.opaque[..],
            },
            options.tolerance_cm1,
        )
    }

    /// Per active band: how it can be explained (gas-phase branches marked).
    fn explainers(
        &self,
        catalogue: &Catalogue,
        groups: &[GroupData<'_>],
        options: &SolveOptions,
    ) -> Vec<band_explanation::BandExplainers> {
        let positions: Vec<f64> = self.bands.iter().map(|(_, b)| b.band.at).collect();
        let mut explainers: Vec<band_explanation::BandExplainers> = self
            .bands
            .iter()
            .map(|(_, b)| {
                band_explanation::explainers_of(
                    &b.band,
                    &positions,
                    catalogue,
                    groups,
                    self.technique,
                    options.tolerance_cm1,
                )
            })
            .collect();
        if self.technique == Some(Technique::Gas) {
            let plain: Vec<&crate::ir::Band> = self.bands.iter().map(|(_, b)| &b.band).collect();
            band_explanation::mark_branches(&plain, &mut explainers);
        }
        explainers
    }
}

/// Heteroatom element symbols of the formula, in its order (none without a formula).
fn heteroatom_elements(formula: Option<&Composition>) -> Vec<String> {
    let mut elements: Vec<String> = Vec::new();
    for (s, _) in formula.iter().flat_map(|f| f.iter()) {
        if s != "C" && s != "H" && !elements.iter().any(|e| e == s) {
            elements.push(s.to_owned());
        }
    }
    elements
}

/// The catalogue's concrete groups (no subtypes) with their index; salt forms only where
/// the formula pairs a counter-ion with them.
fn concrete_groups<'c>(
    catalogue: &'c Catalogue,
    options: &SolveOptions,
) -> Vec<(usize, &'c Group)> {
    catalogue
        .groups
        .iter()
        .enumerate()
        .filter(|(_, g)| !catalogue.has_subtypes(&g.id))
        .filter(|(_, g)| g.ionic.is_none_or(|side| options.ionic_sites.admits(side)))
        .collect()
}

impl<'c> GroupData<'c> {
    /// Pulls the numbers out of group `g`; `elements` are the problem's heteroatoms.
    fn new(
        catalogue: &'c Catalogue,
        catalogue_idx: usize,
        g: &'c Group,
        elements: &[String],
        has_formula: bool,
        presence: diagnostic_bands::Presence,
    ) -> Self {
        let mut hetero = Vec::new();
        let mut foreign_element = None;
        for (s, n) in g.atoms.iter() {
            if s == "C" || s == "H" {
                continue;
            }
            match elements.iter().position(|e| e == s) {
                Some(i) => hetero.push((i, n)),
                // Without a formula no element is foreign.
                None if has_formula => foreign_element = Some(s.to_owned()),
                None => {}
            }
        }
        // A salt form counts as its neutral parent's family too: the organic part (free
        // base, free acid) holds the parent group.
        let mut lineage = catalogue.lineage(&g.id);
        if let Some(parent) = &g.salt_of {
            lineage.extend(catalogue.lineage(parent));
        }
        GroupData {
            group: g,
            catalogue_idx,
            lineage,
            c: g.atoms.count("C"),
            h: g.atoms.count("H"),
            hetero,
            foreign_element,
            has_atoms: g.atoms.n_atoms() > 0,
            sp3_ch: g.dbe == 0 && g.atoms.count("C") > 0 && g.atoms.count("H") > 0,
            presence,
        }
    }
}

/// The relations between concrete groups and skeleton rules, by group index.
struct Relations {
    /// Per group: the groups it cannot share a candidate with.
    excludes: Vec<Vec<usize>>,
    /// Per group: the groups of which one must be present (empty: requires nothing).
    requires: Vec<Vec<usize>>,
    /// Per skeleton rule: the groups that satisfy `needs_any`, and whether
    /// `sp3_carbon` is among its needs.
    skeleton_needs: Vec<(Vec<usize>, bool)>,
}

impl Relations {
    /// Resolves the catalogue's `excludes`, `requires_any` and `needs_any` ids (through
    /// each group's lineage) to concrete group indices.
    fn of(catalogue: &Catalogue, groups: &[GroupData<'_>]) -> Self {
        let holds =
            |idx: usize, ids: &[String]| groups[idx].lineage.iter().any(|l| ids.contains(l));
        let excludes = (0..groups.len())
            .map(|i| {
                (0..groups.len())
                    .filter(|&j| {
                        let gi = groups[i].group;
                        let gj = groups[j].group;
                        holds(j, &gi.excludes) || holds(i, &gj.excludes)
                    })
                    .collect()
            })
            .collect();
        let requires = (0..groups.len())
            .map(|i| {
                let wanted = &groups[i].group.requires_any;
                if wanted.is_empty() {
                    Vec::new()
                } else {
                    (0..groups.len())
                        .filter(|&j| j != i && holds(j, wanted))
                        .collect()
                }
            })
            .collect();
        let skeleton_needs = catalogue
            .skeleton
            .iter()
            .map(|s| {
                let sp3 = s.needs_any.iter().any(|n| n == "sp3_carbon");
                let list = (0..groups.len())
                    .filter(|&j| holds(j, &s.needs_any))
                    .collect();
                (list, sp3)
            })
            .collect();
        Self {
            excludes,
            requires,
            skeleton_needs,
        }
    }
}

/// The concrete groups whose band rules or patterns explain a band.
fn explaining_groups(ex: &band_explanation::BandExplainers) -> GroupSet {
    let mut set = GroupSet::of(ex.groups.iter().map(|(g, _, _)| *g));
    for (_, gs, _) in &ex.patterns {
        gs.iter().for_each(|&g| set.insert(g));
    }
    set
}

/// Per band: when it is demanded and nothing but groups can explain it (no artefact, no
/// sp3 skeleton rule), the groups that can (directly, through a pattern, or as the needs
/// of a skeleton rule).
fn band_needs(
    explainers: &[band_explanation::BandExplainers],
    skeleton_needs: &[(Vec<usize>, bool)],
) -> Vec<Option<GroupSet>> {
    explainers
        .iter()
        .map(|ex| {
            let free =
                !ex.artefacts.is_empty() || ex.skeleton.iter().any(|(si, _)| skeleton_needs[*si].1);
            (ex.demanded && !free).then(|| {
                let mut set = explaining_groups(ex);
                for (si, _) in &ex.skeleton {
                    skeleton_needs[*si].0.iter().for_each(|&g| set.insert(g));
                }
                set
            })
        })
        .collect()
}
