//! Open-bond satisfiability: can the candidate's groups and its skeleton carbons be joined
//! into one molecule with the formula's hydrogens?
//!
//! The molecule is seen as a graph whose nodes are group instances (that hold atoms) and
//! skeleton carbons (sp3, four valences; every multiple bond and ring belongs to a group
//! or to `ring`). Each node offers open valences of four kinds (rules `OpenBonds`):
//! heteroatom-borne bonds that must end on a carbon of another node, heteroatom-borne
//! bonds that may end on H, carbon-borne bonds that must end on another node (never H),
//! carbon-borne bonds that may end on H; a skeleton carbon offers four of the last kind.
//! The hydrogen count fixes the number of bonds between nodes:
//! `2E = Σ open valences − (H of the formula − H held by groups)`.
//! The checks are necessary conditions (so a true candidate is never lost):
//! 1. hydrogens left for open positions are between 0 and the open valences;
//! 2. E is whole, connects the nodes (E ≥ nodes − 1) and, when every node is a single
//!    atom, fits a simple graph (E ≤ nodes·(nodes − 1)/2) — nodes of several atoms may be
//!    joined more than once through different atoms (fused rings);
//! 3. heteroatom-borne ends pair only with carbon-borne ends (no heteroatom–heteroatom
//!    bond between groups), and must-bond ends are all used: some split of the 2E ends
//!    satisfies both;
//! 4. a group instance's must-bond ends need that many distinct atoms outside it, its
//!    heteroatom-borne ones that many distinct carbons outside it (no ether in CH4O: one
//!    carbon cannot take both ether bonds);
//! 5. a band only the skeleton explains needs an H where the rule says (sp3 C–H, or H on
//!    an open position of an sp2 group).

use super::super::model::Problem;
use super::super::outcome::BondFailure;
use super::band_explanation::HydrogenNeeds;
use crate::chem::composition::{standard_valence, Composition};

/// Checks the bond conditions; `Err` carries the condition that fails (worded by
/// `report::wording::bonds`).
pub fn check(
    problem: &Problem<'_>,
    counts: &[u32],
    present: &[usize],
    skeleton_c: u32,
    needs: &HydrogenNeeds,
) -> Result<(), BondFailure> {
    let tally = Tally::of(problem, counts, present);
    let needs = NeedsSummary::of(problem, counts, needs);
    match verdict(problem, &tally, skeleton_c, &needs) {
        Verdict::Fails(reason) => Err(reason),
        // The partner condition is checked group by group here, to name the group.
        Verdict::Holds | Verdict::PartnersShort => {
            check_distinct_partners(problem, counts, present, &tally, skeleton_c)
        }
    }
}

/// The open valences and atoms of some group instances, summed (a whole candidate's
/// groups, or a part of them: tallies of disjoint parts add up with [`Tally::plus`]).
/// Skeleton carbons are not in it; the checks take their number apart.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Tally {
    /// Hydrogens the groups hold themselves.
    h_fixed: u64,
    /// Heteroatom-borne ends that must bond to another node.
    hetero_must: u64,
    /// Heteroatom-borne ends that may end on H.
    hetero_or_h: u64,
    /// Carbon-borne ends that must bond to another node.
    carbon_must: u64,
    /// Carbon-borne ends that may end on H.
    carbon_or_h: u64,
    /// Nodes that are group instances with atoms of their own.
    group_nodes: u64,
    /// Heavy atoms of the groups. Partners are counted by atom, since two bonds may join
    /// one group to different atoms of another (a fused ring such as maleic
    /// anhydride's), never to one atom.
    group_heavy_atoms: u64,
    /// Carbons of the groups that can take a bond from outside their group.
    group_bondable_carbons: u64,
    /// Group instances of more than one heavy atom.
    multi_atom_nodes: u64,
    /// Whether some group holds an sp3 C–H of its own.
    sp3_group_h: bool,
    /// Plain rings (groups with no atoms of their own that consume DBE).
    plain_rings: u64,
    /// Atoms of the groups whose standard valence is at least two.
    ring_capable_atoms: u64,
    /// Largest (must-bond ends + own heavy atoms) of a group with atoms (condition 4).
    most_partners_needed: u64,
    /// Largest (heteroatom-borne must-bond ends + own bondable carbons) of a group with
    /// atoms (condition 4).
    most_carbon_partners_needed: u64,
}

