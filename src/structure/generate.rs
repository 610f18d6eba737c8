//! The isomer generator: canonical augmentation (McKay 1998, "Isomorph-free exhaustive
//! generation", J. Algorithms 26:306–324, `from memory`) over units.
//!
//! A *unit* is what one augmentation step adds: a single atom in the plain mode (all
//! constitutional isomers of a formula), or a functional-group fragment (C=O of a ketone,
//! a benzene ring, an OH, ...) or a free sp3 carbon in the group-restricted mode. Each
//! step adds one unit joined to the structure built so far by at least one bond; a
//! structure's canonical parent is obtained by deleting its canonically chosen
//! removable unit (one whose deletion keeps the rest connected: the unit with the
//! largest refinement invariant, ties broken by the canonical label of its atoms).
//! A child is kept only when the unit just added lies in the same automorphism orbit as
//! that canonical unit, and children of one parent are deduplicated by canonical form.
//! By McKay's argument every connected structure is then produced exactly once per
//! labelled graph. Kekulé forms of one aromatic ring are distinct labelled graphs, so the
//! finished structures are aromatised and deduplicated once more by canonical key.
//!
//! Pruning (why the searches are fast): atom valences are capacities; in the plain mode
//! the degree of unsaturation used so far (Σ bond orders − (atoms − 1) − hypervalent
//! S=O/P=O) never decreases along a construction path, so a branch stops as soon as it
//! exceeds the formula's DBE; in the group mode all π bonds sit inside fragments and only
//! ring closures between units are free, counted against the `ring` budget, and every
//! bond between units has a carbon at one end at least.

use super::aromatic::aromatise;
use super::canon::{CanonicalKey, Coloured};
use super::groups::{GroupCounts, GroupId};
use super::molecule::{Atom, Bond, Element, Molecule};
use super::perceive::perceive;
use super::smiles::parse_smiles;
use crate::budget::{infallible, Meter, Stage, Unmetered};
use crate::chem::Formula;
use std::collections::HashSet;
use std::ops::ControlFlow;

/// Largest number of heavy atoms accepted (the enumeration grows exponentially).
pub const MAX_HEAVY_ATOMS: u32 = 40;

/// Why a generation request cannot be run at all.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum StructureError {
    /// An element other than C, H, N, O, S, P, F, Cl, Br, I.
    #[error("element {0} is not supported by the structure generator (C H N O S P F Cl Br I)")]
    UnsupportedElement(String),
    /// An ion or radical.
    #[error("structures are generated for neutral closed-shell molecules only")]
    Charged,
    /// An isotope label.
    #[error("write the formula without isotope labels")]
    Isotope,
    /// No heavy atom.
    #[error("the formula has no atom other than hydrogen")]
    NoHeavyAtom,
    /// Too many heavy atoms.
    #[error("the formula has {0} atoms other than hydrogen; the limit is {MAX_HEAVY_ATOMS}")]
    TooLarge(u32),
}

/// How a finished enumeration ended.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Summary {
    /// Structures handed to the visitor.
    pub emitted: u64,
    /// True when the visitor asked to stop before the end.
    pub stopped: bool,
    /// Why there can be no structure at all (formula and groups disagree), when known.
    pub no_structure_reason: Option<String>,
    /// Finished labelled graphs dropped because an equal aromatised structure was already
    /// emitted: Kekulé forms of one aromatic ring. Zero for structures without benzene or
    /// pyridine rings, which is what shows that the augmentation itself is exact.
    pub duplicates_merged: u64,
}

/// One atom of a unit shape.
#[derive(Clone, Debug)]
struct ShapeAtom {
    element: Element,
    charge: i8,
    aromatic: bool,
    /// Fewest bonds to other units this atom must finally have.
    min_ports: u8,
    /// Most bond orders to other units this atom may carry.
    max_ports: u8,
}

/// A kind of unit.
#[derive(Clone, Debug)]
struct Shape {
    atoms: Vec<ShapeAtom>,
    bonds: Vec<(usize, usize, Bond)>,
    /// Per atom, its symmetry class within the shape (atoms an automorphism of the
    /// fragment, ports included, exchanges share a class). Canonical colours use the
    /// class, not the atom's position, so that the six carbons of a benzene fragment are
    /// interchangeable and a monosubstituted ring is one labelled graph, not six.
    classes: Vec<u8>,
}

