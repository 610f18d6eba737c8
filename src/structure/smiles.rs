//! SMILES (OpenSMILES subset): a canonical writer and a reader able to read it back.
//!
//! The writer walks the molecule depth first in canonical-label order (from
//! [`super::canon`]), so one constitution gives one string whatever the input atom order.
//! Aromatic atoms are written lower case (`c`, `n`); a single bond between two aromatic
//! atoms is written `-`. Atoms outside the organic subset's implicit-hydrogen rule, and
//! charged atoms, are written in brackets with their hydrogen count.
//!
//! # Grammar read (a subset of OpenSMILES; stereo marks and isotopes are refused)
//!
//! ```text
//! smiles  := atom tail*
//! tail    := bond? atom | bond? ring | '(' bond? atom tail* ')'
//! atom    := organic | aromatic | '[' symbol hcount? charge? ']'
//! organic := 'C' | 'N' | 'O' | 'S' | 'P' | 'F' | 'Cl' | 'Br' | 'I'
//! aromatic:= 'c' | 'n'
//! symbol  := organic | aromatic
//! hcount  := 'H' digit?
//! charge  := ('+' | '-') digit? | '++' | '--'
//! bond    := '-' | '=' | '#' | ':'
//! ring    := digit | '%' digit digit
//! ```
//! Implicit hydrogens (OpenSMILES): an organic-subset atom gets the lowest normal valence
//! at or above its bond-order sum (C 4; N 3, 5; O 2; S 2, 4, 6; P 3, 5; halogens 1), an
//! aromatic one the same with one more for its ring π bond.

use super::canon::molecule_graph;
use super::molecule::{Atom, Bond, Element, Molecule};
use crate::diag::Diagnostic;
use std::fmt::Write as _;

/// A SMILES string that could not be read, with the 0-based byte offset of the problem.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("{message}")]
pub struct SmilesError {
    /// Lower-case message without a trailing period.
    pub message: String,
    /// 0-based byte offset into `input`.
    pub offset: usize,
    /// The text read.
    pub input: String,
}

impl SmilesError {
    /// A diagnostic placed at the error's offset, for origin `origin`.
    pub fn to_diagnostic(&self, origin: &str) -> Diagnostic {
        Diagnostic::error(origin, self.message.clone()).at_offset(&self.input, self.offset)
    }
}

/// Normal valences of the organic subset (OpenSMILES).
fn normal_valences(e: Element) -> &'static [u8] {
    match e {
        Element::C => &[4],
        Element::N => &[3, 5],
        Element::O => &[2],
        Element::S => &[2, 4, 6],
        Element::P => &[3, 5],
        Element::F | Element::Cl | Element::Br | Element::I => &[1],
    }
}

/// Hydrogens the OpenSMILES implicit-hydrogen rule gives an unbracketed atom.
fn implicit_hydrogens(e: Element, aromatic: bool, bond_sum: u8) -> u8 {
    let used = bond_sum + u8::from(aromatic);
    normal_valences(e)
        .iter()
        .find(|&&v| v >= used)
        .map_or(0, |&v| v - used)
}

/// Bond-order sum of atom `i` with aromatic bonds counted 1.
fn bond_sum(m: &Molecule, i: usize) -> u8 {
    m.neighbours(i).map(|(_, b)| b.sigma_pi_order()).sum()
}

/// The canonical SMILES of `m` (aromatise it first for lower-case aromatic output).
pub fn to_smiles(m: &Molecule) -> String {
    let n = m.n_atoms();
    if n == 0 {
        return String::new();
    }
    let rank = molecule_graph(m).canonical_permutation();
    let mut adj: Vec<Vec<(usize, Bond)>> = (0..n).map(|i| m.neighbours(i).collect()).collect();
    for list in &mut adj {
        list.sort_by_key(|&(j, _)| rank[j]);
    }
    let mut writer = Writer {
        m,
        adj: &adj,
        rank: &rank,
        visited: vec![false; n],
        children: vec![Vec::new(); n],
        ring_edges: vec![Vec::new(); n],
        open_digit: Vec::new(),
        free_digits: Vec::new(),
        next_digit: 1,
        out: String::new(),
    };
    let mut first = true;
    loop {
        // Start each component at its lowest-degree atom of lowest rank.
        let start = (0..n)
            .filter(|&i| !writer.visited[i])
            .min_by_key(|&i| (adj[i].len(), rank[i]));
        let Some(start) = start else { break };
        writer.discover(start, usize::MAX);
        writer.order_branches(start);
        if !first {
            writer.out.push('.');
        }
        first = false;
        writer.write(start);
    }
    writer.out
}