impl Tally {
    /// Sums the open valences and atoms of the present groups.
    pub fn of(problem: &Problem<'_>, counts: &[u32], present: &[usize]) -> Self {
        present.iter().fold(Self::default(), |t, &i| {
            t.plus(&Self::unit(problem, i).times(counts[i]))
        })
    }

    /// [`Tally::of`] from the tallies of one instance of each group ([`Tally::unit`]).
    pub fn of_units(units: &[Tally], counts: &[u32], present: &[usize]) -> Self {
        present
            .iter()
            .fold(Self::default(), |t, &i| t.plus(&units[i].times(counts[i])))
    }

    /// The open valences and atoms of one instance of group `i`.
    pub fn unit(problem: &Problem<'_>, i: usize) -> Self {
        let g = &problem.groups[i];
        let b = g.group.bonds;
        let mut t = Self {
            h_fixed: u64::from(g.h),
            hetero_must: u64::from(b.hetero),
            hetero_or_h: u64::from(b.hetero_or_h),
            carbon_must: u64::from(b.carbon),
            carbon_or_h: u64::from(b.carbon_or_h),
            plain_rings: u64::from(!g.has_atoms && g.group.dbe > 0),
            ring_capable_atoms: atoms_bonding_twice(&g.group.atoms),
            sp3_group_h: g.sp3_ch,
            ..Self::default()
        };
        if g.has_atoms {
            t.group_nodes = 1;
            let heavy = u64::from(g.group.atoms.n_atoms() - g.h);
            t.group_heavy_atoms = heavy;
            t.multi_atom_nodes = u64::from(heavy > 1);
            let own_carbons = if b.carbon + b.carbon_or_h > 0 {
                u64::from(g.c)
            } else {
                0
            };
            t.group_bondable_carbons = own_carbons;
            t.most_partners_needed = u64::from(b.hetero + b.carbon) + heavy;
            t.most_carbon_partners_needed = u64::from(b.hetero) + own_carbons;
        }
        t
    }

    /// `n` instances of a one-instance tally: the sums scaled, the largest needs and
    /// the flag kept (nothing for `n` = 0).
    fn times(&self, n: u32) -> Tally {
        if n == 0 {
            return Tally::default();
        }
        let n = u64::from(n);
        Tally {
            h_fixed: n * self.h_fixed,
            hetero_must: n * self.hetero_must,
            hetero_or_h: n * self.hetero_or_h,
            carbon_must: n * self.carbon_must,
            carbon_or_h: n * self.carbon_or_h,
            group_nodes: n * self.group_nodes,
            group_heavy_atoms: n * self.group_heavy_atoms,
            group_bondable_carbons: n * self.group_bondable_carbons,
            multi_atom_nodes: n * self.multi_atom_nodes,
            sp3_group_h: self.sp3_group_h,
            plain_rings: n * self.plain_rings,
            ring_capable_atoms: n * self.ring_capable_atoms,
            most_partners_needed: self.most_partners_needed,
            most_carbon_partners_needed: self.most_carbon_partners_needed,
        }
    }

    /// The tally of two disjoint parts of a candidate together.
    pub fn plus(&self, o: &Tally) -> Tally {
        Tally {
            h_fixed: self.h_fixed + o.h_fixed,
            hetero_must: self.hetero_must + o.hetero_must,
            hetero_or_h: self.hetero_or_h + o.hetero_or_h,
            carbon_must: self.carbon_must + o.carbon_must,
            carbon_or_h: self.carbon_or_h + o.carbon_or_h,
            group_nodes: self.group_nodes + o.group_nodes,
            group_heavy_atoms: self.group_heavy_atoms + o.group_heavy_atoms,
            group_bondable_carbons: self.group_bondable_carbons + o.group_bondable_carbons,
            multi_atom_nodes: self.multi_atom_nodes + o.multi_atom_nodes,
            sp3_group_h: self.sp3_group_h || o.sp3_group_h,
            plain_rings: self.plain_rings + o.plain_rings,
            ring_capable_atoms: self.ring_capable_atoms + o.ring_capable_atoms,
            most_partners_needed: self.most_partners_needed.max(o.most_partners_needed),
            most_carbon_partners_needed: self
                .most_carbon_partners_needed
                .max(o.most_carbon_partners_needed),
        }
    }