impl Shape {
    fn new(atoms: Vec<ShapeAtom>, bonds: Vec<(usize, usize, Bond)>) -> Shape {
        let colours: Vec<u32> = atoms
            .iter()
            .map(|a| {
                (a.element.code() << 20)
                    | (((i32::from(a.charge) + 8) as u32 & 0xf) << 16)
                    | (u32::from(a.aromatic) << 15)
                    | (u32::from(a.min_ports) << 8)
                    | u32::from(a.max_ports)
            })
            .collect();
        let edges: Vec<(usize, usize, u8)> = bonds
            .iter()
            .map(|&(a, b, bond)| (a, b, bond.code()))
            .collect();
        let graph = Coloured::new(colours, &edges);
        // Two atoms are in one orbit exactly when marking either gives the same
        // canonical form.
        let marked: Vec<Coloured> = (0..atoms.len())
            .map(|i| {
                let mut g = graph.clone();
                g.set_colour(i, g.colour(i) | MARK);
                g.canonical_form()
            })
            .collect();
        let classes = (0..atoms.len())
            .map(|i| (0..=i).find(|&j| marked[j] == marked[i]).unwrap_or(i) as u8)
            .collect();
        Shape {
            atoms,
            bonds,
            classes,
        }
    }
}

/// The search problem: shapes, how many of each, the budget and the target H count.
struct Problem {
    shapes: Vec<Shape>,
    counts: Vec<u32>,
    /// Plain mode: single atoms, bond orders 1–3 between them, DBE budget.
    plain: bool,
    /// DBE (plain) or ring-closure (group) budget.
    budget: u32,
    hydrogens: u32,
    /// Group mode: the multiset every structure must show.
    target: Option<GroupCounts>,
    /// Group mode: the shape of free sp3 carbons, removed first on canonical paths.
    free_carbon_shape: Option<usize>,
}

/// The structure being built.
#[derive(Clone, Debug)]
struct State {
    /// Per atom: (shape, role within the shape).
    role: Vec<(u16, u8)>,
    unit_of: Vec<u16>,
    /// Bond orders to other units.
    ports_used: Vec<u8>,
    /// Double bonds from S/P to terminal O (plain mode hypervalence bookkeeping).
    n_oxo: Vec<u8>,
    /// (a, b, bond, between units)
    edges: Vec<(usize, usize, Bond, bool)>,
    units: Vec<(u16, usize)>,
    remaining: Vec<u32>,
    budget_used: u32,
}

/// Marks the atoms of one unit in orbit tests.
const MARK: u32 = 1 << 30;

/// Calls `visit` once for every constitutional isomer of `formula` (plain mode, `groups`
/// `None`) or for every one whose perceived groups equal `groups` exactly and that holds
/// no unclassified heteroatom or multiple bond. Molecules are aromatised. Stops when
/// `visit` breaks.
pub fn for_each_structure(
    formula: &Formula,
    groups: Option<&GroupCounts>,
    visit: impl FnMut(Molecule) -> ControlFlow<()>,
) -> Result<Summary, StructureError> {
    for_each_structure_within(formula, groups, &mut Unmetered, visit).map(infallible)
}

/// [`for_each_structure`] under a meter: every search step is a tick and every distinct
/// structure found holds [`BYTES_PER_STRUCTURE_SEEN`] per heavy atom (the duplicate
/// check keeps a canonical key of each; the estimate also covers a caller that keeps the
/// structure). The outer error is a bad request; the inner one is the meter's stop.
pub fn for_each_structure_within<M: Meter>(
    formula: &Formula,
    groups: Option<&GroupCounts>,
    meter: &mut M,
    mut visit: impl FnMut(Molecule) -> ControlFlow<()>,
) -> Result<Result<Summary, M::Stop>, StructureError> {
    let problem = match groups {
        None => plain_problem(formula)?,
        Some(g) => group_problem(formula, g)?,
    };
    let problems = match problem {
        Ok(p) => vec![p],
        Err(reason) => {
            return Ok(Ok(Summary {
                emitted: 0,
                stopped: false,
                no_structure_reason: Some(reason),
                duplicates_merged: 0,
            }))
        }
    };
    let mut seen: HashSet<CanonicalKey> = HashSet::new();
    let mut summary = Summary {
        emitted: 0,
        stopped: false,
        no_structure_reason: None,
        duplicates_merged: 0,
    };
    for problem in &problems {
        let mut run = Run {
            problem,
            seen: &mut seen,
            visit: &mut visit,
            meter: &mut *meter,
            stop: None,
            emitted: 0,
            merged: 0,
        };
        let start_states = problem.start_states();
        let mut flow = ControlFlow::Continue(());
        for s in start_states {
            flow = run.grow(&s);
            if flow.is_break() {
                break;
            }
        }
        summary.emitted += run.emitted;
        summary.duplicates_merged += run.merged;
        if let Some(stop) = run.stop {
            return Ok(Err(stop));
        }
        if flow.is_break() {
            summary.stopped = true;
            break;
        }
    }
    Ok(Ok(summary))
}

/// Bytes held per heavy atom of every distinct structure found, for the meter: the
/// canonical key's colours and adjacency lists, the hash set's slot, and a listed
/// structure's SMILES and features.
pub const BYTES_PER_STRUCTURE_SEEN: u64 = 96;

/// Counts the structures `for_each_structure` would visit.
pub fn count_structures(
    formula: &Formula,
    groups: Option<&GroupCounts>,
) -> Result<u64, StructureError> {
    Ok(for_each_structure(formula, groups, |_| ControlFlow::Continue(()))?.emitted)
}

