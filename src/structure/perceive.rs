//! Functional-group perception on an aromatised molecule: a small set of hand-written
//! SMARTS-like patterns, one per group id. Every heteroatom must be claimed by exactly one
//! group instance; whatever is left over (peroxides, enols, allenes, thiones, imides,
//! N–O and N–N bonds, ...) is reported as unclassified, so that a structure never
//! silently carries a heteroatom-bearing group outside the multiset it was built for.
//!
//! The definitions (written as patterns; `C` any carbon, `[CX4]` a carbon with four single
//! bonds, `c` an aromatic carbon, `R` a carbon or H) are in docs/structures.md.

use super::aromatic::aromatic_rings;
use super::groups::{GroupCounts, GroupId};
use super::molecule::{Bond, Element, Molecule};

/// What perception found in one structure.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Perception {
    /// Group instances by id (`ring` included).
    pub groups: GroupCounts,
    /// Parts no group id covers, one short phrase each (empty for a fully covered structure).
    pub unclassified: Vec<String>,
}

impl Perception {
    /// True when every heteroatom and every multiple bond belongs to a group.
    pub fn is_fully_classified(&self) -> bool {
        self.unclassified.is_empty()
    }
}

struct Ctx<'a> {
    m: &'a Molecule,
    claimed: Vec<bool>,
    groups: GroupCounts,
    notes: Vec<String>,
}

impl Ctx<'_> {
    fn el(&self, i: usize) -> Element {
        self.m.atom(i).element
    }

    /// A carbon with a double bond to an oxygen.
    fn is_carbonyl_carbon(&self, i: usize) -> bool {
        self.el(i) == Element::C
            && self
                .m
                .neighbours(i)
                .any(|(j, b)| b == Bond::Double && self.el(j) == Element::O)
    }

    /// A carbon with only single bonds (sp3).
    fn is_sp3_carbon(&self, i: usize) -> bool {
        let a = self.m.atom(i);
        a.element == Element::C
            && !a.aromatic
            && self.m.neighbours(i).all(|(_, b)| b == Bond::Single)
    }

    fn all_single(&self, i: usize) -> bool {
        self.m.neighbours(i).all(|(_, b)| b == Bond::Single)
    }

    /// `=O`: a neutral oxygen whose only bond is this double bond.
    fn is_oxo(&self, o: usize) -> bool {
        let a = self.m.atom(o);
        a.element == Element::O && a.charge == 0 && self.m.degree(o) == 1 && a.hydrogens == 0
    }

    /// An amide-type nitrogen beside carbonyl carbon `c`: neutral, single bonds only,
    /// its other neighbours carbons that carry no C=O (an imide is not an amide here).
    fn amide_nitrogen_ok(&self, n: usize, c: usize) -> bool {
        let a = self.m.atom(n);
        a.element == Element::N
            && a.charge == 0
            && !a.aromatic
            && self.all_single(n)
            && self
                .m
                .neighbours(n)
                .filter(|&(j, _)| j != c)
                .all(|(j, _)| self.el(j) == Element::C && !self.is_carbonyl_carbon(j))
    }

    /// An ether-type oxygen beside `c`: neutral, two single bonds, the other to a carbon
    /// without C=O.
    fn ester_oxygen_other_carbon(&self, o: usize, c: usize) -> Option<usize> {
        let a = self.m.atom(o);
        if a.element != Element::O || a.charge != 0 || self.m.degree(o) != 2 || !self.all_single(o)
        {
            return None;
        }
        self.m
            .neighbours(o)
            .map(|(j, _)| j)
            .find(|&j| j != c && self.el(j) == Element::C)
    }

    fn claim(&mut self, atoms: &[usize]) {
        for &a in atoms {
            self.claimed[a] = true;
        }
    }

    fn note(&mut self, what: impl Into<String>) {
        self.notes.push(what.into());
    }
}