    /// Hydrogens the groups hold and their open positions that may carry H, together
    /// (`score::must_hold_sp3_ch` compares them with the formula's hydrogens).
    pub fn h_held_and_open(&self) -> u64 {
        self.h_fixed + self.carbon_or_h + self.hetero_or_h
    }

    /// Whether some group holds an sp3 C–H of its own.
    pub fn sp3_group_h(&self) -> bool {
        self.sp3_group_h
    }
}

/// A tally with its skeleton carbons (sp3, four open valences each).
struct WithSkeleton<'t> {
    t: &'t Tally,
    skeleton_c: u64,
}

impl WithSkeleton<'_> {
    /// Open valences of the skeleton carbons (four each).
    fn skeleton_ends(&self) -> u64 {
        4 * self.skeleton_c
    }

    /// Open valences that may carry an H.
    fn h_capable_ends(&self) -> u64 {
        self.t.hetero_or_h + self.t.carbon_or_h + self.skeleton_ends()
    }

    /// Every open valence.
    fn open_ends(&self) -> u64 {
        self.t.hetero_must + self.t.carbon_must + self.h_capable_ends()
    }

    /// Nodes of the molecule graph: group instances with atoms and skeleton carbons.
    fn nodes(&self) -> u64 {
        self.t.group_nodes + self.skeleton_c
    }

    /// Heavy atoms in all.
    fn heavy_atoms(&self) -> u64 {
        self.t.group_heavy_atoms + self.skeleton_c
    }

    /// Carbons that can take a bond from outside their group.
    fn bondable_carbons(&self) -> u64 {
        self.t.group_bondable_carbons + self.skeleton_c
    }
}

/// What the hydrogen needs of bands only the skeleton explains ask of the bonds.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct NeedsSummary {
    /// An H on a saturated carbon is needed.
    pub sp3_h: bool,
    /// An H on an open position of named sp2 groups is needed: `Some(true)` when those
    /// groups offer such a position, `Some(false)` when they offer none.
    pub sp2_h: Option<bool>,
}

impl NeedsSummary {
    /// The summary of `needs` for a candidate's counts.
    pub fn of(problem: &Problem<'_>, counts: &[u32], needs: &HydrogenNeeds) -> Self {
        NeedsSummary {
            sp3_h: needs.sp3_h,
            sp2_h: needs.h_on_groups.as_ref().map(|carriers| {
                carriers
                    .iter()
                    .any(|&g| counts[g] > 0 && problem.groups[g].group.bonds.carbon_or_h > 0)
            }),
        }
    }
}

/// The outcome of the checks on a tally.
#[derive(Clone, Debug, PartialEq)]
pub enum Verdict {
    /// Every condition holds.
    Holds,
    /// A condition fails.
    Fails(BondFailure),
    /// Some group instance lacks distinct partners (condition 4, from the tally's
    /// maxima; [`check`] finds and names the group).
    PartnersShort,
}

/// The bond conditions on a candidate's tally, its skeleton carbons and the needs of its
/// bands, in the order [`check`] reports them.
pub fn verdict(problem: &Problem<'_>, t: &Tally, skeleton_c: u32, needs: &NeedsSummary) -> Verdict {
    let t = WithSkeleton {
        t,
        skeleton_c: u64::from(skeleton_c),
    };
    let checked = check_plain_rings(&t)
        .and_then(|()| BondCount::from_hydrogens(problem, &t))
        .and_then(|bonds| check_end_split(&t, &bonds, needs));
    if let Err(reason) = checked {
        return Verdict::Fails(reason);
    }
    let heavy = t.heavy_atoms();
    if t.t.most_partners_needed > heavy || t.t.most_carbon_partners_needed > t.bondable_carbons() {
        return Verdict::PartnersShort;
    }
    Verdict::Holds
}

/// A plain ring (a group with no atoms of its own that consumes DBE) closes through
/// skeleton or group atoms, and a ring has at least three members that each bond twice
/// (two atoms joined twice are a double bond, which is an alkene, not a ring).
fn check_plain_rings(t: &WithSkeleton<'_>) -> Result<(), BondFailure> {
    if t.t.plain_rings == 0 {
        return Ok(());
    }
    let ring_capable = t.skeleton_c + t.t.ring_capable_atoms;
    if ring_capable < 3 {
        return Err(BondFailure::RingAtoms { have: ring_capable });
    }
    Ok(())
}