/// Heavy-atom counts of a formula, checked.
fn heavy_atoms(formula: &Formula) -> Result<(Vec<(Element, u32)>, u32), StructureError> {
    if formula.charge() != 0 || formula.is_radical() {
        return Err(StructureError::Charged);
    }
    let mut heavy = Vec::new();
    let mut hydrogens = 0;
    for (atom, n) in formula.atoms() {
        if atom.mass_number().is_some() {
            return Err(StructureError::Isotope);
        }
        if atom.symbol() == "H" {
            hydrogens += n;
            continue;
        }
        let e = Element::from_symbol(atom.symbol())
            .ok_or_else(|| StructureError::UnsupportedElement(atom.symbol().to_owned()))?;
        heavy.push((e, n));
    }
    let n_heavy: u32 = heavy.iter().map(|(_, n)| n).sum();
    if n_heavy == 0 {
        return Err(StructureError::NoHeavyAtom);
    }
    if n_heavy > MAX_HEAVY_ATOMS {
        return Err(StructureError::TooLarge(n_heavy));
    }
    heavy.sort();
    Ok((heavy, hydrogens))
}

/// Twice the formula's DBE, when the formula is of supported elements.
fn twice_dbe(heavy: &[(Element, u32)], hydrogens: u32) -> i64 {
    let mut t = 2i64 - i64::from(hydrogens);
    for &(e, n) in heavy {
        t += i64::from(n) * (i64::from(e.base_valence()) - 2);
    }
    t
}

/// Builds the plain-mode problem, or the reason no structure can exist.
fn plain_problem(formula: &Formula) -> Result<Result<Problem, String>, StructureError> {
    let (heavy, hydrogens) = heavy_atoms(formula)?;
    let t = twice_dbe(&heavy, hydrogens);
    if t < 0 || t % 2 != 0 {
        return Ok(Err(format!(
            "the formula's degree of unsaturation is {}; a neutral closed-shell molecule needs a whole number of at least 0",
            t as f64 / 2.0
        )));
    }
    let shapes = heavy
        .iter()
        .map(|&(e, _)| {
            Shape::new(
                vec![ShapeAtom {
                    element: e,
                    charge: 0,
                    aromatic: false,
                    min_ports: 0,
                    max_ports: match e {
                        Element::S => 6,
                        Element::P => 5,
                        other => other.base_valence(),
                    },
                }],
                Vec::new(),
            )
        })
        .collect();
    let counts = heavy.iter().map(|&(_, n)| n).collect();
    Ok(Ok(Problem {
        shapes,
        counts,
        plain: true,
        budget: (t / 2) as u32,
        hydrogens,
        target: None,
        free_carbon_shape: None,
    }))
}

/// The fragment of one group: SMILES of its heavy atoms and `(atom, min, max)` bonds to
/// other units for the atoms that may carry them.
fn fragment(group: GroupId) -> (&'static str, &'static [(usize, u8, u8)]) {
    use GroupId as G;
    match group {
        G::Alkene => ("C=C", &[(0, 0, 2), (1, 0, 2)]),
        G::AlkyneTerminal => ("C#C", &[(0, 0, 1)]), // min 0: acetylene
        G::AlkyneInternal => ("C#C", &[(0, 1, 1), (1, 1, 1)]),
        G::AromaticRing => (
            "c1ccccc1",
            &[
                (0, 0, 1),
                (1, 0, 1),
                (2, 0, 1),
                (3, 0, 1),
                (4, 0, 1),
                (5, 0, 1),
            ],
        ),
        G::PyridineRing => (
            "n1ccccc1",
            &[(1, 0, 1), (2, 0, 1), (3, 0, 1), (4, 0, 1), (5, 0, 1)],
        ),
        // One shape for both: where the OH sits decides which one perception sees.
        G::Alcohol | G::Phenol => ("O", &[(0, 1, 1)]),
        G::Ether => ("O", &[(0, 2, 2)]),
        G::Aldehyde => ("C=O", &[(0, 0, 1)]),
        G::Ketone => ("C=O", &[(0, 2, 2)]),
        G::CarboxylicAcid => ("C(=O)O", &[(0, 0, 1)]),
        G::Ester => ("C(=O)O", &[(0, 0, 1), (2, 1, 1)]),
        G::Anhydride => ("C(=O)OC=O", &[(0, 0, 1), (3, 0, 1)]),
        G::AcylHalide => ("C=O", &[(0, 0, 1)]), // the halogen is added per element
        G::AminePrimary => ("N", &[(0, 1, 1)]),
        G::AmineSecondary => ("N", &[(0, 2, 2)]),
        G::AmineTertiary => ("N", &[(0, 3, 3)]),
        G::AmidePrimary => ("C(=O)N", &[(0, 0, 1)]),
        G::AmideSecondary => ("C(=O)N", &[(0, 0, 1), (2, 1, 1)]),
        G::AmideTertiary => ("C(=O)N", &[(0, 0, 1), (2, 2, 2)]),
        G::Nitrile => ("C#N", &[(0, 1, 1)]),
        G::Nitro => ("[N+](=O)[O-]", &[(0, 1, 1)]),
        G::Imine => ("C=N", &[(0, 0, 2), (1, 0, 1)]),
        G::Isocyanate => ("N=C=O", &[(0, 1, 1)]),
        G::Thiol => ("S", &[(0, 1, 1)]),
        G::Sulfide => ("S", &[(0, 2, 2)]),
        G::Sulfoxide => ("S=O", &[(0, 2, 2)]),
        G::Sulfone => ("S(=O)=O", &[(0, 2, 2)]),
        G::Sulfonamide => ("S(=O)(=O)N", &[(0, 1, 1), (3, 0, 2)]),
        G::Fluoro => ("F", &[(0, 1, 1)]),
        G::Chloro => ("Cl", &[(0, 1, 1)]),
        G::Bromo => ("Br", &[(0, 1, 1)]),
        G::Iodo => ("I", &[(0, 1, 1)]),
        G::Carbamate => ("NC(=O)O", &[(0, 0, 2), (3, 1, 1)]),
        G::Urea => ("NC(=O)N", &[(0, 0, 2), (3, 0, 2)]),
        G::NitrateEster => ("O[N+](=O)[O-]", &[(0, 1, 1)]),
        G::PhosphateEster => ("P(=O)(O)(O)O", &[(2, 0, 1), (3, 0, 1), (4, 0, 1)]),
        G::Ring => ("", &[]),
    }
}

