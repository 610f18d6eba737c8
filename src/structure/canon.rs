//! Canonical labels of vertex- and edge-coloured graphs, computed by the pure-Rust crate
//! `canonical-form` (individualisation–refinement with automorphism pruning).
//!
//! A [`Coloured`] graph is a vector of vertex colours plus sorted adjacency lists of
//! `(neighbour, edge label)`. Its canonical form is the largest image of the graph under
//! all vertex permutations that the crate's search tree reaches; two graphs are
//! isomorphic (colours and labels preserved) exactly when their canonical forms are equal.
//! The tests below check that against hand-made isomorphic and non-isomorphic pairs.

use super::molecule::Molecule;
use canonical_form::Canonize;

/// Number of distinct edge-label slots handed to the refinement. Labels are bond codes
/// 1–4, plus 8 for bonds inside a unit; they map to slots 0..8. Kept small because the
/// crate's refinement multiplies a weight by (cell size + 1) once per slot.
const EDGE_LABEL_SLOTS: usize = 8;

/// The refinement slot of an edge label.
fn slot(label: u8) -> usize {
    usize::from((label & 7).saturating_sub(1) & 3) + if label & 8 != 0 { 4 } else { 0 }
}

/// A vertex- and edge-coloured simple graph in the form the canonizer works on.
#[derive(Clone, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Coloured {
    colour: Vec<u32>,
    adj: Vec<Vec<(u32, u8)>>,
}

impl Coloured {
    /// A graph of `colours.len()` vertices and the given labelled edges (`label < 16`).
    pub fn new(colours: Vec<u32>, edges: &[(usize, usize, u8)]) -> Coloured {
        let mut adj = vec![Vec::new(); colours.len()];
        for &(a, b, label) in edges {
            adj[a].push((b as u32, label));
            adj[b].push((a as u32, label));
        }
        for list in &mut adj {
            list.sort_unstable();
        }
        Coloured {
            colour: colours,
            adj,
        }
    }

    /// The colour of vertex `u`.
    pub fn colour(&self, u: usize) -> u32 {
        self.colour[u]
    }

    /// Replaces the colour of vertex `u` (used to mark vertices for orbit tests).
    pub fn set_colour(&mut self, u: usize, colour: u32) {
        self.colour[u] = colour;
    }

    /// Number of vertices.
    pub fn len(&self) -> usize {
        self.colour.len()
    }

    /// True for the empty graph.
    pub fn is_empty(&self) -> bool {
        self.colour.is_empty()
    }

    /// `(neighbour, label)` of vertex `u`, sorted.
    pub fn neighbours(&self, u: usize) -> &[(u32, u8)] {
        &self.adj[u]
    }

    /// The canonical form: equal for two graphs exactly when they are isomorphic.
    pub fn canonical_form(&self) -> Coloured {
        if self.colour.len() <= 1 {
            return self.clone();
        }
        self.canonical()
    }

    /// A permutation `p` (vertex `u` goes to position `p[u]`) taking this graph to its
    /// canonical form.
    pub fn canonical_permutation(&self) -> Vec<usize> {
        if self.colour.len() <= 1 {
            return (0..self.colour.len()).collect();
        }
        self.morphism_to_canonical()
    }

    /// The image of this graph under permutation `p`.
    pub fn permuted(&self, p: &[usize]) -> Coloured {
        self.apply_morphism(p)
    }
}

impl Canonize for Coloured {
    fn size(&self) -> usize {
        self.colour.len()
    }

    fn apply_morphism(&self, p: &[usize]) -> Self {
        let n = self.colour.len();
        let mut colour = vec![0; n];
        let mut adj = vec![Vec::new(); n];
        for u in 0..n {
            colour[p[u]] = self.colour[u];
            let mut list: Vec<(u32, u8)> = self.adj[u]
                .iter()
                .map(|&(v, l)| (p[v as usize] as u32, l))
                .collect();
            list.sort_unstable();
            adj[p[u]] = list;
        }
        Coloured { colour, adj }
    }

