//! Hydrogen-suppressed molecular graphs: heavy atoms as petgraph nodes (each with its
//! hydrogen count, formal charge and aromatic flag), bonds as edges of order 1, 2, 3 or
//! aromatic.
//!
//! Valence conventions (common practice): C 4, N 3 (N⁺ 4), O 2 (O⁻ 1), F Cl Br I 1,
//! S 2 + 2 per S=O (so 2 in sulfides, 4 in sulfoxides, 6 in sulfones), P 3 + 2 per P=O
//! (at most one, so 3 or 5). An aromatic atom (in a perceived benzene or pyridine ring)
//! carries valence − 1 − degree hydrogens, its π bond being shared with the ring.

use crate::chem::{Composition, Formula};
use petgraph::graph::{NodeIndex, UnGraph};
use petgraph::visit::EdgeRef;
use std::fmt;

/// A heavy-atom element the structure generator knows.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, serde::Serialize)]
pub enum Element {
    /// Carbon.
    C,
    /// Nitrogen.
    N,
    /// Oxygen.
    O,
    /// Sulfur.
    S,
    /// Phosphorus.
    P,
    /// Fluorine.
    F,
    /// Chlorine.
    Cl,
    /// Bromine.
    Br,
    /// Iodine.
    I,
}

impl Element {
    /// Every supported element, in the order used for canonical colours.
    pub const ALL: [Element; 9] = [
        Element::C,
        Element::N,
        Element::O,
        Element::S,
        Element::P,
        Element::F,
        Element::Cl,
        Element::Br,
        Element::I,
    ];

    /// The element symbol.
    pub fn symbol(self) -> &'static str {
        match self {
            Element::C => "C",
            Element::N => "N",
            Element::O => "O",
            Element::S => "S",
            Element::P => "P",
            Element::F => "F",
            Element::Cl => "Cl",
            Element::Br => "Br",
            Element::I => "I",
        }
    }

    /// The element for a symbol, exact case.
    pub fn from_symbol(symbol: &str) -> Option<Element> {
        Element::ALL.into_iter().find(|e| e.symbol() == symbol)
    }

    /// Lowest standard valence (the one the degree of unsaturation is computed with).
    pub fn base_valence(self) -> u8 {
        match self {
            Element::C => 4,
            Element::N | Element::P => 3,
            Element::O | Element::S => 2,
            Element::F | Element::Cl | Element::Br | Element::I => 1,
        }
    }

    /// True for F, Cl, Br, I.
    pub fn is_halogen(self) -> bool {
        matches!(self, Element::F | Element::Cl | Element::Br | Element::I)
    }

    /// Small dense code used in canonical colours.
    pub(crate) fn code(self) -> u32 {
        Element::ALL.iter().position(|e| *e == self).unwrap_or(0) as u32
    }
}

impl fmt::Display for Element {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.symbol())
    }
}

/// A bond between two heavy atoms.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, serde::Serialize)]
pub enum Bond {
    /// Order 1.
    Single,
    /// Order 2.
    Double,
    /// Order 3.
    Triple,
    /// A bond of a perceived aromatic ring (order 1.5).
    Aromatic,
}

impl Bond {
    /// Integer order for single, double, triple; aromatic counts 1 here (its shared π
    /// electron is accounted per atom, see the module documentation).
    pub fn sigma_pi_order(self) -> u8 {
        match self {
            Bond::Single | Bond::Aromatic => 1,
            Bond::Double => 2,
            Bond::Triple => 3,
        }
    }

    /// Small dense code used in canonical labels (1, 2, 3, 4).
    pub(crate) fn code(self) -> u8 {
        match self {
            Bond::Single => 1,
            Bond::Double => 2,
            Bond::Triple => 3,
            Bond::Aromatic => 4,
        }
    }
}

/// One heavy atom with its attached hydrogens.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Atom {
    /// The element.
    pub element: Element,
    /// Formal charge (only nitro and nitrate groups use one: N⁺ and O⁻).
    pub charge: i8,
    /// Number of attached hydrogen atoms.
    pub hydrogens: u8,
    /// Member of a perceived aromatic ring.
    pub aromatic: bool,
}