fn shape_from(smiles: &str, ports: &[(usize, u8, u8)]) -> Shape {
    // The fragment table is fixed text checked by the tests: it always parses.
    let m = parse_smiles(smiles).unwrap_or_default();
    let atoms = (0..m.n_atoms())
        .map(|i| {
            let a = m.atom(i);
            let (min_ports, max_ports) = ports
                .iter()
                .find(|p| p.0 == i)
                .map_or((0, 0), |p| (p.1, p.2));
            ShapeAtom {
                element: a.element,
                charge: a.charge,
                aromatic: a.aromatic,
                min_ports,
                max_ports,
            }
        })
        .collect();
    Shape::new(atoms, m.bonds().collect())
}

/// Distinct shapes with their counts (fragments of identical text and ports merge).
#[derive(Default)]
struct ShapeSet {
    keys: Vec<String>,
    shapes: Vec<Shape>,
    counts: Vec<u32>,
}

impl ShapeSet {
    fn add(&mut self, smiles: &str, ports: &[(usize, u8, u8)], n: u32) {
        let key = format!("{smiles}{ports:?}");
        if let Some(k) = self.keys.iter().position(|s| *s == key) {
            self.counts[k] += n;
        } else {
            self.keys.push(key);
            self.shapes.push(shape_from(smiles, ports));
            self.counts.push(n);
        }
    }
}