/// Perceives the groups of `m`, which must be aromatised
/// ([`super::aromatic::aromatise`]) and connected.
pub fn perceive(m: &Molecule) -> Perception {
    let mut ctx = Ctx {
        m,
        claimed: vec![false; m.n_atoms()],
        groups: GroupCounts::new(),
        notes: Vec::new(),
    };
    let rings = aromatic_rings(m);
    for ring in &rings {
        let nitrogens: Vec<usize> = ring
            .iter()
            .copied()
            .filter(|&a| ctx.el(a) == Element::N)
            .collect();
        match nitrogens.len() {
            0 => ctx.groups.add(GroupId::AromaticRing, 1),
            1 => {
                ctx.groups.add(GroupId::PyridineRing, 1);
                ctx.claim(&nitrogens);
            }
            n => ctx.note(format!("aromatic ring with {n} nitrogen atoms")),
        }
    }
    for i in 0..m.n_atoms() {
        if m.atom(i).aromatic && !rings.iter().any(|r| r.contains(&i)) {
            ctx.note(format!(
                "aromatic atom {} outside a six-membered ring",
                i + 1
            ));
        }
    }
    for c in 0..m.n_atoms() {
        if ctx.el(c) == Element::C {
            carbon_centre(&mut ctx, c);
        }
    }
    carbon_carbon_multiple_bonds(&mut ctx);
    for i in 0..m.n_atoms() {
        if ctx.claimed[i] {
            continue;
        }
        match ctx.el(i) {
            Element::C => {}
            Element::N => nitrogen(&mut ctx, i),
            Element::O => oxygen(&mut ctx, i),
            Element::S => sulfur(&mut ctx, i),
            Element::P => phosphorus(&mut ctx, i),
            Element::F | Element::Cl | Element::Br | Element::I => halogen(&mut ctx, i),
        }
    }
    for i in 0..m.n_atoms() {
        if ctx.el(i) != Element::C && !ctx.claimed[i] {
            let e = ctx.el(i);
            ctx.note(format!("{e} atom {} in no known group", i + 1));
        }
    }
    let n_rings = m.cycle_rank().saturating_sub(rings.len());
    ctx.groups.add(GroupId::Ring, n_rings as u32);
    Perception {
        groups: ctx.groups,
        unclassified: ctx.notes,
    }
}

/// Carbonyl, imine, nitrile and isocyanate carbons.
fn carbon_centre(ctx: &mut Ctx<'_>, c: usize) {
    let m = ctx.m;
    let multiple: Vec<(usize, Bond)> = m
        .neighbours(c)
        .filter(|(_, b)| matches!(b, Bond::Double | Bond::Triple))
        .collect();
    let hetero_multiple: Vec<(usize, Bond)> = multiple
        .iter()
        .copied()
        .filter(|&(j, _)| ctx.el(j) != Element::C)
        .collect();
    if hetero_multiple.is_empty() {
        return;
    }
    // N=C=O
    if multiple.len() == 2 {
        let o = multiple
            .iter()
            .find(|&&(j, b)| b == Bond::Double && ctx.is_oxo(j));
        let n = multiple
            .iter()
            .find(|&&(j, b)| b == Bond::Double && ctx.el(j) == Element::N);
        if let (Some(&(o, _)), Some(&(n, _))) = (o, n) {
            let n_atom = m.atom(n);
            let others: Vec<usize> = m
                .neighbours(n)
                .map(|(j, _)| j)
                .filter(|&j| j != c)
                .collect();
            if m.degree(c) == 2
                && n_atom.charge == 0
                && others.len() == 1
                && ctx.el(others[0]) == Element::C
                && m.bond(n, others[0]) == Some(Bond::Single)
            {
                ctx.groups.add(GroupId::Isocyanate, 1);
                ctx.claim(&[o, n]);
                return;
            }
        }
        ctx.note(format!("carbon {} with two multiple bonds", c + 1));
        return;
    }
    if multiple.len() > 1 {
        ctx.note(format!("carbon {} with two multiple bonds", c + 1));
        return;
    }
    let (x, bond) = hetero_multiple[0];
    let singles: Vec<usize> = m
        .neighbours(c)
        .filter(|&(j, _)| j != x)
        .map(|(j, _)| j)
        .collect();
    let h = m.atom(c).hydrogens;
    match (ctx.el(x), bond) {
        (Element::O, Bond::Double) if ctx.is_oxo(x) => carbonyl(ctx, c, x, &singles, h),
        (Element::N, Bond::Double) => {
            let n_atom = m.atom(x);
            let n_others: Vec<usize> = m
                .neighbours(x)
                .map(|(j, _)| j)
                .filter(|&j| j != c)
                .collect();
            let n_ok = n_atom.charge == 0
                && !n_atom.aromatic
                && (n_others.is_empty()
                    || (n_others.len() == 1
                        && ctx.el(n_others[0]) == Element::C
                        && m.bond(x, n_others[0]) == Some(Bond::Single)
                        && !ctx.is_carbonyl_carbon(n_others[0])));
            let c_ok = singles.iter().all(|&j| ctx.el(j) == Element::C);
            if n_ok && c_ok {
                ctx.groups.add(GroupId::Imine, 1);
                ctx.claim(&[x]);
            } else {
                ctx.note(format!("C=N at carbon {} outside the imine pattern", c + 1));
            }
        }
        (Element::N, Bond::Triple) => {
            let n_atom = m.atom(x);
            if n_atom.charge == 0 && singles.len() == 1 && ctx.el(singles[0]) == Element::C {
                ctx.groups.add(GroupId::Nitrile, 1);
                ctx.claim(&[x]);
            } else {
                ctx.note(format!(
                    "C#N at carbon {} outside the nitrile pattern",
                    c + 1
                ));
            }
        }
        (e, _) => ctx.note(format!("carbon {} multiply bonded to {e}", c + 1)),
    }
}

