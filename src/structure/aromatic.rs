//! Aromaticity for output and perception: benzene-type six-membered rings (carbon, or
//! carbon with ring nitrogen as in pyridine) written in a Kekulé form become aromatic
//! rings, so that the two Kekulé forms of one ring give one structure.
//!
//! Definition (ours, after the usual benzenoid rule, `common practice`): a six-membered
//! ring of C and N atoms is aromatic when every ring atom is neutral, ring N atoms have
//! two neighbours and no hydrogen, and every ring atom either is already aromatic or has
//! exactly one double bond, that double bond lying in a ring that is itself aromatic by
//! this rule (so the rings of naphthalene are aromatic in every Kekulé form, and a quinone
//! or a fulvene is not). The rule is applied until nothing changes.

use super::molecule::{Bond, Element, Molecule};

/// Every six-membered ring (as atom indices in ring order) whose atoms are all C or N.
pub fn six_rings(m: &Molecule) -> Vec<[usize; 6]> {
    let n = m.n_atoms();
    let eligible: Vec<bool> = (0..n)
        .map(|i| matches!(m.atom(i).element, Element::C | Element::N))
        .collect();
    let adj: Vec<Vec<usize>> = (0..n)
        .map(|i| {
            let mut v: Vec<usize> = m
                .neighbours(i)
                .map(|(j, _)| j)
                .filter(|&j| eligible[j])
                .collect();
            v.sort_unstable();
            v
        })
        .collect();
    let mut rings = Vec::new();
    let mut path = Vec::with_capacity(6);
    for (start, _) in eligible.iter().enumerate().filter(|(_, &ok)| ok) {
        path.clear();
        path.push(start);
        extend(&adj, start, &mut path, &mut rings);
    }
    rings
}

/// Depth-first search for simple cycles of length 6 whose smallest atom is `path[0]`,
/// each found once (second atom smaller than the last).
fn extend(adj: &[Vec<usize>], start: usize, path: &mut Vec<usize>, rings: &mut Vec<[usize; 6]>) {
    let Some(&last) = path.last() else { return };
    for &next in &adj[last] {
        if path.len() == 6 {
            if next == start && path[1] < path[5] {
                let mut ring = [0; 6];
                ring.copy_from_slice(path);
                rings.push(ring);
            }
            continue;
        }
        if next <= start || path.contains(&next) {
            continue;
        }
        path.push(next);
        extend(adj, start, path, rings);
        path.pop();
    }
}

/// The six-membered rings whose atoms are aromatic and whose ring bonds are aromatic.
pub fn aromatic_rings(m: &Molecule) -> Vec<[usize; 6]> {
    six_rings(m)
        .into_iter()
        .filter(|ring| {
            (0..6).all(|k| {
                m.atom(ring[k]).aromatic
                    && m.bond(ring[k], ring[(k + 1) % 6]) == Some(Bond::Aromatic)
            })
        })
        .collect()
}

/// A copy of `m` with Kekulé benzene and pyridine rings turned aromatic (see the module
/// documentation); hydrogen counts are kept.
pub fn aromatise(m: &Molecule) -> Molecule {
    let rings = six_rings(m);
    let mut candidate: Vec<bool> = rings.iter().map(|r| ring_atoms_qualify(m, r)).collect();
    loop {
        let mut changed = false;
        for (r, ring) in rings.iter().enumerate() {
            if !candidate[r] {
                continue;
            }
            let ok = ring.iter().all(|&a| {
                if m.atom(a).aromatic {
                    return true;
                }
                let doubles: Vec<usize> = m
                    .neighbours(a)
                    .filter(|(_, b)| *b == Bond::Double)
                    .map(|(j, _)| j)
                    .collect();
                doubles.len() == 1
                    && rings.iter().enumerate().any(|(s, other)| {
                        candidate[s]
                            && other.contains(&a)
                            && other.contains(&doubles[0])
                            && adjacent_in(other, a, doubles[0])
                    })
            });
            if !ok {
                candidate[r] = false;
                changed = true;
            }
        }
        if !changed {
            break;
        }
    }
    let mut out = m.clone();
    for (r, ring) in rings.iter().enumerate() {
        if !candidate[r] {
            continue;
        }
        for k in 0..6 {
            out.atom_mut(ring[k]).aromatic = true;
            out.set_bond(ring[k], ring[(k + 1) % 6], Bond::Aromatic);
        }
    }
    out
}

/// True when atoms `a` and `b` are neighbours along `ring`.
fn adjacent_in(ring: &[usize; 6], a: usize, b: usize) -> bool {
    (0..6).any(|k| {
        let (x, y) = (ring[k], ring[(k + 1) % 6]);
        (x == a && y == b) || (x == b && y == a)
    })
}

/// Atom-level conditions: neutral C or N, N with two neighbours and no H, no triple bond
/// along the ring.
fn ring_atoms_qualify(m: &Molecule, ring: &[usize; 6]) -> bool {
    (0..6).all(|k| {
        let a = m.atom(ring[k]);
        let bond_ok = matches!(
            m.bond(ring[k], ring[(k + 1) % 6]),
            Some(Bond::Single | Bond::Double | Bond::Aromatic)
        );
        let atom_ok = a.charge == 0
            && match a.element {
                Element::C => true,
                Element::N => m.degree(ring[k]) == 2 && a.hydrogens == 0,
                _ => false,
            };
        bond_ok && atom_ok
    })
}