/// Builds the group-mode problem, or the reason no structure can exist.
fn group_problem(
    formula: &Formula,
    groups: &GroupCounts,
) -> Result<Result<Problem, String>, StructureError> {
    let (heavy, hydrogens) = heavy_atoms(formula)?;
    let mut set = ShapeSet::default();
    let formula_count = |e: Element| heavy.iter().find(|(x, _)| *x == e).map_or(0, |(_, n)| *n);
    let halo = [
        (Element::F, GroupId::Fluoro),
        (Element::Cl, GroupId::Chloro),
        (Element::Br, GroupId::Bromo),
        (Element::I, GroupId::Iodo),
    ];
    let mut acyl_left = groups.count(GroupId::AcylHalide);
    for (g, n) in groups.iter() {
        if matches!(g, GroupId::Ring | GroupId::AcylHalide) {
            continue;
        }
        let (smiles, ports) = fragment(g);
        set.add(smiles, ports, n);
    }
    for (e, g) in halo {
        let extra = formula_count(e).saturating_sub(groups.count(g));
        if extra > 0 && acyl_left > 0 {
            let n = extra.min(acyl_left);
            acyl_left -= n;
            set.add(&format!("C(=O){}", e.symbol()), &[(0, 0, 1)], n);
        }
    }
    if acyl_left > 0 {
        return Ok(Err(format!(
            "{acyl_left} acyl halide group(s) but no halogen left for them in the formula"
        )));
    }
    // Element bookkeeping: fragments must use every heteroatom; carbon left over is free.
    let (shapes, counts) = (&set.shapes, &set.counts);
    let mut used: Vec<(Element, u32)> = Element::ALL.iter().map(|&e| (e, 0)).collect();
    for (shape, &n) in shapes.iter().zip(counts) {
        for a in &shape.atoms {
            if let Some(u) = used.iter_mut().find(|(e, _)| *e == a.element) {
                u.1 += n;
            }
        }
    }
    let mut free_carbons = 0;
    for &(e, n_used) in &used {
        let have = formula_count(e);
        if e == Element::C {
            if n_used > have {
                return Ok(Err(format!(
                    "the groups need {n_used} carbon atoms; the formula has {have}"
                )));
            }
            free_carbons = have - n_used;
        } else if n_used != have {
            return Ok(Err(format!(
                "the groups hold {n_used} {} atom(s); the formula has {have} (every heteroatom must belong to a group)",
                e.symbol()
            )));
        }
    }
    let mut free_carbon_shape = None;
    if free_carbons > 0 {
        set.add("C", &[(0, 0, 4)], free_carbons);
        free_carbon_shape = Some(set.shapes.len() - 1);
    }
    let ShapeSet { shapes, counts, .. } = set;
    // Hydrogen bookkeeping: H capacity of all atoms minus two per bond between units.
    let rings = groups.count(GroupId::Ring);
    let n_units: u32 = counts.iter().sum();
    let mut capacity: i64 = 0;
    for (shape, &n) in shapes.iter().zip(&counts) {
        let m = shape_molecule(shape);
        for i in 0..m.n_atoms() {
            let bond_sum: u8 = m.neighbours(i).map(|(_, b)| b.sigma_pi_order()).sum();
            let a = m.atom(i);
            let n_oxo = oxo_count(&m, i);
            capacity += i64::from(n)
                * i64::from(
                    hydrogen_capacity(
                        a.element,
                        a.charge,
                        a.aromatic,
                        m.degree(i) as u8,
                        bond_sum,
                        n_oxo,
                    )
                    .unwrap_or(0),
                );
        }
    }
    let bonds_between = i64::from(n_units) - 1 + i64::from(rings);
    let h_expected = capacity - 2 * bonds_between;
    if h_expected != i64::from(hydrogens) {
        let groups_dbe = groups.dbe();
        let formula_dbe = twice_dbe(&heavy, hydrogens) as f64 / 2.0;
        return Ok(Err(format!(
            "the groups account for {groups_dbe} rings plus π bonds (DBE), the formula for {formula_dbe}; hydrogens would be {h_expected}, the formula has {hydrogens}"
        )));
    }
    Ok(Ok(Problem {
        shapes,
        counts,
        plain: false,
        budget: rings,
        hydrogens,
        target: Some(groups.clone()),
        free_carbon_shape,
    }))
}

fn shape_molecule(shape: &Shape) -> Molecule {
    let mut m = Molecule::new();
    for a in &shape.atoms {
        m.add_atom(Atom {
            element: a.element,
            charge: a.charge,
            hydrogens: 0,
            aromatic: a.aromatic,
        });
    }
    for &(a, b, bond) in &shape.bonds {
        m.add_bond(a, b, bond);
    }
    m
}

/// Double bonds from atom `i` to a terminal neutral oxygen.
fn oxo_count(m: &Molecule, i: usize) -> u8 {
    m.neighbours(i)
        .filter(|&(j, b)| {
            b == Bond::Double
                && m.atom(j).element == Element::O
                && m.degree(j) == 1
                && m.atom(j).charge == 0
        })
        .count() as u8
}

/// Hydrogens an atom carries under the valence conventions of [`super::molecule`];
/// `None` when its bonds exceed its valence.
fn hydrogen_capacity(
    e: Element,
    charge: i8,
    aromatic: bool,
    degree: u8,
    bond_sum: u8,
    n_oxo: u8,
) -> Option<u8> {
    let valence: u8 = match (e, charge) {
        (Element::N, 1) => 4,
        (Element::O, -1) => 1,
        (_, 0) => match e {
            Element::S if !aromatic => 2 + 2 * n_oxo.min(2),
            Element::P if !aromatic => 3 + 2 * n_oxo.min(1),
            _ => e.base_valence(),
        },
        _ => return None,
    };
    if aromatic {
        return valence.checked_sub(1 + degree);
    }
    if e == Element::S && n_oxo > 2 || e == Element::P && n_oxo > 1 {
        return None;
    }
    valence.checked_sub(bond_sum)
}

impl Problem {
    /// One single-unit structure per shape.
    fn start_states(&self) -> Vec<State> {
        (0..self.shapes.len())
            .filter(|&s| self.counts[s] > 0)
            .map(|s| {
                let empty = State {
                    role: Vec::new(),
                    unit_of: Vec::new(),
                    ports_used: Vec::new(),
                    n_oxo: Vec::new(),
                    edges: Vec::new(),
                    units: Vec::new(),
                    remaining: self.counts.clone(),
                    budget_used: 0,
                };
                self.with_unit(&empty, s)
            })
            .collect()
    }