/// `C(=O)` with its single-bonded neighbours `singles` and `h` hydrogens.
fn carbonyl(ctx: &mut Ctx<'_>, c: usize, o: usize, singles: &[usize], h: u8) {
    let m = ctx.m;
    if singles.iter().any(|&j| m.bond(c, j) != Some(Bond::Single)) {
        ctx.note(format!("carbonyl carbon {} in an aromatic ring", c + 1));
        return;
    }
    let of = |e: fn(Element) -> bool| -> Vec<usize> {
        singles.iter().copied().filter(|&j| e(ctx.el(j))).collect()
    };
    let halogens = of(Element::is_halogen);
    let nitrogens = of(|e| e == Element::N);
    let oxygens = of(|e| e == Element::O);
    let carbons = of(|e| e == Element::C);
    let others = singles.len() - halogens.len() - nitrogens.len() - oxygens.len() - carbons.len();
    // How many R (carbon or hydrogen) the carbonyl carbon carries besides its heteroatoms.
    let n_r = carbons.len() + usize::from(h);
    if others > 0 {
        ctx.note(format!("carbonyl carbon {} bonded to S or P", c + 1));
        return;
    }
    match (halogens.len(), nitrogens.len(), oxygens.len()) {
        (1, 0, 0) if n_r == 1 => {
            ctx.groups.add(GroupId::AcylHalide, 1);
            ctx.claim(&[o, halogens[0]]);
        }
        (0, 2, 0)
            if ctx.amide_nitrogen_ok(nitrogens[0], c) && ctx.amide_nitrogen_ok(nitrogens[1], c) =>
        {
            ctx.groups.add(GroupId::Urea, 1);
            ctx.claim(&[o, nitrogens[0], nitrogens[1]]);
        }
        (0, 1, 1)
            if ctx.amide_nitrogen_ok(nitrogens[0], c)
                && ctx
                    .ester_oxygen_other_carbon(oxygens[0], c)
                    .is_some_and(|x| !ctx.is_carbonyl_carbon(x)) =>
        {
            ctx.groups.add(GroupId::Carbamate, 1);
            ctx.claim(&[o, nitrogens[0], oxygens[0]]);
        }
        (0, 1, 0) if n_r == 1 && ctx.amide_nitrogen_ok(nitrogens[0], c) => {
            let id = match m.atom(nitrogens[0]).hydrogens {
                2 => GroupId::AmidePrimary,
                1 => GroupId::AmideSecondary,
                _ => GroupId::AmideTertiary,
            };
            ctx.groups.add(id, 1);
            ctx.claim(&[o, nitrogens[0]]);
        }
        (0, 0, 1) if n_r == 1 => {
            let x = oxygens[0];
            let xa = m.atom(x);
            if xa.charge == 0 && m.degree(x) == 1 && xa.hydrogens == 1 {
                ctx.groups.add(GroupId::CarboxylicAcid, 1);
                ctx.claim(&[o, x]);
            } else if let Some(y) = ctx.ester_oxygen_other_carbon(x, c) {
                if ctx.is_carbonyl_carbon(y) {
                    // C(=O)-O-C(=O): counted once, at the lower-numbered carbonyl carbon.
                    if c < y {
                        ctx.groups.add(GroupId::Anhydride, 1);
                    }
                    ctx.claim(&[o, x]);
                } else {
                    ctx.groups.add(GroupId::Ester, 1);
                    ctx.claim(&[o, x]);
                }
            } else {
                ctx.note(format!("carbonyl carbon {} with an unusual oxygen", c + 1));
            }
        }
        (0, 0, 0) if carbons.len() == 2 => {
            ctx.groups.add(GroupId::Ketone, 1);
            ctx.claim(&[o]);
        }
        (0, 0, 0) if h >= 1 => {
            ctx.groups.add(GroupId::Aldehyde, 1);
            ctx.claim(&[o]);
        }
        _ => ctx.note(format!(
            "carbonyl carbon {} outside every carbonyl pattern",
            c + 1
        )),
    }
}

