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
use super::band_explanation::HydrogenNeeds;

/// Checks the bond conditions; `Err` carries the reason in words.
pub fn check(
    problem: &Problem<'_>,
    counts: &[u32],
    present: &[usize],
    skeleton_c: u32,
    needs: &HydrogenNeeds,
) -> Result<(), String> {
    let mut h_fixed = 0u64;
    let (mut hm, mut ho, mut cm, mut co) = (0u64, 0u64, 0u64, 0u64);
    let mut group_nodes = 0u64;
    // Heavy atoms in all, and carbons that can take a bond from outside their group:
    // partners are counted by atom, since two bonds may join one group to different
    // atoms of another (a fused ring such as maleic anhydride's), never to one atom.
    let mut heavy_atoms = u64::from(skeleton_c);
    let mut bondable_carbons = u64::from(skeleton_c);
    let mut multi_atom_nodes = 0u64;
    let mut sp3_group_h = false;
    for (g, n) in present.iter().map(|&i| (&problem.groups[i], counts[i])) {
        if n == 0 {
            continue;
        }
        let n = u64::from(n);
        let b = g.group.bonds;
        h_fixed += n * u64::from(g.h);
        hm += n * u64::from(b.hetero);
        ho += n * u64::from(b.hetero_or_h);
        cm += n * u64::from(b.carbon);
        co += n * u64::from(b.carbon_or_h);
        if g.has_atoms {
            group_nodes += n;
            let heavy = u64::from(g.group.atoms.n_atoms() - g.h);
            heavy_atoms += n * heavy;
            if heavy > 1 {
                multi_atom_nodes += n;
            }
            if b.carbon + b.carbon_or_h > 0 {
                bondable_carbons += n * u64::from(g.c);
            }
        }
        sp3_group_h |= g.sp3_ch;
    }
    // A plain ring (a group with no atoms of its own that consumes DBE) closes through
    // skeleton or group atoms, and a ring has at least three members that each bond twice
    // (two atoms joined twice are a double bond, which is an alkene, not a ring).
    let plain_rings: u32 = present
        .iter()
        .filter(|&&i| !problem.groups[i].has_atoms && problem.groups[i].group.dbe > 0)
        .map(|&i| counts[i])
        .sum();
    if plain_rings > 0 {
        let ring_capable: u64 = u64::from(skeleton_c)
            + present
                .iter()
                .map(|&i| {
                    let g = &problem.groups[i];
                    let per: u64 = g
                        .group
                        .atoms
                        .iter()
                        .filter(|(sym, _)| {
                            crate::chem::composition::standard_valence(sym).is_some_and(|v| v >= 2)
                        })
                        .map(|(_, n)| u64::from(n))
                        .sum();
                    u64::from(counts[i]) * per
                })
                .sum::<u64>();
        if ring_capable < 3 {
            return Err(format!(
                "a ring needs at least three atoms that bond twice; the candidate has {ring_capable}"
            ));
        }
    }
    let h_total = u64::from(problem.formula_h);
    if h_fixed > h_total {
        return Err(format!(
            "the groups hold {h_fixed} H but the formula has {h_total}"
        ));
    }
    let h_free = h_total - h_fixed;
    let sk = 4 * u64::from(skeleton_c);
    let open = hm + ho + cm + co + sk;
    if h_free > ho + co + sk {
        return Err(format!(
            "{h_free} H must sit on open positions but only {} positions may carry H",
            ho + co + sk
        ));
    }
    let twice_e = open - h_free;
    if twice_e % 2 == 1 {
        return Err("the hydrogen count leaves an odd number of bond ends".to_owned());
    }
    let e = twice_e / 2;
    let nodes = group_nodes + u64::from(skeleton_c);
    if nodes == 0 {
        return Err("no atoms besides hydrogen".to_owned());
    }
    if e + 1 < nodes {
        return Err(format!(
            "{nodes} parts need at least {} bonds to form one molecule, the hydrogen count leaves {e}",
            nodes - 1
        ));
    }
    if multi_atom_nodes == 0 && e > nodes * (nodes - 1) / 2 {
        return Err(format!(
            "{e} bonds between {nodes} parts would need multiple bonds outside the groups"
        ));
    }
    // 3. Choose x heteroatom-or-H ends used; the rest of the 2E ends are carbon-borne.
    // Skeleton carbons may each use at most min(4, other heavy atoms) ends.
    let sk_usable = u64::from(skeleton_c) * 4u64.min(heavy_atoms.saturating_sub(1));
    let mut sk_cap = sk_usable;
    let mut co_cap = co;
    if needs.sp3_h && !sp3_group_h {
        if skeleton_c == 0 {
            return Err(
                "a band needs sp3 C–H but the candidate has no saturated carbon".to_owned(),
            );
        }
        sk_cap = sk_cap.min(sk - 1);
    }
    if let Some(carriers) = &needs.h_on_groups {
        let carrier_co: u64 = carriers
            .iter()
            .map(|&g| u64::from(counts[g]) * u64::from(problem.groups[g].group.bonds.carbon_or_h))
            .sum();
        if carrier_co == 0 {
            return Err(
                "a band needs an sp2 C–H but no sp2 carbon of the candidate can carry H".to_owned(),
            );
        }
        co_cap = co - 1;
    }
    let carbon_max = cm + co_cap + sk_cap;
    let carbon_min = cm + if nodes >= 2 { u64::from(skeleton_c) } else { 0 };
    let split_ok = (0..=ho).any(|x| {
        let hetero_used = hm + x;
        if hetero_used > twice_e {
            return false;
        }
        let carbon_used = twice_e - hetero_used;
        carbon_used >= carbon_min && carbon_used <= carbon_max && hetero_used <= carbon_used
    });
    if !split_ok {
        return Err(format!(
            "the open bonds cannot be paired: {} heteroatom-borne and {} carbon-borne ends for {e} bonds (heteroatoms bond only to carbon between groups)",
            hm + ho,
            cm + co + sk
        ));
    }
    // 4. Distinct partners per group instance.
    for (g, n) in present.iter().map(|&i| (&problem.groups[i], counts[i])) {
        if n == 0 || !g.has_atoms {
            continue;
        }
        let b = g.group.bonds;
        let must = u64::from(b.hetero + b.carbon);
        let own_heavy = u64::from(g.group.atoms.n_atoms() - g.h);
        let outside = heavy_atoms - own_heavy;
        if must > outside {
            return Err(format!(
                "{} needs {must} bonds to distinct atoms outside it, the candidate has {outside}",
                g.group.id
            ));
        }
        let own_carbons = if b.carbon + b.carbon_or_h > 0 {
            u64::from(g.c)
        } else {
            0
        };
        let carbon_partners = bondable_carbons - own_carbons;
        if u64::from(b.hetero) > carbon_partners {
            return Err(format!(
                "{} needs {} distinct carbons to bond its heteroatom to, the candidate offers {carbon_partners}",
                g.group.id, b.hetero
            ));
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
    fn verdict(formula: &str, groups: &[(&str, u32)]) -> Result<(), String> {
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