    /// `state` plus one unattached unit of shape `s`.
    fn with_unit(&self, state: &State, s: usize) -> State {
        let mut next = state.clone();
        let base = next.role.len();
        let unit = next.units.len() as u16;
        let shape = &self.shapes[s];
        for (r, _) in shape.atoms.iter().enumerate() {
            next.role.push((s as u16, r as u8));
            next.unit_of.push(unit);
            next.ports_used.push(0);
            next.n_oxo.push(0);
        }
        for &(a, b, bond) in &shape.bonds {
            next.edges.push((base + a, base + b, bond, false));
        }
        next.units.push((s as u16, base));
        next.remaining[s] -= 1;
        next
    }

    fn atom_spec(&self, state: &State, i: usize) -> &ShapeAtom {
        let (s, r) = state.role[i];
        &self.shapes[usize::from(s)].atoms[usize::from(r)]
    }

    /// Colour of atom `i` for canonical labels: shape and role (which fix element,
    /// charge and ports).
    fn colour(&self, state: &State, i: usize) -> u32 {
        let (s, r) = state.role[i];
        let class = self.shapes[usize::from(s)].classes[usize::from(r)];
        (u32::from(s) << 8) | u32::from(class)
    }

    fn coloured(&self, state: &State) -> Coloured {
        let colours = (0..state.role.len())
            .map(|i| self.colour(state, i))
            .collect();
        let edges: Vec<(usize, usize, u8)> = state
            .edges
            .iter()
            .map(|&(a, b, bond, between)| (a, b, bond.code() | if between { 0 } else { 8 }))
            .collect();
        Coloured::new(colours, &edges)
    }
}

struct Run<'a, F: FnMut(Molecule) -> ControlFlow<()>, M: Meter> {
    problem: &'a Problem,
    seen: &'a mut HashSet<CanonicalKey>,
    visit: &'a mut F,
    meter: &'a mut M,
    /// Set when the meter stopped the search.
    stop: Option<M::Stop>,
    emitted: u64,
    merged: u64,
}