/// Non-aromatic C=C and C#C bonds.
fn carbon_carbon_multiple_bonds(ctx: &mut Ctx<'_>) {
    let m = ctx.m;
    let n_multiple = |i: usize| {
        m.neighbours(i)
            .filter(|(_, b)| matches!(b, Bond::Double | Bond::Triple))
            .count()
    };
    for (a, b, bond) in m.bonds().collect::<Vec<_>>() {
        if ctx.el(a) != Element::C || ctx.el(b) != Element::C {
            continue;
        }
        match bond {
            Bond::Double => {
                if n_multiple(a) == 1 && n_multiple(b) == 1 {
                    ctx.groups.add(GroupId::Alkene, 1);
                } else {
                    ctx.note(format!(
                        "cumulated double bonds at carbons {} and {}",
                        a + 1,
                        b + 1
                    ));
                }
            }
            Bond::Triple => {
                if n_multiple(a) == 1 && n_multiple(b) == 1 {
                    let terminal = m.degree(a) == 1 || m.degree(b) == 1;
                    ctx.groups.add(
                        if terminal {
                            GroupId::AlkyneTerminal
                        } else {
                            GroupId::AlkyneInternal
                        },
                        1,
                    );
                } else {
                    ctx.note(format!(
                        "C#C beside another multiple bond at carbons {} and {}",
                        a + 1,
                        b + 1
                    ));
                }
            }
            Bond::Single | Bond::Aromatic => {}
        }
    }
}

fn nitrogen(ctx: &mut Ctx<'_>, n: usize) {
    let m = ctx.m;
    let a = m.atom(n);
    let nbrs: Vec<(usize, Bond)> = m.neighbours(n).collect();
    if a.charge == 1 {
        let oxo = nbrs
            .iter()
            .find(|&&(j, b)| b == Bond::Double && ctx.is_oxo(j));
        let oxide = nbrs.iter().find(|&&(j, b)| {
            b == Bond::Single
                && ctx.el(j) == Element::O
                && m.atom(j).charge == -1
                && m.degree(j) == 1
        });
        if let (Some(&(o1, _)), Some(&(o2, _)), 3) = (oxo, oxide, nbrs.len()) {
            let Some(&(x, xb)) = nbrs.iter().find(|&&(j, _)| j != o1 && j != o2) else {
                return;
            };
            if xb != Bond::Single {
                return;
            }
            if ctx.el(x) == Element::C {
                ctx.groups.add(GroupId::Nitro, 1);
                ctx.claim(&[n, o1, o2]);
            } else if ctx
                .ester_oxygen_other_carbon(x, n)
                .is_some_and(|y| !ctx.is_carbonyl_carbon(y))
            {
                ctx.groups.add(GroupId::NitrateEster, 1);
                ctx.claim(&[n, o1, o2, x]);
            }
        }
        return;
    }
    if a.charge != 0 || a.aromatic || !ctx.all_single(n) {
        return;
    }
    let all_carbon = nbrs
        .iter()
        .all(|&(j, _)| ctx.el(j) == Element::C && !ctx.is_carbonyl_carbon(j));
    if !all_carbon {
        return;
    }
    let id = match nbrs.len() {
        1 => GroupId::AminePrimary,
        2 => GroupId::AmineSecondary,
        3 => GroupId::AmineTertiary,
        _ => return,
    };
    ctx.groups.add(id, 1);
    ctx.claim(&[n]);
}