    fn invariant_coloring(&self) -> Option<Vec<u64>> {
        Some(self.colour.iter().map(|&c| u64::from(c)).collect())
    }

    fn invariant_neighborhood(&self, u: usize) -> Vec<Vec<usize>> {
        let mut slots = vec![Vec::new(); EDGE_LABEL_SLOTS];
        for &(v, label) in &self.adj[u] {
            slots[slot(label)].push(v as usize);
        }
        slots
    }
}

/// Colour of an atom for molecule-level canonical labels: element, charge, hydrogen count
/// and aromatic flag (all preserved by any isomorphism of molecules).
pub(crate) fn atom_colour(m: &Molecule, i: usize) -> u32 {
    let a = m.atom(i);
    let charge = (i32::from(a.charge) + 8) as u32 & 0xf;
    (a.element.code() << 12) | (charge << 8) | (u32::from(a.hydrogens) << 1) | u32::from(a.aromatic)
}

/// The coloured graph of a molecule (atoms coloured by [`atom_colour`], bonds by order).
pub fn molecule_graph(m: &Molecule) -> Coloured {
    let colours = (0..m.n_atoms()).map(|i| atom_colour(m, i)).collect();
    let edges: Vec<(usize, usize, u8)> =
        m.bonds().map(|(a, b, bond)| (a, b, bond.code())).collect();
    Coloured::new(colours, &edges)
}

/// A molecule's canonical key: equal for two molecules exactly when they are the same
/// constitution (same atoms, charges, hydrogens, bonds; aromatic bonds as written).
#[derive(Clone, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct CanonicalKey(Coloured);

impl CanonicalKey {
    /// The key of `m`. Compare keys of aromatised molecules (see
    /// [`super::aromatic::aromatise`]) so that Kekulé forms of one ring agree.
    pub fn of(m: &Molecule) -> CanonicalKey {
        CanonicalKey(molecule_graph(m).canonical_form())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cycle(n: usize, colours: Vec<u32>) -> Coloured {
        let edges: Vec<(usize, usize, u8)> = (0..n).map(|i| (i, (i + 1) % n, 1)).collect();
        Coloured::new(colours, &edges)
    }

    #[test]
    fn relabelled_graphs_share_one_canonical_form() {
        // A path 0-1-2-3 with an end vertex coloured 7, written in two vertex orders.
        let a = Coloured::new(vec![7, 0, 0, 0], &[(0, 1, 1), (1, 2, 2), (2, 3, 1)]);
        let b = Coloured::new(vec![0, 0, 0, 7], &[(3, 2, 1), (2, 1, 2), (1, 0, 1)]);
        assert_eq!(a.canonical_form(), b.canonical_form());
        let p = a.canonical_permutation();
        assert_eq!(a.permuted(&p), a.canonical_form());
    }

    #[test]
    fn colours_and_edge_labels_are_respected() {
        // Same shape, the double bond in a different place: not isomorphic.
        let a = Coloured::new(vec![0, 0, 0, 0], &[(0, 1, 2), (1, 2, 1), (2, 3, 1)]);
        let b = Coloured::new(vec![0, 0, 0, 0], &[(0, 1, 1), (1, 2, 2), (2, 3, 1)]);
        assert_ne!(a.canonical_form(), b.canonical_form());
        // A six-cycle with two marked vertices: ortho, meta and para differ.
        let mark = |i: usize, j: usize| {
            let mut c = vec![0; 6];
            c[i] = 1;
            c[j] = 1;
            cycle(6, c).canonical_form()
        };
        assert_eq!(mark(0, 1), mark(3, 4));
        assert_eq!(mark(0, 2), mark(5, 1));
        assert_ne!(mark(0, 1), mark(0, 2));
        assert_ne!(mark(0, 2), mark(0, 3));
    }
}