struct Writer<'a> {
    m: &'a Molecule,
    adj: &'a [Vec<(usize, Bond)>],
    rank: &'a [usize],
    visited: Vec<bool>,
    children: Vec<Vec<(usize, Bond)>>,
    /// Ring-closure partners of each atom, in the order they are written.
    ring_edges: Vec<Vec<(usize, Bond)>>,
    /// `(a, b, digit)` of ring bonds opened and not yet closed.
    open_digit: Vec<(usize, usize, u32)>,
    free_digits: Vec<u32>,
    next_digit: u32,
    out: String,
}

impl Writer<'_> {
    /// First pass: the depth-first tree and the ring-closure bonds.
    fn discover(&mut self, u: usize, parent: usize) {
        self.visited[u] = true;
        let mut parent_skipped = false;
        for &(v, bond) in &self.adj[u] {
            if v == parent && !parent_skipped {
                parent_skipped = true;
                continue;
            }
            if self.visited[v] {
                // A back edge to an ancestor: record once, at both ends.
                if !self.ring_edges[u].iter().any(|&(w, _)| w == v) {
                    self.ring_edges[u].push((v, bond));
                    self.ring_edges[v].push((u, bond));
                }
            } else {
                self.children[u].push((v, bond));
                self.discover(v, u);
            }
        }
    }

    /// Writes smaller branches first (in parentheses) and the largest last, ties by
    /// canonical rank, so that `CC(=O)c1ccccc1` comes out rather than `CC(c1ccccc1)=O`.
    /// Returns the size of the subtree at `u`.
    fn order_branches(&mut self, u: usize) -> usize {
        let mut children = std::mem::take(&mut self.children[u]);
        let mut sized: Vec<(usize, usize, (usize, Bond))> = Vec::new();
        for &(v, bond) in &children {
            let size = self.order_branches(v);
            sized.push((size, self.rank[v], (v, bond)));
        }
        sized.sort_by_key(|&(size, rank, _)| (size, rank));
        children = sized.iter().map(|&(_, _, c)| c).collect();
        let total = 1 + sized.iter().map(|&(s, _, _)| s).sum::<usize>();
        self.children[u] = children;
        total
    }

    /// Second pass: text.
    fn write(&mut self, u: usize) {
        self.write_atom(u);
        let ring = std::mem::take(&mut self.ring_edges[u]);
        for &(v, bond) in &ring {
            if let Some(pos) = self
                .open_digit
                .iter()
                .position(|&(a, b, _)| (a == v && b == u) || (a == u && b == v))
            {
                let (_, _, d) = self.open_digit.remove(pos);
                push_digit(&mut self.out, d);
                self.free_digits.push(d);
                self.free_digits.sort_unstable_by(|a, b| b.cmp(a));
            } else {
                let d = self.free_digits.pop().unwrap_or_else(|| {
                    let d = self.next_digit;
                    self.next_digit += 1;
                    d
                });
                self.push_bond(u, v, bond);
                push_digit(&mut self.out, d);
                self.open_digit.push((u, v, d));
            }
        }
        let children = std::mem::take(&mut self.children[u]);
        let last = children.len().saturating_sub(1);
        for (k, &(v, bond)) in children.iter().enumerate() {
            if k < last {
                self.out.push('(');
                self.push_bond(u, v, bond);
                self.write(v);
                self.out.push(')');
            } else {
                self.push_bond(u, v, bond);
                self.write(v);
            }
        }
    }

    fn push_bond(&mut self, u: usize, v: usize, bond: Bond) {
        let both_aromatic = self.m.atom(u).aromatic && self.m.atom(v).aromatic;
        match bond {
            Bond::Single if both_aromatic => self.out.push('-'),
            Bond::Single | Bond::Aromatic => {}
            Bond::Double => self.out.push('='),
            Bond::Triple => self.out.push('#'),
        }
    }

    fn write_atom(&mut self, u: usize) {
        let a = self.m.atom(u);
        let symbol = if a.aromatic {
            a.element.symbol().to_lowercase()
        } else {
            a.element.symbol().to_owned()
        };
        let sum = bond_sum(self.m, u);
        let plain_ok = a.charge == 0
            && (!a.aromatic || matches!(a.element, Element::C | Element::N))
            && implicit_hydrogens(a.element, a.aromatic, sum) == a.hydrogens;
        if plain_ok {
            self.out.push_str(&symbol);
            return;
        }
        self.out.push('[');
        self.out.push_str(&symbol);
        match a.hydrogens {
            0 => {}
            1 => self.out.push('H'),
            h => {
                let _ = write!(self.out, "H{h}");
            }
        }
        match a.charge {
            0 => {}
            1 => self.out.push('+'),
            -1 => self.out.push('-'),
            c if c > 0 => {
                let _ = write!(self.out, "+{c}");
            }
            c => {
                let _ = write!(self.out, "-{}", -c);
            }
        }
        self.out.push(']');
    }
}