fn oxygen(ctx: &mut Ctx<'_>, o: usize) {
    let m = ctx.m;
    let a = m.atom(o);
    if a.charge != 0 || !ctx.all_single(o) {
        return;
    }
    let nbrs: Vec<usize> = m.neighbours(o).map(|(j, _)| j).collect();
    match (nbrs.len(), a.hydrogens) {
        (1, 1) if ctx.el(nbrs[0]) == Element::C => {
            let c = nbrs[0];
            if m.atom(c).aromatic {
                ctx.groups.add(GroupId::Phenol, 1);
                ctx.claim(&[o]);
            } else if ctx.is_sp3_carbon(c) {
                ctx.groups.add(GroupId::Alcohol, 1);
                ctx.claim(&[o]);
            } else {
                ctx.note(format!("O-H on unsaturated carbon {} (enol)", c + 1));
            }
        }
        (2, 0)
            if nbrs
                .iter()
                .all(|&j| ctx.el(j) == Element::C && !ctx.is_carbonyl_carbon(j)) =>
        {
            ctx.groups.add(GroupId::Ether, 1);
            ctx.claim(&[o]);
        }
        _ => {}
    }
}

fn sulfur(ctx: &mut Ctx<'_>, s: usize) {
    let m = ctx.m;
    let a = m.atom(s);
    if a.charge != 0 {
        return;
    }
    let mut oxo = Vec::new();
    let mut singles = Vec::new();
    for (j, b) in m.neighbours(s) {
        match b {
            Bond::Double if ctx.is_oxo(j) => oxo.push(j),
            Bond::Single => singles.push(j),
            _ => return,
        }
    }
    let carbons: Vec<usize> = singles
        .iter()
        .copied()
        .filter(|&j| ctx.el(j) == Element::C)
        .collect();
    let id = match (oxo.len(), singles.len(), carbons.len(), a.hydrogens) {
        (0, 1, 1, 1) => GroupId::Thiol,
        (0, 2, 2, 0) => GroupId::Sulfide,
        (1, 2, 2, 0) => GroupId::Sulfoxide,
        (2, 2, 2, 0) => GroupId::Sulfone,
        (2, 2, 1, 0) => {
            let Some(&n) = singles.iter().find(|&&j| ctx.el(j) == Element::N) else {
                return;
            };
            let na = m.atom(n);
            let n_ok = na.charge == 0
                && !na.aromatic
                && ctx.all_single(n)
                && m.neighbours(n)
                    .filter(|&(j, _)| j != s)
                    .all(|(j, _)| ctx.el(j) == Element::C && !ctx.is_carbonyl_carbon(j));
            if !n_ok {
                return;
            }
            ctx.claim(&[n]);
            GroupId::Sulfonamide
        }
        _ => return,
    };
    ctx.groups.add(id, 1);
    ctx.claim(&[s]);
    ctx.claim(&oxo);
}

fn phosphorus(ctx: &mut Ctx<'_>, p: usize) {
    let m = ctx.m;
    let nbrs: Vec<(usize, Bond)> = m.neighbours(p).collect();
    let oxo: Vec<usize> = nbrs
        .iter()
        .filter(|&&(j, b)| b == Bond::Double && ctx.is_oxo(j))
        .map(|&(j, _)| j)
        .collect();
    let singles: Vec<usize> = nbrs
        .iter()
        .filter(|&&(_, b)| b == Bond::Single)
        .map(|&(j, _)| j)
        .collect();
    if m.atom(p).charge != 0
        || oxo.len() != 1
        || singles.len() != 3
        || nbrs.len() != 4
        || m.atom(p).hydrogens != 0
    {
        return;
    }
    let mut n_ester = 0;
    for &o in &singles {
        let oa = m.atom(o);
        if oa.element != Element::O || oa.charge != 0 {
            return;
        }
        if m.degree(o) == 1 && oa.hydrogens == 1 {
            continue;
        }
        match ctx.ester_oxygen_other_carbon(o, p) {
            Some(y) if !ctx.is_carbonyl_carbon(y) => n_ester += 1,
            _ => return,
        }
    }
    if n_ester == 0 {
        return;
    }
    ctx.groups.add(GroupId::PhosphateEster, 1);
    ctx.claim(&[p, oxo[0]]);
    ctx.claim(&singles);
}