/// Atoms of one group instance whose standard valence is at least two.
fn atoms_bonding_twice(atoms: &Composition) -> u64 {
    atoms
        .iter()
        .filter(|(sym, _)| standard_valence(sym).is_some_and(|v| v >= 2))
        .map(|(_, n)| u64::from(n))
        .sum()
}

/// What the formula's hydrogens leave for bonds between nodes (conditions 1 and 2).
struct BondCount {
    /// Bond ends between nodes (2E).
    twice_e: u64,
    /// Bonds between nodes (E).
    e: u64,
}

impl BondCount {
    /// Places the free hydrogens and checks that the bonds left join the nodes into one
    /// molecule.
    fn from_hydrogens(problem: &Problem<'_>, t: &WithSkeleton<'_>) -> Result<Self, BondFailure> {
        let h_total = u64::from(problem.formula_h);
        if t.t.h_fixed > h_total {
            return Err(BondFailure::GroupHydrogens {
                held: t.t.h_fixed,
                formula: h_total,
            });
        }
        let h_free = h_total - t.t.h_fixed;
        if h_free > t.h_capable_ends() {
            return Err(BondFailure::OpenPositions {
                free: h_free,
                positions: t.h_capable_ends(),
            });
        }
        let twice_e = t.open_ends() - h_free;
        if twice_e % 2 == 1 {
            return Err(BondFailure::OddEnds);
        }
        let e = twice_e / 2;
        let nodes = t.nodes();
        if nodes == 0 {
            return Err(BondFailure::NoHeavyAtoms);
        }
        if e + 1 < nodes {
            return Err(BondFailure::TooFewBonds {
                parts: nodes,
                bonds: e,
            });
        }
        if t.t.multi_atom_nodes == 0 && e > nodes * (nodes - 1) / 2 {
            return Err(BondFailure::TooManyBonds {
                parts: nodes,
                bonds: e,
            });
        }
        Ok(Self { twice_e, e })
    }
}

/// Condition 3 (with 5): choose x heteroatom-or-H ends used; the rest of the 2E ends
/// are carbon-borne. Skeleton carbons may each use at most min(4, other heavy atoms)
/// ends, and an H a band needs keeps one position from bonding.
fn check_end_split(
    t: &WithSkeleton<'_>,
    bonds: &BondCount,
    needs: &NeedsSummary,
) -> Result<(), BondFailure> {
    let (sk_cap, co_cap) = carbon_caps(t, needs)?;
    let twice_e = bonds.twice_e;
    let carbon_max = t.t.carbon_must + co_cap + sk_cap;
    let carbon_min = t.t.carbon_must + if t.nodes() >= 2 { t.skeleton_c } else { 0 };
    let split_ok = (0..=t.t.hetero_or_h).any(|x| {
        let hetero_used = t.t.hetero_must + x;
        if hetero_used > twice_e {
            return false;
        }
        let carbon_used = twice_e - hetero_used;
        carbon_used >= carbon_min && carbon_used <= carbon_max && hetero_used <= carbon_used
    });
    if !split_ok {
        return Err(BondFailure::Unpaired {
            hetero: t.t.hetero_must + t.t.hetero_or_h,
            carbon: t.t.carbon_must + t.t.carbon_or_h + t.skeleton_ends(),
            bonds: bonds.e,
        });
    }
    Ok(())
}

/// The most ends the skeleton carbons and the carbon-or-H positions may bond with,
/// after keeping an H where a band only the skeleton explains needs one (condition 5).
fn carbon_caps(t: &WithSkeleton<'_>, needs: &NeedsSummary) -> Result<(u64, u64), BondFailure> {
    let mut sk_cap = t.skeleton_c * 4u64.min(t.heavy_atoms().saturating_sub(1));
    let mut co_cap = t.t.carbon_or_h;
    if needs.sp3_h && !t.t.sp3_group_h {
        if t.skeleton_c == 0 {
            return Err(BondFailure::NoSaturatedCarbon);
        }
        sk_cap = sk_cap.min(t.skeleton_ends() - 1);
    }
    if let Some(offered) = needs.sp2_h {
        if !offered {
            return Err(BondFailure::NoSp2Hydrogen);
        }
        co_cap = t.t.carbon_or_h - 1;
    }
    Ok((sk_cap, co_cap))
}