fn push_digit(out: &mut String, d: u32) {
    if d < 10 {
        let _ = write!(out, "{d}");
    } else {
        let _ = write!(out, "%{d:02}");
    }
}

/// Reads a SMILES string of the grammar in the module documentation.
pub fn parse_smiles(src: &str) -> Result<Molecule, SmilesError> {
    Reader {
        src,
        bytes: src.as_bytes(),
        pos: 0,
    }
    .read()
}

struct Reader<'a> {
    src: &'a str,
    bytes: &'a [u8],
    pos: usize,
}

/// An atom as read, before implicit hydrogens are known.
struct ReadAtom {
    element: Element,
    aromatic: bool,
    charge: i8,
    /// Written hydrogen count of a bracket atom; `None` for the organic subset.
    hydrogens: Option<u8>,
}

impl Reader<'_> {
    fn error(&self, offset: usize, message: impl Into<String>) -> SmilesError {
        SmilesError {
            message: message.into(),
            offset,
            input: self.src.to_owned(),
        }
    }

    fn peek(&self) -> Option<u8> {
        self.bytes.get(self.pos).copied()
    }

    fn read(mut self) -> Result<Molecule, SmilesError> {
        let mut atoms: Vec<ReadAtom> = Vec::new();
        let mut bonds: Vec<(usize, usize, Option<Bond>)> = Vec::new();
        let mut stack: Vec<(usize, usize)> = Vec::new(); // (atom, offset of '(')
        let mut previous: Option<usize> = None;
        let mut pending_bond: Option<(Bond, usize)> = None;
        let mut rings: Vec<(u32, usize, Option<Bond>, usize)> = Vec::new();
        if self.src.trim().is_empty() {
            return Err(self.error(0, "empty SMILES"));
        }
        while let Some(c) = self.peek() {
            let at = self.pos;
            match c {
                b'-' | b'=' | b'#' | b':' | b'/' | b'\\' => {
                    if pending_bond.is_some() {
                        return Err(self.error(at, "two bond symbols in a row"));
                    }
                    let bond = match c {
                        b'=' => Bond::Double,
                        b'#' => Bond::Triple,
                        b':' => Bond::Aromatic,
                        _ => Bond::Single,
                    };
                    pending_bond = Some((bond, at));
                    self.pos += 1;
                }
                b'(' => {
                    let Some(p) = previous else {
                        return Err(self.error(at, "a branch needs an atom before it"));
                    };
                    stack.push((p, at));
                    self.pos += 1;
                }
                b')' => {
                    let Some((p, _)) = stack.pop() else {
                        return Err(self.error(at, "')' closes nothing"));
                    };
                    if let Some((_, b_at)) = pending_bond {
                        return Err(self.error(b_at, "a bond symbol needs an atom after it"));
                    }
                    previous = Some(p);
                    self.pos += 1;
                }
                b'0'..=b'9' | b'%' => {
                    let Some(p) = previous else {
                        return Err(self.error(at, "a ring-closure digit needs an atom before it"));
                    };
                    let digit = self.ring_number()?;
                    let bond = pending_bond.take().map(|(b, _)| b);
                    if let Some(k) = rings.iter().position(|r| r.0 == digit) {
                        let (_, other, other_bond, _) = rings.remove(k);
                        if other == p {
                            return Err(self.error(at, "a ring bond cannot join an atom to itself"));
                        }
                        bonds.push((other, p, bond.or(other_bond)));
                    } else {
                        rings.push((digit, p, bond, at));
                    }
                }
                b'.' => {
                    return Err(self.error(at, "disconnected structures ('.') are not supported"))
                }
                b'@' => return Err(self.error(at, "stereo marks are not supported")),
                _ => {
                    let atom = self.atom()?;
                    let index = atoms.len();
                    atoms.push(atom);
                    if let Some(p) = previous {
                        bonds.push((p, index, pending_bond.take().map(|(b, _)| b)));
                    } else if let Some((_, b_at)) = pending_bond {
                        return Err(self.error(b_at, "a bond symbol needs an atom before it"));
                    }
                    previous = Some(index);
                }
            }
        }
        if let Some((_, b_at)) = pending_bond {
            return Err(self.error(b_at, "a bond symbol needs an atom after it"));
        }
        if let Some(&(_, open)) = stack.last() {
            return Err(self.error(open, "unclosed '('"));
        }
        if let Some(&(_, _, _, at)) = rings.first() {
            return Err(self.error(at, "ring bond opened and never closed"));
        }
        let mut m = Molecule::new();
        for a in &atoms {
            m.add_atom(Atom {
                element: a.element,
                charge: a.charge,
                hydrogens: 0,
                aromatic: a.aromatic,
            });
        }
        for &(a, b, bond) in &bonds {
            if m.bond(a, b).is_some() {
                return Err(
                    self.error(0, format!("atoms {} and {} are bonded twice", a + 1, b + 1))
                );
            }
            let bond = bond.unwrap_or(if atoms[a].aromatic && atoms[b].aromatic {
                Bond::Aromatic
            } else {
                Bond::Single
            });
            m.add_bond(a, b, bond);
        }
        for (i, a) in atoms.iter().enumerate() {
            let h = match a.hydrogens {
                Some(h) => h,
                None => implicit_hydrogens(a.element, a.aromatic, bond_sum(&m, i)),
            };
            m.atom_mut(i).hydrogens = h;
        }
        Ok(m)
    }

    fn ring_number(&mut self) -> Result<u32, SmilesError> {
        let at = self.pos;
        if self.peek() == Some(b'%') {
            let digits = self.bytes.get(at + 1..at + 3);
            match digits {
                Some(d) if d.iter().all(u8::is_ascii_digit) => {
                    self.pos += 3;
                    Ok(u32::from(d[0] - b'0') * 10 + u32::from(d[1] - b'0'))
                }
                _ => Err(self.error(at, "'%' must be followed by two digits")),
            }
        } else {
            self.pos += 1;
            Ok(u32::from(self.bytes[at] - b'0'))
        }
    }

    fn atom(&mut self) -> Result<ReadAtom, SmilesError> {
        let at = self.pos;
        if self.peek() == Some(b'[') {
            return self.bracket_atom();
        }
        let rest = &self.src[at..];
        let (symbol, len) = if rest.starts_with("Cl") || rest.starts_with("Br") {
            (&rest[..2], 2)
        } else {
            let ch = rest.chars().next().unwrap_or(' ');
            (&rest[..ch.len_utf8()], ch.len_utf8())
        };
        let (element, aromatic) = match symbol {
            "c" => (Element::C, true),
            "n" => (Element::N, true),
            s => match Element::from_symbol(s) {
                Some(e) => (e, false),
                None => return Err(self.error(at, format!("unexpected {symbol:?}"))),
            },
        };
        self.pos += len;
        Ok(ReadAtom {
            element,
            aromatic,
            charge: 0,
            hydrogens: None,
        })
    }

    fn bracket_atom(&mut self) -> Result<ReadAtom, SmilesError> {
        let open = self.pos;
        self.pos += 1;
        let at = self.pos;
        if matches!(self.peek(), Some(b'0'..=b'9')) {
            return Err(self.error(at, "isotope labels are not supported"));
        }
        let rest = &self.src[at..];
        let two: String = rest.chars().take(2).collect();
        let (element, aromatic, len) = if two == "Cl" || two == "Br" {
            (Element::from_symbol(&two), false, 2)
        } else {
            match rest.chars().next() {
                Some('c') => (Some(Element::C), true, 1),
                Some('n') => (Some(Element::N), true, 1),
                Some(ch) => (Element::from_symbol(&ch.to_string()), false, ch.len_utf8()),
                None => (None, false, 0),
            }
        };
        let Some(element) = element else {
            return Err(self.error(at, "expected an element symbol (C N O S P F Cl Br I, c n)"));
        };
        self.pos += len;
        let mut hydrogens = 0u8;
        if self.peek() == Some(b'H') {
            self.pos += 1;
            hydrogens = 1;
            if let Some(d @ b'0'..=b'9') = self.peek() {
                hydrogens = d - b'0';
                self.pos += 1;
            }
        }
        let mut charge = 0i8;
        if let Some(sign @ (b'+' | b'-')) = self.peek() {
            let unit: i8 = if sign == b'+' { 1 } else { -1 };
            self.pos += 1;
            charge = unit;
            match self.peek() {
                Some(d @ b'0'..=b'9') => {
                    charge = unit * (d - b'0') as i8;
                    self.pos += 1;
                }
                Some(s) if s == sign => {
                    charge = 2 * unit;
                    self.pos += 1;
                }
                _ => {}
            }
        }
        match self.peek() {
            Some(b']') => {
                self.pos += 1;
                Ok(ReadAtom {
                    element,
                    aromatic,
                    charge,
                    hydrogens: Some(hydrogens),
                })
            }
            Some(b'@') => Err(self.error(self.pos, "stereo marks are not supported")),
            Some(_) => Err(self.error(self.pos, "unexpected character in bracket atom")),
            None => Err(self.error(open, "unclosed '['")),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::aromatic::aromatise;
    use crate::structure::canon::CanonicalKey;

    fn canonical(s: &str) -> String {
        to_smiles(&aromatise(&parse_smiles(s).unwrap()))
    }

    #[test]
    fn one_constitution_gives_one_string_whatever_the_atom_order() {
        // common practice: these pairs are the same compound written two ways.
        for (a, b) in [
            ("CCO", "OCC"),
            ("CC(C)C", "C(C)(C)C"),
            ("C1CCCCC1", "C(C1)CCCC1"),
            ("CC(=O)c1ccccc1", "c1ccc(cc1)C(C)=O"),
            ("C1=CC=CC=C1C", "Cc1ccccc1"),
            ("OC(=O)C=C", "C=CC(O)=O"),
        ] {
            assert_eq!(canonical(a), canonical(b), "{a} vs {b}");
        }
    }

    #[test]
    fn kekule_forms_of_benzene_rings_are_written_aromatic() {
        assert_eq!(canonical("C1=CC=CC=C1"), "c1ccccc1");
        assert_eq!(canonical("C1=CC=CC=C1"), canonical("C=1C=CC=CC=1"));
        // ortho-xylene written with the substituted bond single and double.
        assert_eq!(canonical("CC1=C(C)C=CC=C1"), canonical("CC1C(C)=CC=CC=1"));
        // a quinone-like ring keeps its double bonds
        assert!(canonical("O=C1C=CC(=O)C=C1").contains('='));
    }

    #[test]
    fn written_output_reads_back_to_the_same_constitution() {
        for s in [
            "CCO",
            "CC(C)(C)C",
            "C1CC2CCC1C2",
            "c1ccc2ccccc2c1",
            "CC[N+](=O)[O-]",
            "CS(C)(=O)=O",
            "CS(C)=O",
            "c1ccncc1",
            "C#CC=C",
            "c1ccccc1-c1ccccc1",
            "ClC(Br)(I)F",
            "[SH2]=O",
        ] {
            let m = aromatise(&parse_smiles(s).unwrap());
            let written = to_smiles(&m);
            let back = aromatise(&parse_smiles(&written).unwrap());
            assert_eq!(
                CanonicalKey::of(&m),
                CanonicalKey::of(&back),
                "{s} -> {written}"
            );
            assert_eq!(m.formula(), back.formula(), "{s} -> {written}");
        }
    }

    #[test]
    fn implicit_hydrogens_follow_opensmiles() {
        let m = parse_smiles("CS(C)(=O)=O").unwrap();
        assert_eq!(m.formula().to_string(), "C2H6O2S");
        let m = parse_smiles("c1ccccc1O").unwrap();
        assert_eq!(m.formula().to_string(), "C6H6O");
        let m = parse_smiles("[nH]").unwrap();
        assert_eq!(m.atom(0).hydrogens, 1);
    }

    #[test]
    fn bad_smiles_are_reported_at_their_place() {
        for (s, offset, message) in [
            ("", 0, "empty SMILES"),
            ("CC(C", 2, "unclosed '('"),
            ("C1CC", 1, "ring bond opened and never closed"),
            ("CX", 1, "unexpected \"X\""),
            ("C.C", 1, "disconnected structures ('.') are not supported"),
            ("C=", 1, "a bond symbol needs an atom after it"),
            ("[13C]", 1, "isotope labels are not supported"),
            ("C)C", 1, "')' closes nothing"),
            ("[CH4", 0, "unclosed '['"),
        ] {
            let e = parse_smiles(s).unwrap_err();
            assert_eq!((e.offset, e.message.as_str()), (offset, message), "{s:?}");
        }
    }
}