impl<F: FnMut(Molecule) -> ControlFlow<()>, M: Meter> Run<'_, F, M> {
    /// Breaks when `metered` is the meter's stop, keeping the stop.
    fn stopped_by(&mut self, metered: Result<(), M::Stop>) -> ControlFlow<()> {
        match metered {
            Ok(()) => ControlFlow::Continue(()),
            Err(stop) => {
                self.stop = Some(stop);
                ControlFlow::Break(())
            }
        }
    }

    fn grow(&mut self, state: &State) -> ControlFlow<()> {
        let tick = self.meter.tick(Stage::Structures);
        self.stopped_by(tick)?;
        let p = self.problem;
        if state.remaining.iter().all(|&n| n == 0) {
            return self.finish(state);
        }
        let mut siblings: HashSet<Coloured> = HashSet::new();
        for s in 0..p.shapes.len() {
            if state.remaining[s] == 0 {
                continue;
            }
            let base = state.role.len();
            let with = p.with_unit(state, s);
            let new_ports: Vec<usize> = (0..p.shapes[s].atoms.len())
                .filter(|&r| p.shapes[s].atoms[r].max_ports > 0)
                .map(|r| base + r)
                .collect();
            let mut pairs = Vec::new();
            for &a in &new_ports {
                for b in 0..base {
                    let spec_b = p.atom_spec(state, b);
                    if state.ports_used[b] >= spec_b.max_ports {
                        continue;
                    }
                    let spec_a = p.atom_spec(&with, a);
                    if !p.plain && spec_a.element != Element::C && spec_b.element != Element::C {
                        continue;
                    }
                    pairs.push((a, b));
                }
            }
            let mut children = Vec::new();
            let mut chosen = Vec::new();
            self.attachments(&with, &pairs, 0, &mut chosen, &mut children);
            for child in children {
                let unit = child.units.len() - 1;
                if let Some(form) = self.accept(&child, unit) {
                    if siblings.insert(form) {
                        self.grow(&child)?;
                    }
                }
            }
        }
        ControlFlow::Continue(())
    }

    /// Every way to bond the new unit (the last one in `with`) to the rest through
    /// `pairs[k..]`, within capacities and budget; at least one bond.
    fn attachments(
        &self,
        with: &State,
        pairs: &[(usize, usize)],
        k: usize,
        chosen: &mut Vec<(usize, usize, u8)>,
        out: &mut Vec<State>,
    ) {
        let p = self.problem;
        if k == pairs.len() {
            if chosen.is_empty() {
                return;
            }
            let mut child = with.clone();
            let mut cost: i64 = -1;
            for &(a, b, order) in chosen.iter() {
                let bond = match order {
                    2 => Bond::Double,
                    3 => Bond::Triple,
                    _ => Bond::Single,
                };
                child.edges.push((a, b, bond, true));
                child.ports_used[a] += order;
                child.ports_used[b] += order;
                if p.plain {
                    cost += i64::from(order);
                    if order == 2 {
                        // S=O / P=O on a terminal O: hypervalent, consumes no DBE.
                        for (x, o) in [(a, b), (b, a)] {
                            let ex = p.atom_spec(&child, x).element;
                            let eo = p.atom_spec(&child, o).element;
                            let limit = match ex {
                                Element::S => 2,
                                Element::P => 1,
                                _ => 0,
                            };
                            if eo == Element::O && child.n_oxo[x] < limit {
                                child.n_oxo[x] += 1;
                                cost -= 1;
                            }
                        }
                    }
                } else {
                    cost += 1;
                }
            }
            let used = i64::from(child.budget_used) + cost;
            if used > i64::from(p.budget) {
                return;
            }
            child.budget_used = used as u32;
            out.push(child);
            return;
        }
        // Leave the pair out.
        self.attachments(with, pairs, k + 1, chosen, out);
        let (a, b) = pairs[k];
        let used_a: u8 = chosen.iter().filter(|c| c.0 == a).map(|c| c.2).sum();
        let used_b: u8 =
            with.ports_used[b] + chosen.iter().filter(|c| c.1 == b).map(|c| c.2).sum::<u8>();
        let max_a = p.atom_spec(with, a).max_ports;
        let max_b = p.atom_spec(with, b).max_ports;
        let max_order = if p.plain { 3 } else { 1 };
        for order in 1..=max_order {
            if used_a + order > max_a || used_b + order > max_b {
                break;
            }
            chosen.push((a, b, order));
            if self.lower_bound_cost(with, chosen) + i64::from(with.budget_used)
                > i64::from(p.budget)
            {
                // Adding bonds never lowers the cost: no completion of `chosen` fits.
                chosen.pop();
                break;
            }
            self.attachments(with, pairs, k + 1, chosen, out);
            chosen.pop();
        }
    }

    /// A lower bound on the budget the bonds `chosen` consume: every bond beyond the
    /// first costs its order (group mode: 1), less one for each double bond that could
    /// be a hypervalent S=O or P=O.
    fn lower_bound_cost(&self, with: &State, chosen: &[(usize, usize, u8)]) -> i64 {
        let p = self.problem;
        let mut cost = -1i64;
        for &(a, b, order) in chosen {
            if !p.plain {
                cost += 1;
                continue;
            }
            cost += i64::from(order);
            if order == 2 {
                let (ea, eb) = (p.atom_spec(with, a).element, p.atom_spec(with, b).element);
                let hyper = |x: Element| matches!(x, Element::S | Element::P);
                if (ea == Element::O && hyper(eb)) || (eb == Element::O && hyper(ea)) {
                    cost -= 1;
                }
            }
        }
        cost
    }

    /// The canonical-augmentation test. Returns the child's canonical form when the unit
    /// just added is in the orbit of the child's canonical removable unit.
    fn accept(&self, child: &State, new_unit: usize) -> Option<Coloured> {
        let p = self.problem;
        let g = p.coloured(child);
        let n_units = child.units.len();
        if n_units == 1 {
            return Some(g.canonical_form());
        }
        let removable = removable_units(child);
        let invariant = unit_invariants(&g, child, p.free_carbon_shape);
        let best = removable.iter().map(|&u| invariant[u]).max()?;
        if invariant[new_unit] != best {
            return None;
        }
        let ties: Vec<usize> = removable
            .iter()
            .copied()
            .filter(|&u| invariant[u] == best)
            .collect();
        let perm = g.canonical_permutation();
        let form = g.permuted(&perm);
        if ties.len() == 1 {
            return Some(form);
        }
        let top = |u: usize| {
            (0..child.role.len())
                .filter(|&i| usize::from(child.unit_of[i]) == u)
                .map(|i| perm[i])
                .max()
                .unwrap_or(0)
        };
        let chosen = ties.iter().copied().max_by_key(|&u| top(u))?;
        if chosen == new_unit {
            return Some(form);
        }
        let marked = |u: usize| {
            let mut h = g.clone();
            for i in 0..child.role.len() {
                if usize::from(child.unit_of[i]) == u {
                    h.set_colour(i, h.colour(i) | MARK);
                }
            }
            h.canonical_form()
        };
        (marked(new_unit) == marked(chosen)).then_some(form)
    }

    /// A complete structure: final valence checks, aromatise, perceive, deduplicate, emit.
    fn finish(&mut self, state: &State) -> ControlFlow<()> {
        let p = self.problem;
        if p.plain && state.budget_used != p.budget {
            return ControlFlow::Continue(());
        }
        for i in 0..state.role.len() {
            if state.ports_used[i] < p.atom_spec(state, i).min_ports {
                return ControlFlow::Continue(());
            }
        }
        let mut m = Molecule::new();
        for i in 0..state.role.len() {
            let spec = p.atom_spec(state, i);
            m.add_atom(Atom {
                element: spec.element,
                charge: spec.charge,
                hydrogens: 0,
                aromatic: spec.aromatic,
            });
        }
        for &(a, b, bond, _) in &state.edges {
            m.add_bond(a, b, bond);
        }
        let mut total_h = 0u32;
        for i in 0..m.n_atoms() {
            let a = m.atom(i);
            let bond_sum: u8 = m.neighbours(i).map(|(_, b)| b.sigma_pi_order()).sum();
            let Some(h) = hydrogen_capacity(
                a.element,
                a.charge,
                a.aromatic,
                m.degree(i) as u8,
                bond_sum,
                oxo_count(&m, i),
            ) else {
                return ControlFlow::Continue(());
            };
            m.atom_mut(i).hydrogens = h;
            total_h += u32::from(h);
        }
        if total_h != p.hydrogens {
            return ControlFlow::Continue(());
        }
        let m = aromatise(&m);
        if let Some(target) = &p.target {
            let perception = perceive(&m);
            if !perception.is_fully_classified() || perception.groups != *target {
                return ControlFlow::Continue(());
            }
        }
        if !self.seen.insert(CanonicalKey::of(&m)) {
            self.merged += 1;
            return ControlFlow::Continue(());
        }
        let held = BYTES_PER_STRUCTURE_SEEN * m.n_atoms() as u64;
        let hold = self.meter.hold(held, Stage::Structures);
        self.stopped_by(hold)?;
        self.emitted += 1;
        (self.visit)(m)
    }
}