impl Atom {
    /// A neutral, non-aromatic atom.
    pub fn new(element: Element, hydrogens: u8) -> Atom {
        Atom {
            element,
            charge: 0,
            hydrogens,
            aromatic: false,
        }
    }
}

/// A connected hydrogen-suppressed molecular graph.
#[derive(Clone, Debug, Default)]
pub struct Molecule {
    graph: UnGraph<Atom, Bond>,
}

impl Molecule {
    /// An empty molecule.
    pub fn new() -> Molecule {
        Molecule::default()
    }

    /// Adds an atom and returns its index.
    pub fn add_atom(&mut self, atom: Atom) -> usize {
        self.graph.add_node(atom).index()
    }

    /// Adds a bond between atoms `a` and `b` (indices from [`Molecule::add_atom`]).
    pub fn add_bond(&mut self, a: usize, b: usize, bond: Bond) {
        self.graph
            .add_edge(NodeIndex::new(a), NodeIndex::new(b), bond);
    }

    /// The underlying petgraph graph.
    pub fn graph(&self) -> &UnGraph<Atom, Bond> {
        &self.graph
    }

    /// Number of heavy atoms.
    pub fn n_atoms(&self) -> usize {
        self.graph.node_count()
    }

    /// Number of bonds between heavy atoms.
    pub fn n_bonds(&self) -> usize {
        self.graph.edge_count()
    }

    /// The atom at `i`.
    pub fn atom(&self, i: usize) -> Atom {
        self.graph[NodeIndex::new(i)]
    }

    /// Mutable access to the atom at `i`.
    pub fn atom_mut(&mut self, i: usize) -> &mut Atom {
        &mut self.graph[NodeIndex::new(i)]
    }

    /// `(neighbour, bond)` pairs of atom `i`, in no particular order.
    pub fn neighbours(&self, i: usize) -> impl Iterator<Item = (usize, Bond)> + '_ {
        self.graph.edges(NodeIndex::new(i)).map(move |e| {
            let other = if e.source().index() == i {
                e.target().index()
            } else {
                e.source().index()
            };
            (other, *e.weight())
        })
    }

    /// The bond between `a` and `b`, if any.
    pub fn bond(&self, a: usize, b: usize) -> Option<Bond> {
        self.graph
            .find_edge(NodeIndex::new(a), NodeIndex::new(b))
            .map(|e| self.graph[e])
    }

    /// Sets the bond between `a` and `b` (which must exist).
    pub(crate) fn set_bond(&mut self, a: usize, b: usize, bond: Bond) {
        if let Some(e) = self.graph.find_edge(NodeIndex::new(a), NodeIndex::new(b)) {
            self.graph[e] = bond;
        }
    }

    /// Every bond as `(a, b, bond)` with `a < b`.
    pub fn bonds(&self) -> impl Iterator<Item = (usize, usize, Bond)> + '_ {
        self.graph.edge_references().map(|e| {
            let (a, b) = (e.source().index(), e.target().index());
            (a.min(b), a.max(b), *e.weight())
        })
    }

    /// Number of heavy-atom neighbours of `i`.
    pub fn degree(&self, i: usize) -> usize {
        self.graph.edges(NodeIndex::new(i)).count()
    }

    /// Element counts including hydrogen.
    pub fn composition(&self) -> Composition {
        let mut c = Composition::new();
        for atom in self.graph.node_weights() {
            c.add(atom.element.symbol(), 1);
            c.add("H", u32::from(atom.hydrogens));
        }
        c
    }

    /// The neutral molecular formula.
    pub fn formula(&self) -> Formula {
        // Every symbol here is in the chemistry core's element table.
        Formula::from_composition(&self.composition()).unwrap_or_default()
    }

    /// Number of independent rings (cycle rank: bonds − atoms + connected components).
    pub fn cycle_rank(&self) -> usize {
        let components = petgraph::algo::connected_components(&self.graph);
        (self.n_bonds() + components).saturating_sub(self.n_atoms())
    }

    /// True when every atom is reachable from every other.
    pub fn is_connected(&self) -> bool {
        self.n_atoms() <= 1 || petgraph::algo::connected_components(&self.graph) == 1
    }
}
