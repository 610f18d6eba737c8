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
    let tally = Tally::of(problem, counts, present, skeleton_c);
    check_plain_rings(problem, counts, present, skeleton_c)?;
    let bonds = BondCount::from_hydrogens(problem, &tally)?;
    check_end_split(problem, counts, &tally, &bonds, needs)?;
    check_distinct_partners(problem, counts, present, &tally)
}

/// The candidate's open valences and atoms, summed over its group instances and
/// skeleton carbons.
struct Tally {
    skeleton_c: u64,
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
    /// Heavy atoms in all. Partners are counted by atom, since two bonds may join one
    /// group to different atoms of another (a fused ring such as maleic anhydride's),
    /// never to one atom.
    heavy_atoms: u64,
    /// Carbons that can take a bond from outside their group.
    bondable_carbons: u64,
    /// Group instances of more than one heavy atom.
    multi_atom_nodes: u64,
    /// Whether some group holds an sp3 C–H of its own.
    sp3_group_h: bool,
}

impl Tally {
    /// Sums the open valences and atoms of the present groups and the skeleton.
    fn of(problem: &Problem<'_>, counts: &[u32], present: &[usize], skeleton_c: u32) -> Self {
        let mut t = Self {
            skeleton_c: u64::from(skeleton_c),
            h_fixed: 0,
            hetero_must: 0,
            hetero_or_h: 0,
            carbon_must: 0,
            carbon_or_h: 0,
            group_nodes: 0,
            heavy_atoms: u64::from(skeleton_c),
            bondable_carbons: u64::from(skeleton_c),
            multi_atom_nodes: 0,
            sp3_group_h: false,
        };
        for (g, n) in present.iter().map(|&i| (&problem.groups[i], counts[i])) {
            if n == 0 {
                continue;
            }
            let n = u64::from(n);
            let b = g.group.bonds;
            t.h_fixed += n * u64::from(g.h);
            t.hetero_must += n * u64::from(b.hetero);
            t.hetero_or_h += n * u64::from(b.hetero_or_h);
            t.carbon_must += n * u64::from(b.carbon);
            t.carbon_or_h += n * u64::from(b.carbon_or_h);
            if g.has_atoms {
                t.group_nodes += n;
                let heavy = u64::from(g.group.atoms.n_atoms() - g.h);
                t.heavy_atoms += n * heavy;
                if heavy > 1 {
                    t.multi_atom_nodes += n;
                }
                if b.carbon + b.carbon_or_h > 0 {
                    t.bondable_carbons += n * u64::from(g.c);
                }
            }
            t.sp3_group_h |= g.sp3_ch;
        }
        t
    }

    /// Open valences of the skeleton carbons (four each).
    fn skeleton_ends(&self) -> u64 {
        4 * self.skeleton_c
    }

    /// Open valences that may carry an H.
    fn h_capable_ends(&self) -> u64 {
        self.hetero_or_h + self.carbon_or_h + self.skeleton_ends()
    }

    /// Every open valence.
    fn open_ends(&self) -> u64 {
        self.hetero_must + self.carbon_must + self.h_capable_ends()
    }

    /// Nodes of the molecule graph: group instances with atoms and skeleton carbons.
    fn nodes(&self) -> u64 {
        self.group_nodes + self.skeleton_c
    }
}

/// A plain ring (a group with no atoms of its own that consumes DBE) closes through
/// skeleton or group atoms, and a ring has at least three members that each bond twice
/// (two atoms joined twice are a double bond, which is an alkene, not a ring).
fn check_plain_rings(
    problem: &Problem<'_>,
    counts: &[u32],
    present: &[usize],
    skeleton_c: u32,
) -> Result<(), BondFailure> {
    let plain_rings: u32 = present
        .iter()
        .filter(|&&i| !problem.groups[i].has_atoms && problem.groups[i].group.dbe > 0)
        .map(|&i| counts[i])
        .sum();
    if plain_rings == 0 {
        return Ok(());
    }
    let ring_capable: u64 = u64::from(skeleton_c)
        + present
            .iter()
            .map(|&i| u64::from(counts[i]) * atoms_bonding_twice(&problem.groups[i].group.atoms))
            .sum::<u64>();
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
    fn from_hydrogens(problem: &Problem<'_>, t: &Tally) -> Result<Self, BondFailure> {
        let h_total = u64::from(problem.formula_h);
        if t.h_fixed > h_total {
            return Err(BondFailure::GroupHydrogens {
                held: t.h_fixed,
                formula: h_total,
            });
        }
        let h_free = h_total - t.h_fixed;
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
        if t.multi_atom_nodes == 0 && e > nodes * (nodes - 1) / 2 {
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
    problem: &Problem<'_>,
    counts: &[u32],
    t: &Tally,
    bonds: &BondCount,
    needs: &HydrogenNeeds,
) -> Result<(), BondFailure> {
    let (sk_cap, co_cap) = carbon_caps(problem, counts, t, needs)?;
    let twice_e = bonds.twice_e;
    let carbon_max = t.carbon_must + co_cap + sk_cap;
    let carbon_min = t.carbon_must + if t.nodes() >= 2 { t.skeleton_c } else { 0 };
    let split_ok = (0..=t.hetero_or_h).any(|x| {
        let hetero_used = t.hetero_must + x;
        if hetero_used > twice_e {
            return false;
        }
        let carbon_used = twice_e - hetero_used;
        carbon_used >= carbon_min && carbon_used <= carbon_max && hetero_used <= carbon_used
    });
    if !split_ok {
        return Err(BondFailure::Unpaired {
            hetero: t.hetero_must + t.hetero_or_h,
            carbon: t.carbon_must + t.carbon_or_h + t.skeleton_ends(),
            bonds: bonds.e,
        });
    }
    Ok(())
}

/// The most ends the skeleton carbons and the carbon-or-H positions may bond with,
/// after keeping an H where a band only the skeleton explains needs one (condition 5).
fn carbon_caps(
    problem: &Problem<'_>,
    counts: &[u32],
    t: &Tally,
    needs: &HydrogenNeeds,
) -> Result<(u64, u64), BondFailure> {
    let mut sk_cap = t.skeleton_c * 4u64.min(t.heavy_atoms.saturating_sub(1));
    let mut co_cap = t.carbon_or_h;
    if needs.sp3_h && !t.sp3_group_h {
        if t.skeleton_c == 0 {
            return Err(BondFailure::NoSaturatedCarbon);
        }
        sk_cap = sk_cap.min(t.skeleton_ends() - 1);
    }
    if let Some(carriers) = &needs.h_on_groups {
        let carrier_co: u64 = carriers
            .iter()
            .map(|&g| u64::from(counts[g]) * u64::from(problem.groups[g].group.bonds.carbon_or_h))
            .sum();
        if carrier_co == 0 {
            return Err(BondFailure::NoSp2Hydrogen);
        }
        co_cap = t.carbon_or_h - 1;
    }
    Ok((sk_cap, co_cap))
}

/// Condition 4: distinct partners per group instance.
fn check_distinct_partners(
    problem: &Problem<'_>,
    counts: &[u32],
    present: &[usize],
    t: &Tally,
) -> Result<(), BondFailure> {
    for (g, n) in present.iter().map(|&i| (&problem.groups[i], counts[i])) {
        if n == 0 || !g.has_atoms {
            continue;
        }
        let b = g.group.bonds;
        let must = u64::from(b.hetero + b.carbon);
        let own_heavy = u64::from(g.group.atoms.n_atoms() - g.h);
        let outside = t.heavy_atoms - own_heavy;
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
        let carbon_partners = t.bondable_carbons - own_carbons;
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