/// Units whose deletion leaves the other units connected.
fn removable_units(state: &State) -> Vec<usize> {
    let n = state.units.len();
    let mut adj = vec![Vec::new(); n];
    for &(a, b, _, between) in &state.edges {
        if between {
            let (ua, ub) = (usize::from(state.unit_of[a]), usize::from(state.unit_of[b]));
            adj[ua].push(ub);
            adj[ub].push(ua);
        }
    }
    (0..n)
        .filter(|&removed| {
            let start = if removed == 0 { 1 } else { 0 };
            let mut seen = vec![false; n];
            seen[removed] = true;
            seen[start] = true;
            let mut stack = vec![start];
            let mut count = 1;
            while let Some(u) = stack.pop() {
                for &v in &adj[u] {
                    if !seen[v] {
                        seen[v] = true;
                        count += 1;
                        stack.push(v);
                    }
                }
            }
            count == n - 1
        })
        .collect()
}

/// An isomorphism-invariant number per unit: the multiset of its atoms' colours after
/// three rounds of colour refinement.
fn unit_invariants(g: &Coloured, state: &State, preferred_shape: Option<usize>) -> Vec<u64> {
    let n = g.len();
    let mut colour: Vec<u64> = (0..n).map(|i| mix(0, u64::from(g.colour(i)))).collect();
    let mut around: Vec<u64> = Vec::new();
    for _ in 0..3 {
        let next: Vec<u64> = (0..n)
            .map(|i| {
                around.clear();
                around.extend(
                    g.neighbours(i)
                        .iter()
                        .map(|&(j, l)| mix(u64::from(l), colour[j as usize])),
                );
                around.sort_unstable();
                around.iter().fold(mix(1, colour[i]), |h, &x| mix(h, x))
            })
            .collect();
        colour = next;
    }
    let mut per_unit: Vec<Vec<u64>> = vec![Vec::new(); state.units.len()];
    for i in 0..n {
        per_unit[usize::from(state.unit_of[i])].push(colour[i]);
    }
    per_unit
        .into_iter()
        .enumerate()
        .map(|(u, mut v)| {
            v.sort_unstable();
            let h = v.iter().fold(2, |h, &x| mix(h, x)) >> 1;
            // Units of the preferred shape (free carbons) are removed first, so that
            // construction paths place the group fragments before the plain carbons.
            let preferred = preferred_shape == Some(usize::from(state.units[u].0));
            h | (u64::from(preferred) << 63)
        })
        .collect()
}

/// A fast 64-bit mixing step (splitmix64 finaliser); invariants only need to be equal
/// for equal inputs, and rarely equal otherwise.
fn mix(h: u64, x: u64) -> u64 {
    let mut z = h.rotate_left(5) ^ x.wrapping_add(0x9e37_79b9_7f4a_7c15);
    z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
    z ^ (z >> 31)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_fragment_parses_and_has_sensible_ports() {
        for &g in GroupId::ALL {
            if g == GroupId::Ring {
                continue;
            }
            let (smiles, ports) = fragment(g);
            let m = parse_smiles(smiles).unwrap();
            for &(i, min, max) in ports {
                assert!(i < m.n_atoms() && min <= max && max > 0, "{g}");
            }
        }
    }

    #[test]
    fn removable_units_of_a_chain_are_its_ends() {
        let p = plain_problem(&Formula::parse("C3H8").unwrap())
            .unwrap()
            .unwrap();
        let mut s = p.start_states().remove(0);
        s = p.with_unit(&s, 0);
        s.edges.push((0, 1, Bond::Single, true));
        s = p.with_unit(&s, 0);
        s.edges.push((1, 2, Bond::Single, true));
        assert_eq!(removable_units(&s), vec![0, 2]);
    }
}