/// Condition 4, group by group: the first group instance that lacks distinct partners.
fn check_distinct_partners(
    problem: &Problem<'_>,
    counts: &[u32],
    present: &[usize],
    tally: &Tally,
    skeleton_c: u32,
) -> Result<(), BondFailure> {
    let t = WithSkeleton {
        t: tally,
        skeleton_c: u64::from(skeleton_c),
    };
    for (g, n) in present.iter().map(|&i| (&problem.groups[i], counts[i])) {
        if n == 0 || !g.has_atoms {
            continue;
        }
        let b = g.group.bonds;
        let must = u64::from(b.hetero + b.carbon);
        let own_heavy = u64::from(g.group.atoms.n_atoms() - g.h);
        let outside = t.heavy_atoms() - own_heavy;
        if must > outside {
            return Err(BondFailure::DistinctAtoms {
                group: g.group.id.clone(),
                need: must,
                outside,
            });
        }
        let own_carbons = if b.carbon + b.carbon_or_h > 0 {
            u64::from(g.c)
        } else {
            0
        };
        let carbon_partners = t.bondable_carbons() - own_carbons;
        if u64::from(b.hetero) > carbon_partners {
            return Err(BondFailure::DistinctCarbons {
                group: g.group.id.clone(),
                need: u64::from(b.hetero),
                offered: carbon_partners,
            });
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::case::parse;
    use crate::engine::model::Problem;
    use crate::engine::testkit::small_catalogue;
    use crate::engine::SolveOptions;
    use std::collections::BTreeSet;

    /// Checks one combination (group ids with counts) against `formula`.
    fn verdict(formula: &str, groups: &[(&str, u32)]) -> Result<(), BondFailure> {
        let (case, d) = parse(&format!("formula: {formula}\n"), "t.yaml");
        let case = case.unwrap_or_else(|| panic!("{d:?}"));
        let cat = small_catalogue();
        let problem = Problem::new(&case, &cat, &SolveOptions::default(), &BTreeSet::new());
        let mut counts = vec![0u32; problem.groups.len()];
        let mut c_used = 0;
        for (id, n) in groups {
            let i = problem
                .groups
                .iter()
                .position(|g| g.group.id == *id)
                .unwrap_or_else(|| panic!("{id}"));
            counts[i] = *n;
            c_used += problem.groups[i].c * n;
        }
        let present: Vec<usize> = (0..counts.len()).filter(|&i| counts[i] > 0).collect();
        check(
            &problem,
            &counts,
            &present,
            problem.formula_c - c_used,
            &HydrogenNeeds::default(),
        )
    }

    #[test]
    fn one_carbon_cannot_take_both_ether_bonds() {
        // common practice: CH4O is methanol; dimethyl ether needs C2H6O.
        assert!(verdict("CH4O", &[("ether", 1)]).is_err());
        assert!(verdict("C2H6O", &[("ether", 1)]).is_ok());
        assert!(verdict("CH4O", &[("alcohol_primary", 1)]).is_ok());
    }

    #[test]
    fn a_ketone_needs_two_carbons_besides_its_own() {
        // common practice: the smallest ketone is acetone, C3H6O; C2H4O is acetaldehyde.
        assert!(verdict("C2H4O", &[("ketone", 1)]).is_err());
        assert!(verdict("C3H6O", &[("ketone", 1)]).is_ok());
        assert!(verdict("C2H4O", &[("aldehyde", 1)]).is_ok());
    }

    #[test]
    fn heteroatoms_bond_only_to_carbon_between_groups() {
        // CH4O2 with an ether and an alcohol would need an O–O bond (a peroxide): one
        // carbon cannot carry three oxygen bonds' worth of partners here.
        assert!(verdict("CH4O2", &[("ether", 1), ("alcohol_primary", 1)]).is_err());
        // methoxymethanol CH3–O–CH2–OH (common practice): both oxygens on carbons, fine.
        assert!(verdict("C2H6O2", &[("ether", 1), ("alcohol_primary", 1)]).is_ok());
    }

    #[test]
    fn a_ring_of_two_groups_is_allowed_through_different_atoms() {
        // benzocyclobutene-like fusions aside, two multi-atom groups may be joined twice:
        // an alkene fused to an aromatic ring (C8H6, DBE 6, with `ring`).
        assert!(verdict("C8H6", &[("aromatic_ring", 1), ("alkene", 1), ("ring", 1)]).is_ok());
    }
}