fn halogen(ctx: &mut Ctx<'_>, x: usize) {
    let m = ctx.m;
    let nbrs: Vec<(usize, Bond)> = m.neighbours(x).collect();
    if m.atom(x).charge != 0
        || nbrs.len() != 1
        || nbrs[0].1 != Bond::Single
        || ctx.el(nbrs[0].0) != Element::C
    {
        return;
    }
    let id = match ctx.el(x) {
        Element::F => GroupId::Fluoro,
        Element::Cl => GroupId::Chloro,
        Element::Br => GroupId::Bromo,
        _ => GroupId::Iodo,
    };
    ctx.groups.add(id, 1);
    ctx.claim(&[x]);
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::aromatic::aromatise;
    use crate::structure::smiles::parse_smiles;

    fn groups(smiles: &str) -> String {
        let p = perceive(&aromatise(&parse_smiles(smiles).unwrap()));
        if p.is_fully_classified() {
            p.groups.to_string()
        } else {
            format!("unclassified: {}", p.unclassified.join("; "))
        }
    }

    #[test]
    fn textbook_compounds_get_their_groups() {
        // common practice: the functional groups of these well-known compounds.
        for (smiles, expected) in [
            ("CC(C)=O", "ketone:1"),
            ("CC=O", "aldehyde:1"),
            ("C=O", "aldehyde:1"),
            ("CCO", "alcohol:1"),
            ("Oc1ccccc1", "aromatic_ring:1,phenol:1"),
            ("COC", "ether:1"),
            ("C1CCOC1", "ring:1,ether:1"),
            ("CC(=O)O", "carboxylic_acid:1"),
            ("CC(=O)OC", "ester:1"),
            ("O=C1CCCO1", "ring:1,ester:1"),
            ("CC(=O)OC(C)=O", "anhydride:1"),
            ("CC(Cl)=O", "acyl_halide:1"),
            ("CN", "amine_primary:1"),
            ("CNC", "amine_secondary:1"),
            ("CN(C)C", "amine_tertiary:1"),
            ("Nc1ccccc1", "aromatic_ring:1,amine_primary:1"),
            ("CC(N)=O", "amide_primary:1"),
            ("CC(=O)NC", "amide_secondary:1"),
            ("CC(=O)N(C)C", "amide_tertiary:1"),
            ("CC#N", "nitrile:1"),
            ("C[N+](=O)[O-]", "nitro:1"),
            ("CO[N+](=O)[O-]", "nitrate_ester:1"),
            ("CC=NC", "imine:1"),
            ("CN=C=O", "isocyanate:1"),
            ("CS", "thiol:1"),
            ("CSC", "sulfide:1"),
            ("CS(C)=O", "sulfoxide:1"),
            ("CS(C)(=O)=O", "sulfone:1"),
            ("CS(N)(=O)=O", "sulfonamide:1"),
            ("NC(N)=O", "urea:1"),
            ("COC(N)=O", "carbamate:1"),
            ("COP(=O)(OC)OC", "phosphate_ester:1"),
            ("CF", "fluoro:1"),
            ("ClC(Cl)Cl", "chloro:3"),
            ("CBr", "bromo:1"),
            ("CI", "iodo:1"),
            ("C=CC", "alkene:1"),
            ("C#CC", "alkyne_terminal:1"),
            ("CC#CC", "alkyne_internal:1"),
            ("c1ccncc1", "pyridine_ring:1"),
            ("C1CCCCC1", "ring:1"),
            ("CC(=O)c1ccccc1", "aromatic_ring:1,ketone:1"),
            ("C1=CC=CC=C1", "aromatic_ring:1"),
            ("C1CCc2ccccc2C1", "aromatic_ring:1,ring:1"),
            ("C=CC(C)=O", "alkene:1,ketone:1"),
        ] {
            assert_eq!(groups(smiles), expected, "{smiles}");
        }
    }

    #[test]
    fn structures_outside_every_group_are_unclassified() {
        for smiles in [
            "COOC",
            "C=CO",
            "C=C=C",
            "CC(=O)NC(C)=O",
            "NN",
            "CON",
            "CC(=S)C",
            "c1ncncc1",
        ] {
            assert!(
                groups(smiles).starts_with("unclassified"),
                "{smiles}: {}",
                groups(smiles)
            );
        }
    }
}
