//! Molecular formulas: parsing, Hill-order printing, arithmetic, masses, DBE and the
//! SENIOR / LEWIS / nitrogen-rule checks.
//!
//! # Grammar
//!
//! Whitespace (`ws`) may stand between any two units, around adduct dots and before the
//! charge; a count must touch the element or bracket it multiplies.
//!
//! ```text
//! formula   := ws part (ws dot ws part)* ws charge? ws EOF
//! dot       := '.' | '·' | '•'                       adduct / hydrate separator
//! part      := count? ws sequence                    "5H2O" in "CuSO4·5H2O"
//! sequence  := unit (ws unit)*
//! unit      := (atom | group) count?
//! group     := '(' ws sequence ws ')' | '[' ws sequence ws ']'
//! atom      := symbol | label
//! symbol    := Upper Lower?                          a known element, or D (= [2H])
//! label     := '[' digits symbol ']'                 one natural isotope, e.g. [13C]
//! count     := digits                                1 ..= MAX_COUNT
//! charge    := ('^' ws)? digits? ws sign+ radical?   "+", "2-", "^2+", "++", "+."
//! sign      := '+' | '-'                             repeated signs add up; no mixing
//! radical   := '.' | '•'                             marks a radical ion (notation only)
//! ```
//!
//! Digits belong to a charge only when `^` or whitespace separates them from the formula:
//! `H2+` is H₂⁺, `C6H6 2+` and `C6H6^2+` are C₆H₆²⁺. A sign followed by digits (`C-2`) is
//! an error, because a count is never negative. Brackets are checked for balance before
//! anything else so that an unclosed `(` is reported where it opens.

use super::composition::Composition;
use super::elements::{self, Element, ALL_SYMBOLS, ELECTRON_MASS};
use crate::diag::{closest_match, Diagnostic};
use std::cmp::Ordering;
use std::collections::BTreeMap;
use std::fmt;

/// Largest count accepted anywhere: a written count, or an atom total after multiplying
/// out groups and adduct parts. A million atoms is far beyond any small-molecule work and
/// keeps all arithmetic exact in `u64` / `f64`.
pub const MAX_COUNT: u64 = 1_000_000;

/// Largest charge magnitude accepted.
pub const MAX_CHARGE: u32 = 100;

/// Deepest bracket nesting accepted (guards the recursive parser's stack).
pub const MAX_NESTING: usize = 64;

/// One kind of atom in a formula: an element at natural isotopic composition, or one
/// explicit isotope of it (`[13C]`, `D`).
#[derive(Clone, Copy, Debug)]
pub struct Atom {
    element: &'static Element,
    mass_number: Option<u16>,
}

impl Atom {
    /// The element at natural isotopic composition.
    pub fn natural(element: &'static Element) -> Atom {
        Atom {
            element,
            mass_number: None,
        }
    }

    /// One natural isotope of `element`; `None` when the element has no natural isotope
    /// with that mass number.
    pub fn isotope(element: &'static Element, mass_number: u16) -> Option<Atom> {
        element.isotope(mass_number).map(|_| Atom {
            element,
            mass_number: Some(mass_number),
        })
    }

    /// The natural atom with this symbol (`D` gives ²H).
    pub fn from_symbol(symbol: &str) -> Option<Atom> {
        if symbol == "D" {
            return elements::element("H").and_then(|h| Atom::isotope(h, 2));
        }
        elements::element(symbol).map(Atom::natural)
    }

    /// The element.
    pub fn element(&self) -> &'static Element {
        self.element
    }

    /// Element symbol (`H` for D).
    pub fn symbol(&self) -> &'static str {
        self.element.symbol
    }

    /// The explicit mass number, `None` for natural composition.
    pub fn mass_number(&self) -> Option<u16> {
        self.mass_number
    }

    /// Mass used for the monoisotopic mass: the labelled isotope's, else the element's
    /// most abundant isotope's.
    pub fn monoisotopic_mass(&self) -> f64 {
        match self.labelled_isotope() {
            Some(i) => i.mass,
            None => self.element.monoisotopic_mass(),
        }
    }

    /// Mass used for the average mass: the labelled isotope's, else the
    /// abundance-weighted mean of the element's isotopes (the mean of the very
    /// distribution the isotope pattern draws from).
    pub fn average_mass(&self) -> f64 {
        match self.labelled_isotope() {
            Some(i) => i.mass,
            None => self.element.isotope_weighted_mass(),
        }
    }

    /// Mass number used for the nominal mass.
    pub fn nominal_mass(&self) -> u16 {
        self.mass_number
            .unwrap_or_else(|| self.element.nominal_mass())
    }

    /// Parity atoms for the nitrogen rule: those whose nominal mass and valence have
    /// different parity (N: 14 and 3; also D: 2 and 1; Cu: 63 and 2).
    fn flips_mass_parity(&self) -> bool {
        (u32::from(self.nominal_mass()) + u32::from(self.element.valence)) % 2 == 1
    }

    fn labelled_isotope(&self) -> Option<&'static elements::Isotope> {
        self.mass_number.and_then(|n| self.element.isotope(n))
    }

    fn key(&self) -> (u8, u16) {
        (self.element.atomic_number, self.mass_number.unwrap_or(0))
    }
}

impl PartialEq for Atom {
    fn eq(&self, other: &Atom) -> bool {
        self.key() == other.key()
    }
}
impl Eq for Atom {}
impl PartialOrd for Atom {
    fn partial_cmp(&self, other: &Atom) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}
impl Ord for Atom {
    /// By atomic number, natural composition before explicit isotopes.
    fn cmp(&self, other: &Atom) -> Ordering {
        self.key().cmp(&other.key())
    }
}
impl std::hash::Hash for Atom {
    fn hash<H: std::hash::Hasher>(&self, state: &mut H) {
        self.key().hash(state);
    }
}

impl fmt::Display for Atom {
    /// `C`, `D` for ²H, `[13C]` for other explicit isotopes.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.mass_number {
            None => write!(f, "{}", self.element.symbol),
            Some(2) if self.element.symbol == "H" => write!(f, "D"),
            Some(n) => write!(f, "[{n}{}]", self.element.symbol),
        }
    }
}

/// A molecular formula or ion: atom counts (by element or explicit isotope), charge and
/// the radical-ion notation flag.
#[derive(Clone, Debug, Default, PartialEq, Eq, Hash)]
pub struct Formula {
    atoms: BTreeMap<Atom, u32>,
    charge: i32,
    radical: bool,
}

/// Why a formula could not be parsed, and where (0-based byte offset into the input).
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("{kind}")]
pub struct FormulaError {
    /// What is wrong.
    pub kind: FormulaErrorKind,
    /// 0-based byte offset of the problem in `input`.
    pub offset: usize,
    /// The text that was parsed (kept for caret rendering).
    pub input: String,
}

/// The kinds of formula errors; messages are lower case without a trailing period.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum FormulaErrorKind {
    /// Nothing but whitespace.
    #[error("empty formula")]
    Empty,
    /// A character that cannot start or continue anything here.
    #[error("unexpected {found:?}")]
    UnexpectedChar {
        /// The character found.
        found: char,
    },
    /// A lower-case letter where an element symbol should start.
    #[error("element symbols start with a capital letter, found {found:?}")]
    LowercaseSymbol {
        /// The character found.
        found: char,
        /// A symbol it may have meant.
        suggestion: Option<&'static str>,
    },
    /// Letters that are no element symbol.
    #[error("unknown element symbol {symbol:?}")]
    UnknownElement {
        /// The letters found.
        symbol: String,
        /// The closest known symbol.
        suggestion: Option<&'static str>,
    },
    /// A real element for which quiddity has no isotope data.
    #[error("element {symbol:?} is not in quiddity's element table")]
    UnsupportedElement {
        /// The symbol found.
        symbol: String,
    },
    /// An isotope label naming no natural isotope.
    #[error("no natural isotope of {symbol} has mass number {mass_number}")]
    UnknownIsotope {
        /// Element symbol.
        symbol: String,
        /// The mass number written.
        mass_number: u64,
        /// The natural mass numbers of that element.
        natural: Vec<u16>,
    },
    /// An isotope label that is not `[digits Symbol]`.
    #[error("malformed isotope label: expected [mass number, element symbol, ]")]
    MalformedIsotopeLabel,
    /// A bracket opened and never closed.
    #[error("unclosed {open:?}")]
    UnclosedGroup {
        /// `(` or `[`.
        open: char,
    },
    /// A closing bracket with nothing open.
    #[error("{close:?} closes nothing")]
    UnmatchedClose {
        /// `)` or `]`.
        close: char,
    },
    /// A closing bracket of the wrong kind.
    #[error("{close:?} does not match the open {open:?}")]
    MismatchedClose {
        /// The bracket that is open.
        open: char,
        /// The bracket found.
        close: char,
    },
    /// `()` or `[]`.
    #[error("empty group")]
    EmptyGroup,
    /// Brackets nested deeper than [`MAX_NESTING`].
    #[error("groups nested deeper than {MAX_NESTING} levels")]
    TooDeep,
    /// A count of zero.
    #[error("a count must be at least 1")]
    ZeroCount,
    /// A written count or a multiplied-out total above [`MAX_COUNT`].
    #[error("count exceeds the limit of {MAX_COUNT}")]
    CountTooLarge,
    /// Digits with nothing to multiply.
    #[error("a count must directly follow an element symbol or a closing bracket")]
    DetachedCount,
    /// A dot with no formula part after it.
    #[error("expected a formula part after the adduct dot")]
    MissingPartAfterDot,
    /// Digits after a charge sign, as in `C-2`.
    #[error("unexpected count after the charge sign")]
    CountAfterSign,
    /// `+-` and the like.
    #[error("mixed signs in the charge")]
    MixedSigns,
    /// Something after the charge.
    #[error("the charge must come last")]
    TrailingAfterCharge,
    /// `0+`.
    #[error("a written charge must be at least 1")]
    ZeroCharge,
    /// A charge magnitude above [`MAX_CHARGE`].
    #[error("charge exceeds the limit of {MAX_CHARGE}")]
    ChargeTooLarge,
    /// `^` or charge digits without a sign.
    #[error("expected a charge sign + or -")]
    MissingSign,
}

impl FormulaErrorKind {
    /// A hint for the help line, if there is one.
    pub fn hint(&self) -> Option<String> {
        match self {
            FormulaErrorKind::LowercaseSymbol {
                suggestion: Some(s),
                ..
            }
            | FormulaErrorKind::UnknownElement {
                suggestion: Some(s),
                ..
            } => Some(format!("did you mean {s:?}?")),
            FormulaErrorKind::UnknownIsotope { natural, .. } => Some(format!(
                "natural mass numbers: {}",
                natural
                    .iter()
                    .map(u16::to_string)
                    .collect::<Vec<_>>()
                    .join(", ")
            )),
            FormulaErrorKind::CountAfterSign => Some(
                "counts cannot be negative; write a charge after the formula as 2- or ^2-".into(),
            ),
            FormulaErrorKind::DetachedCount => {
                Some("write counts without spaces (C6H6), and charges as 2+ after a space".into())
            }
            FormulaErrorKind::UnsupportedElement { .. } => Some(format!(
                "supported elements: {}",
                elements::known_symbols().collect::<Vec<_>>().join(" ")
            )),
            _ => None,
        }
    }
}

impl FormulaError {
    /// A diagnostic placed at the error's offset in its input, with the hint as help.
    pub fn to_diagnostic(&self, origin: &str) -> Diagnostic {
        let d =
            Diagnostic::error(origin, self.kind.to_string()).at_offset(&self.input, self.offset);
        match self.kind.hint() {
            Some(h) => d.with_help(h),
            None => d,
        }
    }
}

impl From<FormulaError> for Diagnostic {
    /// Origin `<formula>`; use [`FormulaError::to_diagnostic`] to name a file or field.
    fn from(e: FormulaError) -> Diagnostic {
        e.to_diagnostic("<formula>")
    }
}

/// Why formula arithmetic failed.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
pub enum FormulaArithmeticError {
    /// Subtracting more atoms than there are.
    #[error("cannot remove {removed} {atom} from a formula holding {held}")]
    NotEnoughAtoms {
        /// The atom, as printed (`H`, `[13C]`).
        atom: String,
        /// How many the formula holds.
        held: u32,
        /// How many were to be removed.
        removed: u32,
    },
    /// A count or the charge would exceed its limit.
    #[error("result exceeds the count or charge limit")]
    Overflow,
}

/// The nitrogen rule applied to a formula (common practice; generalised to every atom
/// whose nominal mass and valence differ in parity, N being the usual one).
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
pub struct NitrogenRule {
    /// Nominal mass of the formula.
    pub nominal_mass: u64,
    /// Atoms whose nominal mass and valence differ in parity (N, and also D, Cu).
    pub n_parity_atoms: u32,
    /// What the rule predicts: odd nominal mass iff an odd number of such atoms.
    pub predicts_odd_mass: bool,
    /// Whether the nominal mass has that parity. True for every closed-shell molecule
    /// and its molecular ion M+.; false for even-electron ions ([M+H]+) and neutral
    /// radicals, which is what the rule is used to spot.
    pub holds: bool,
}

/// The SENIOR rules on standard valences (Senior 1951, as restated by Kind & Fiehn 2007,
/// BMC Bioinformatics 8:105, rule 2; `from memory`):
/// (1) the sum of valences is even; (2) it is at least twice the largest valence;
/// (3) it is at least twice the number of atoms minus one (the atoms can form a
/// connected graph).
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
pub struct SeniorCheck {
    /// Σ nᵢ vᵢ over all atoms.
    pub valence_sum: u64,
    /// Largest standard valence present.
    pub max_valence: u32,
    /// Number of atoms.
    pub n_atoms: u64,
    /// Rule 1.
    pub even_valence_sum: bool,
    /// Rule 2.
    pub covers_max_valence: bool,
    /// Rule 3.
    pub connected: bool,
}

impl SeniorCheck {
    /// All three rules hold.
    pub fn passes(&self) -> bool {
        self.even_valence_sum && self.covers_max_valence && self.connected
    }
}

/// The LEWIS check as quiddity implements it (octet rule bookkeeping, after Kind & Fiehn
/// 2007, `from memory`), on the neutral molecule with these atoms (charge ignored, like
/// the SENIOR rules, so the molecular ion M+. of a valid molecule passes and an
/// even-electron ion such as [M+H]+ does not): the molecule has an even number of
/// electrons, so every electron can sit in a bond or lone pair, and DBE ≥ 0, so the atoms
/// at their standard valences have enough bonds to complete their octets (duet for H).
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
pub struct LewisCheck {
    /// Electrons of the neutral molecule (Σ atomic numbers).
    pub electron_count: i64,
    /// Even electron count.
    pub even_electrons: bool,
    /// DBE ≥ 0.
    pub dbe_non_negative: bool,
}

impl LewisCheck {
    /// Both conditions hold.
    pub fn passes(&self) -> bool {
        self.even_electrons && self.dbe_non_negative
    }
}

impl Formula {
    /// The empty neutral formula (the identity of [`Formula::plus`]).
    pub fn new() -> Formula {
        Formula::default()
    }

    /// Parses `src` by the grammar in this module's documentation.
    pub fn parse(src: &str) -> Result<Formula, FormulaError> {
        Parser::new(src).formula()
    }

    /// A formula from element counts (natural isotopes, neutral); `None` when a symbol has
    /// no element data.
    pub fn from_composition(composition: &Composition) -> Option<Formula> {
        let mut f = Formula::new();
        for (symbol, n) in composition.iter() {
            let atom = Atom::from_symbol(symbol)?;
            *f.atoms.entry(atom).or_insert(0) += n;
        }
        Some(f)
    }

    /// `(atom, count)` by atomic number, natural before explicit isotopes.
    pub fn atoms(&self) -> impl Iterator<Item = (Atom, u32)> + '_ {
        self.atoms.iter().map(|(a, n)| (*a, *n))
    }

    /// Count of exactly this atom kind (natural and labelled are different kinds).
    pub fn count(&self, atom: Atom) -> u32 {
        self.atoms.get(&atom).copied().unwrap_or(0)
    }

    /// Atoms of the element `symbol`, every isotope included (D counts as H).
    pub fn element_count(&self, symbol: &str) -> u32 {
        self.atoms
            .iter()
            .filter(|(a, _)| a.symbol() == symbol)
            .map(|(_, n)| *n)
            .sum()
    }

    /// Total number of atoms.
    pub fn n_atoms(&self) -> u64 {
        self.atoms.values().map(|n| u64::from(*n)).sum()
    }

    /// No atoms at all.
    pub fn is_empty(&self) -> bool {
        self.atoms.is_empty()
    }

    /// Charge in elementary charges (0 for a neutral molecule).
    pub fn charge(&self) -> i32 {
        self.charge
    }

    /// Whether the text marked a radical ion (`+.`). Notation only; see
    /// [`Formula::is_odd_electron`] for the electron count.
    pub fn is_radical(&self) -> bool {
        self.radical
    }

    /// The same atoms with another charge (radical mark kept for an ion, dropped for a
    /// neutral formula, which has no radical-ion notation).
    pub fn with_charge(&self, charge: i32) -> Formula {
        Formula {
            charge,
            radical: self.radical && charge != 0,
            atoms: self.atoms.clone(),
        }
    }

    /// The same formula with the radical-ion mark set or cleared (ignored when neutral).
    pub fn with_radical(&self, radical: bool) -> Formula {
        Formula {
            radical: radical && self.charge != 0,
            ..self.clone()
        }
    }

    /// Adds `count` atoms of `atom` in place (building formulas without text, e.g. when
    /// enumerating candidates for a measured mass).
    pub fn add_atom(&mut self, atom: Atom, count: u32) -> Result<(), FormulaArithmeticError> {
        if count == 0 {
            return Ok(());
        }
        let held = u64::from(self.count(atom));
        let total = checked_count(held + u64::from(count))?;
        self.atoms.insert(atom, total);
        Ok(())
    }

    /// The neutral molecule with these atoms.
    pub fn neutral(&self) -> Formula {
        Formula {
            atoms: self.atoms.clone(),
            charge: 0,
            radical: false,
        }
    }

    /// Element counts (isotopes folded into their element, D into H), charge dropped.
    pub fn composition(&self) -> Composition {
        let mut c = Composition::new();
        for (atom, n) in &self.atoms {
            c.add(atom.symbol(), *n);
        }
        c
    }

    /// Sum of two formulas: counts and charges add; the radical marks combine by electron
    /// parity (radical + radical = not radical). `M.plus(H+)` is [M+H]+.
    pub fn plus(&self, other: &Formula) -> Result<Formula, FormulaArithmeticError> {
        let mut atoms = self.atoms.clone();
        for (atom, n) in &other.atoms {
            let slot = atoms.entry(*atom).or_insert(0);
            *slot = checked_count(u64::from(*slot) + u64::from(*n))?;
        }
        let charge = checked_charge(i64::from(self.charge) + i64::from(other.charge))?;
        Ok(Formula {
            atoms,
            charge,
            radical: (self.radical != other.radical) && charge != 0,
        })
    }

    /// Difference of two formulas (`M.minus(H2O)`); fails when `other` holds an atom kind
    /// more often than `self` (labelled and natural atoms are not interchangeable).
    pub fn minus(&self, other: &Formula) -> Result<Formula, FormulaArithmeticError> {
        let mut atoms = self.atoms.clone();
        for (atom, n) in &other.atoms {
            let held = atoms.get(atom).copied().unwrap_or(0);
            if held < *n {
                return Err(FormulaArithmeticError::NotEnoughAtoms {
                    atom: atom.to_string(),
                    held,
                    removed: *n,
                });
            }
            if held == *n {
                atoms.remove(atom);
            } else {
                atoms.insert(*atom, held - n);
            }
        }
        let charge = checked_charge(i64::from(self.charge) - i64::from(other.charge))?;
        Ok(Formula {
            atoms,
            charge,
            radical: (self.radical != other.radical) && charge != 0,
        })
    }

    /// `n` copies (a dimer is `times(2)`); charge multiplies too.
    pub fn times(&self, n: u32) -> Result<Formula, FormulaArithmeticError> {
        if n == 0 {
            return Ok(Formula::new());
        }
        let mut atoms = BTreeMap::new();
        for (atom, count) in &self.atoms {
            atoms.insert(*atom, checked_count(u64::from(*count) * u64::from(n))?);
        }
        Ok(Formula {
            atoms,
            charge: checked_charge(i64::from(self.charge) * i64::from(n))?,
            radical: self.radical && n % 2 == 1,
        })
    }

    /// Sum of the atoms' monoisotopic masses in u (most abundant isotope of each natural
    /// element, the labelled isotope otherwise). Electrons are not subtracted: see
    /// [`Formula::ion_mass`].
    pub fn monoisotopic_mass(&self) -> f64 {
        self.sum_over_atoms(Atom::monoisotopic_mass)
    }

    /// Average (molar) mass in u: abundance-weighted isotope masses of natural elements,
    /// the isotope's mass for labelled atoms. Electrons not subtracted.
    pub fn average_mass(&self) -> f64 {
        self.sum_over_atoms(Atom::average_mass)
    }

    /// Nominal mass: sum of the mass numbers of the most abundant (or labelled) isotopes.
    pub fn nominal_mass(&self) -> u64 {
        self.atoms
            .iter()
            .map(|(a, n)| u64::from(a.nominal_mass()) * u64::from(*n))
            .sum()
    }

    /// Monoisotopic mass of the species with its charge: atoms minus `charge` electron
    /// masses (CODATA 2018 electron mass).
    pub fn ion_mass(&self) -> f64 {
        self.monoisotopic_mass() - f64::from(self.charge) * ELECTRON_MASS
    }

    /// m/z of the monoisotopic ion, `None` for a neutral formula.
    pub fn mz(&self) -> Option<f64> {
        if self.charge == 0 {
            None
        } else {
            Some(self.ion_mass() / f64::from(self.charge.unsigned_abs()))
        }
    }

    /// Rings plus double bonds by the general valence formula
    /// DBE = 1 + ½ Σ nᵢ (vᵢ − 2) with standard valences, charge ignored; an even-electron
    /// ion such as [M+H]+ gets a half-integer, which is reported, not rounded away.
    pub fn dbe(&self) -> f64 {
        let mut twice: i64 = 2;
        for (atom, n) in &self.atoms {
            twice += i64::from(*n) * (i64::from(atom.element().valence) - 2);
        }
        twice as f64 / 2.0
    }

    /// Electrons of the species: Σ atomic numbers − charge.
    pub fn electron_count(&self) -> i64 {
        let protons: i64 = self
            .atoms
            .iter()
            .map(|(a, n)| i64::from(a.element().atomic_number) * i64::from(*n))
            .sum();
        protons - i64::from(self.charge)
    }

    /// Odd number of electrons: a radical (M+. from EI, or a neutral radical).
    pub fn is_odd_electron(&self) -> bool {
        self.electron_count() % 2 != 0
    }

    /// The nitrogen rule for this formula; see [`NitrogenRule`].
    pub fn nitrogen_rule(&self) -> NitrogenRule {
        let n_parity_atoms: u32 = self
            .atoms
            .iter()
            .filter(|(a, _)| a.flips_mass_parity())
            .map(|(_, n)| *n)
            .sum();
        let nominal_mass = self.nominal_mass();
        let predicts_odd_mass = n_parity_atoms % 2 == 1;
        NitrogenRule {
            nominal_mass,
            n_parity_atoms,
            predicts_odd_mass,
            holds: (nominal_mass % 2 == 1) == predicts_odd_mass,
        }
    }

    /// The SENIOR rules on the atoms (charge ignored); see [`SeniorCheck`].
    pub fn senior(&self) -> SeniorCheck {
        let mut valence_sum = 0u64;
        let mut max_valence = 0u32;
        for (atom, n) in &self.atoms {
            let v = u32::from(atom.element().valence);
            valence_sum += u64::from(v) * u64::from(*n);
            max_valence = max_valence.max(v);
        }
        let n_atoms = self.n_atoms();
        SeniorCheck {
            valence_sum,
            max_valence,
            n_atoms,
            even_valence_sum: valence_sum % 2 == 0,
            covers_max_valence: valence_sum >= 2 * u64::from(max_valence),
            connected: valence_sum + 2 >= 2 * n_atoms,
        }
    }

    /// The LEWIS check on the neutral molecule with these atoms; see [`LewisCheck`].
    pub fn lewis(&self) -> LewisCheck {
        let electron_count = self.neutral().electron_count();
        LewisCheck {
            electron_count,
            even_electrons: electron_count % 2 == 0,
            dbe_non_negative: self.dbe() >= 0.0,
        }
    }

    fn sum_over_atoms(&self, mass: fn(&Atom) -> f64) -> f64 {
        self.atoms
            .iter()
            .map(|(a, n)| mass(a) * f64::from(*n))
            .sum()
    }
}

fn checked_count(n: u64) -> Result<u32, FormulaArithmeticError> {
    if n > MAX_COUNT {
        return Err(FormulaArithmeticError::Overflow);
    }
    u32::try_from(n).map_err(|_| FormulaArithmeticError::Overflow)
}

fn checked_charge(z: i64) -> Result<i32, FormulaArithmeticError> {
    if z.unsigned_abs() > u64::from(MAX_CHARGE) {
        return Err(FormulaArithmeticError::Overflow);
    }
    i32::try_from(z).map_err(|_| FormulaArithmeticError::Overflow)
}

impl fmt::Display for Formula {
    /// Hill order: C then H (with their isotopes, D after H) then the rest alphabetically;
    /// without carbon, everything alphabetically. Within an element the natural atoms come
    /// first, then explicit isotopes by mass number. Charge last: `+`, `2-` as `^2-`, and
    /// `.` for a radical mark. [`Formula::parse`] reads it back to an equal formula.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let has_carbon = self.atoms.keys().any(|a| a.symbol() == "C");
        let rank = |a: &Atom| -> (u8, &'static str, u16) {
            let s = a.symbol();
            let group = match (has_carbon, s) {
                (true, "C") => 0,
                (true, "H") => 1,
                _ => 2,
            };
            (group, s, a.mass_number.unwrap_or(0))
        };
        let mut ordered: Vec<(&Atom, &u32)> = self.atoms.iter().collect();
        ordered.sort_by_key(|(a, _)| rank(a));
        for (atom, n) in ordered {
            if *n == 1 {
                write!(f, "{atom}")?;
            } else {
                write!(f, "{atom}{n}")?;
            }
        }
        let sign = if self.charge < 0 { '-' } else { '+' };
        match self.charge.unsigned_abs() {
            0 => {}
            1 => write!(f, "{sign}")?,
            z => write!(f, "^{z}{sign}")?,
        }
        if self.radical && self.charge != 0 {
            write!(f, ".")?;
        }
        Ok(())
    }
}

impl serde::Serialize for Formula {
    /// As its Hill-order text, which [`Formula::parse`] reads back.
    fn serialize<S: serde::Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.collect_str(self)
    }
}

impl std::str::FromStr for Formula {
    type Err = FormulaError;
    fn from_str(s: &str) -> Result<Formula, FormulaError> {
        Formula::parse(s)
    }
}

type Counts = BTreeMap<Atom, u64>;

/// Recursive-descent parser over the grammar in the module documentation; positions are
/// byte offsets into `src`.
struct Parser<'a> {
    src: &'a str,
    pos: usize,
}

fn is_dot(c: char) -> bool {
    matches!(c, '.' | '·' | '•')
}

impl<'a> Parser<'a> {
    fn new(src: &'a str) -> Parser<'a> {
        Parser { src, pos: 0 }
    }

    fn error(&self, kind: FormulaErrorKind, offset: usize) -> FormulaError {
        FormulaError {
            kind,
            offset,
            input: self.src.to_owned(),
        }
    }

    fn peek(&self) -> Option<char> {
        self.src[self.pos..].chars().next()
    }

    fn peek_at(&self, offset: usize) -> Option<char> {
        self.src.get(offset..).and_then(|s| s.chars().next())
    }

    fn bump(&mut self) -> Option<char> {
        let c = self.peek()?;
        self.pos += c.len_utf8();
        Some(c)
    }

    fn skip_ws(&mut self) {
        while self.peek().is_some_and(char::is_whitespace) {
            self.bump();
        }
    }

    // formula := ws part (ws dot ws part)* ws charge? ws EOF
    fn formula(mut self) -> Result<Formula, FormulaError> {
        self.check_brackets()?;
        self.skip_ws();
        if self.peek().is_none() {
            return Err(self.error(FormulaErrorKind::Empty, 0));
        }
        let mut total = self.part()?;
        loop {
            self.skip_ws();
            match self.peek() {
                Some(c) if is_dot(c) => {
                    let dot_at = self.pos;
                    self.bump();
                    self.skip_ws();
                    if self
                        .peek()
                        .is_none_or(|c| !(c.is_ascii_alphanumeric() || c == '(' || c == '['))
                    {
                        return Err(self.error(FormulaErrorKind::MissingPartAfterDot, dot_at));
                    }
                    let part = self.part()?;
                    self.add_counts(&mut total, &part, dot_at)?;
                }
                _ => break,
            }
        }
        self.skip_ws();
        let (charge, radical) = self.charge()?;
        self.skip_ws();
        if let Some(c) = self.peek() {
            return Err(self.error(FormulaErrorKind::UnexpectedChar { found: c }, self.pos));
        }
        let mut atoms = BTreeMap::new();
        for (atom, n) in total {
            // Bounded by add_counts / multiply, so the conversion cannot fail.
            let n = u32::try_from(n).map_err(|_| self.error(FormulaErrorKind::CountTooLarge, 0))?;
            atoms.insert(atom, n);
        }
        Ok(Formula {
            atoms,
            charge,
            radical,
        })
    }

    /// Bracket balance first, so an unclosed bracket is reported where it opens rather
    /// than as whatever confuses the parser later.
    fn check_brackets(&self) -> Result<(), FormulaError> {
        let mut stack: Vec<(char, usize)> = Vec::new();
        for (i, c) in self.src.char_indices() {
            match c {
                '(' | '[' => {
                    stack.push((c, i));
                    if stack.len() > MAX_NESTING {
                        return Err(self.error(FormulaErrorKind::TooDeep, i));
                    }
                }
                ')' | ']' => match stack.pop() {
                    None => {
                        return Err(self.error(FormulaErrorKind::UnmatchedClose { close: c }, i))
                    }
                    Some((open, _)) if (open == '(') != (c == ')') => {
                        return Err(
                            self.error(FormulaErrorKind::MismatchedClose { open, close: c }, i)
                        )
                    }
                    Some(_) => {}
                },
                _ => {}
            }
        }
        match stack.pop() {
            Some((open, at)) => Err(self.error(FormulaErrorKind::UnclosedGroup { open }, at)),
            None => Ok(()),
        }
    }

    // part := count? ws sequence
    fn part(&mut self) -> Result<Counts, FormulaError> {
        let start = self.pos;
        let multiplier = if self.peek().is_some_and(|c| c.is_ascii_digit()) {
            self.count()?
        } else {
            1
        };
        self.skip_ws();
        let mut counts = self.sequence(0)?;
        if counts.is_empty() {
            return Err(self.expected_unit_error());
        }
        self.multiply(&mut counts, multiplier, start)?;
        Ok(counts)
    }

    // sequence := unit (ws unit)*
    fn sequence(&mut self, depth: usize) -> Result<Counts, FormulaError> {
        let mut counts = Counts::new();
        loop {
            self.skip_ws();
            match self.peek() {
                Some(c) if c.is_ascii_uppercase() || c == '(' || c == '[' => {
                    let at = self.pos;
                    let unit = self.unit(depth)?;
                    self.add_counts(&mut counts, &unit, at)?;
                }
                Some(c) if c.is_ascii_lowercase() => {
                    let upper = c.to_ascii_uppercase().to_string();
                    let suggestion = {
                        // "cl" meant "Cl": offer the capitalised two-letter symbol first.
                        let next = self.peek_at(self.pos + 1).filter(char::is_ascii_lowercase);
                        let two = next.map(|n| format!("{upper}{n}"));
                        two.and_then(|t| elements::known_symbols().find(|s| *s == t))
                            .or_else(|| elements::known_symbols().find(|s| *s == upper))
                    };
                    return Err(self.error(
                        FormulaErrorKind::LowercaseSymbol {
                            found: c,
                            suggestion,
                        },
                        self.pos,
                    ));
                }
                Some(c) if c.is_ascii_digit() => {
                    if self.digits_then_sign(self.pos) {
                        return Ok(counts); // a separated charge such as "C6H6 2+"
                    }
                    return Err(self.error(FormulaErrorKind::DetachedCount, self.pos));
                }
                _ => return Ok(counts),
            }
        }
    }

    /// True when digits at `at` are followed (after optional whitespace) by a sign.
    fn digits_then_sign(&self, at: usize) -> bool {
        let rest = &self.src[at..];
        let after_digits = rest.trim_start_matches(|c: char| c.is_ascii_digit());
        matches!(after_digits.trim_start().chars().next(), Some('+' | '-'))
    }

    fn expected_unit_error(&self) -> FormulaError {
        match self.peek() {
            None => self.error(FormulaErrorKind::Empty, self.pos),
            Some(c) if c.is_ascii_digit() => self.error(FormulaErrorKind::DetachedCount, self.pos),
            Some(c) => self.error(FormulaErrorKind::UnexpectedChar { found: c }, self.pos),
        }
    }

    // unit := (atom | group) count?
    fn unit(&mut self, depth: usize) -> Result<Counts, FormulaError> {
        let mut counts = match self.peek() {
            Some('(') => self.group(depth, ')')?,
            Some('[')
                if self
                    .peek_at(self.pos + 1)
                    .is_some_and(|c| c.is_ascii_digit()) =>
            {
                let atom = self.label()?;
                Counts::from([(atom, 1)])
            }
            Some('[') => self.group(depth, ']')?,
            _ => {
                let atom = self.symbol()?;
                Counts::from([(atom, 1)])
            }
        };
        if self.peek().is_some_and(|c| c.is_ascii_digit()) {
            let multiplier_at = self.pos;
            let n = self.count()?;
            self.multiply(&mut counts, n, multiplier_at)?;
        }
        Ok(counts)
    }

    // group := '(' ws sequence ws ')' | '[' ws sequence ws ']'
    fn group(&mut self, depth: usize, close: char) -> Result<Counts, FormulaError> {
        let open_at = self.pos;
        let open = self.bump().unwrap_or(' ');
        if depth + 1 > MAX_NESTING {
            return Err(self.error(FormulaErrorKind::TooDeep, open_at));
        }
        let counts = self.sequence(depth + 1)?;
        self.skip_ws();
        match self.peek() {
            Some(c) if c == close => {
                if counts.is_empty() {
                    return Err(self.error(FormulaErrorKind::EmptyGroup, open_at));
                }
                self.bump();
                Ok(counts)
            }
            None => Err(self.error(FormulaErrorKind::UnclosedGroup { open }, open_at)),
            Some(')' | ']') => {
                let c = self.peek().unwrap_or(close);
                Err(self.error(
                    FormulaErrorKind::MismatchedClose { open, close: c },
                    self.pos,
                ))
            }
            Some(_) if counts.is_empty() => Err(self.expected_unit_error()),
            Some(c) => Err(self.error(FormulaErrorKind::UnexpectedChar { found: c }, self.pos)),
        }
    }

    // label := '[' digits symbol ']'
    fn label(&mut self) -> Result<Atom, FormulaError> {
        let open_at = self.pos;
        self.bump();
        let digits_at = self.pos;
        let mass_number = self.raw_digits();
        let symbol_at = self.pos;
        let atom = self.symbol()?;
        if self.peek() != Some(']') {
            return Err(self.error(FormulaErrorKind::MalformedIsotopeLabel, self.pos));
        }
        self.bump();
        let element = atom.element();
        // "[2D]" or "[13D]": D already names an isotope.
        if atom.mass_number().is_some() {
            return Err(self.error(FormulaErrorKind::MalformedIsotopeLabel, symbol_at));
        }
        let found = mass_number
            .and_then(|n| u16::try_from(n).ok())
            .and_then(|n| Atom::isotope(element, n));
        match found {
            Some(a) => Ok(a),
            None => Err(self.error(
                FormulaErrorKind::UnknownIsotope {
                    symbol: element.symbol.to_owned(),
                    mass_number: mass_number.unwrap_or(u64::MAX),
                    natural: element.isotopes.iter().map(|i| i.mass_number).collect(),
                },
                if mass_number.is_some() {
                    digits_at
                } else {
                    open_at
                },
            )),
        }
    }

    // symbol := Upper Lower?
    fn symbol(&mut self) -> Result<Atom, FormulaError> {
        let at = self.pos;
        let first = match self.peek() {
            Some(c) if c.is_ascii_uppercase() => c,
            Some(c) => return Err(self.error(FormulaErrorKind::UnexpectedChar { found: c }, at)),
            None => return Err(self.error(FormulaErrorKind::Empty, at)),
        };
        self.bump();
        let mut symbol = first.to_string();
        if let Some(c) = self.peek().filter(char::is_ascii_lowercase) {
            symbol.push(c);
            self.bump();
        }
        if let Some(atom) = Atom::from_symbol(&symbol) {
            return Ok(atom);
        }
        if ALL_SYMBOLS.contains(&symbol.as_str()) {
            return Err(self.error(FormulaErrorKind::UnsupportedElement { symbol }, at));
        }
        let suggestion = closest_match(&symbol, elements::known_symbols());
        Err(self.error(FormulaErrorKind::UnknownElement { symbol, suggestion }, at))
    }

    /// Digits as a number, saturating far above any limit; `None` when there are none.
    fn raw_digits(&mut self) -> Option<u64> {
        let mut value: Option<u64> = None;
        while let Some(d) = self.peek().and_then(|c| c.to_digit(10)) {
            value = Some(
                value
                    .unwrap_or(0)
                    .saturating_mul(10)
                    .saturating_add(u64::from(d)),
            );
            self.bump();
        }
        value
    }

    // count := digits, 1 ..= MAX_COUNT
    fn count(&mut self) -> Result<u64, FormulaError> {
        let at = self.pos;
        let n = self.raw_digits().unwrap_or(0);
        if n == 0 {
            return Err(self.error(FormulaErrorKind::ZeroCount, at));
        }
        if n > MAX_COUNT {
            return Err(self.error(FormulaErrorKind::CountTooLarge, at));
        }
        Ok(n)
    }

    // charge := ('^' ws)? digits? ws sign+ radical?
    fn charge(&mut self) -> Result<(i32, bool), FormulaError> {
        let start = self.pos;
        let caret = self.peek() == Some('^');
        if caret {
            self.bump();
            self.skip_ws();
        }
        let digits_at = self.pos;
        let magnitude = self.raw_digits();
        self.skip_ws();
        let sign_at = self.pos;
        let mut sign: Option<char> = None;
        let mut n_signs: u64 = 0;
        while let Some(c) = self.peek().filter(|c| *c == '+' || *c == '-') {
            if sign.is_some_and(|s| s != c) {
                return Err(self.error(FormulaErrorKind::MixedSigns, self.pos));
            }
            sign = Some(c);
            n_signs += 1;
            self.bump();
        }
        let Some(sign) = sign else {
            if caret || magnitude.is_some() {
                return Err(self.error(FormulaErrorKind::MissingSign, self.pos));
            }
            return Ok((0, false));
        };
        let magnitude = match magnitude {
            Some(_) if n_signs > 1 => {
                return Err(self.error(FormulaErrorKind::MixedSigns, sign_at));
            }
            Some(0) => return Err(self.error(FormulaErrorKind::ZeroCharge, digits_at)),
            Some(m) => m,
            None => n_signs,
        };
        if magnitude > u64::from(MAX_CHARGE) {
            return Err(self.error(FormulaErrorKind::ChargeTooLarge, start.max(digits_at)));
        }
        let radical = match self.peek() {
            Some('.' | '•') => {
                self.bump();
                true
            }
            _ => false,
        };
        if self.peek().is_some_and(|c| c.is_ascii_digit()) {
            return Err(self.error(FormulaErrorKind::CountAfterSign, self.pos));
        }
        // magnitude ≤ MAX_CHARGE, so it fits.
        let magnitude = i32::try_from(magnitude).unwrap_or(i32::MAX);
        let charge = if sign == '-' { -magnitude } else { magnitude };
        Ok((charge, radical))
    }

    fn add_counts(&self, into: &mut Counts, from: &Counts, at: usize) -> Result<(), FormulaError> {
        for (atom, n) in from {
            let slot = into.entry(*atom).or_insert(0);
            *slot += n;
            if *slot > MAX_COUNT {
                return Err(self.error(FormulaErrorKind::CountTooLarge, at));
            }
        }
        Ok(())
    }

    fn multiply(&self, counts: &mut Counts, by: u64, at: usize) -> Result<(), FormulaError> {
        for n in counts.values_mut() {
            // Both factors are at most MAX_COUNT, so the product fits in u64.
            *n *= by;
            if *n > MAX_COUNT {
                return Err(self.error(FormulaErrorKind::CountTooLarge, at));
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn f(s: &str) -> Formula {
        match Formula::parse(s) {
            Ok(f) => f,
            Err(e) => panic!("{s:?}: {e} at {}", e.offset),
        }
    }

    fn err(s: &str) -> (FormulaErrorKind, usize) {
        match Formula::parse(s) {
            Ok(f) => panic!("{s:?} parsed as {f}"),
            Err(e) => (e.kind, e.offset),
        }
    }

    #[test]
    fn parses_free_order_nested_groups_and_prints_hill_order() {
        assert_eq!(f("CH3(CH2)4OH").to_string(), "C5H12O");
        assert_eq!(f("OHC2H5").to_string(), "C2H6O");
        assert_eq!(f("[Cu(NH3)4]SO4").to_string(), "CuH12N4O4S");
        assert_eq!(f(" C6 H6 ").to_string(), "C6H6");
        assert_eq!(f("(C(CH3)2)2").to_string(), "C6H12");
    }

    #[test]
    fn adduct_dots_and_leading_multipliers() {
        assert_eq!(f("C2H6O·H2O").to_string(), "C2H8O2");
        assert_eq!(f("C2H6O.H2O").to_string(), "C2H8O2");
        assert_eq!(f("CuSO4·5H2O").to_string(), "CuH10O9S");
        assert_eq!(f("CuSO4 . 5 H2O").to_string(), "CuH10O9S");
    }

    #[test]
    fn isotopes_and_deuterium() {
        let labelled = f("[13C]CH4O");
        assert_eq!(labelled.to_string(), "C[13C]H4O");
        assert_eq!(labelled.element_count("C"), 2);
        assert_eq!(f("CD3OD").to_string(), "CD4O");
        assert_eq!(f("CH3[2H]").to_string(), "CH3D");
        assert_eq!(f("CD4").composition().to_string(), "CH4");
    }

    #[test]
    fn charges_and_radical_ions() {
        assert_eq!(f("C8H11N4O2+").charge(), 1);
        let radical = f("C6H6+.");
        assert!(radical.is_radical());
        assert_eq!(radical.to_string(), "C6H6+.");
        assert_eq!(f("SO4 2-").charge(), -2);
        assert_eq!(f("SO4^2-").to_string(), "O4S^2-");
        assert_eq!(f("C6H6++").charge(), 2);
        assert_eq!(f("H2+").to_string(), "H2+");
        assert_eq!(f("Cl-").charge(), -1);
        assert_eq!(f("C2H5O-.").to_string(), "C2H5O-.");
    }

    #[test]
    fn bad_inputs_name_the_place_and_the_problem() {
        let table: &[(&str, FormulaErrorKind, usize)] = &[
            ("", FormulaErrorKind::Empty, 0),
            (
                "C6H1x",
                FormulaErrorKind::LowercaseSymbol {
                    found: 'x',
                    suggestion: None,
                },
                4,
            ),
            ("C6H(12", FormulaErrorKind::UnclosedGroup { open: '(' }, 3),
            ("C-2", FormulaErrorKind::CountAfterSign, 2),
            ("C1000000000000", FormulaErrorKind::CountTooLarge, 1),
            ("(C1000)1000000", FormulaErrorKind::CountTooLarge, 7),
            ("C0", FormulaErrorKind::ZeroCount, 1),
            ("C6H6)", FormulaErrorKind::UnmatchedClose { close: ')' }, 4),
            (
                "(C6H6]",
                FormulaErrorKind::MismatchedClose {
                    open: '(',
                    close: ']',
                },
                5,
            ),
            ("C()", FormulaErrorKind::EmptyGroup, 1),
            ("C2H6O·", FormulaErrorKind::MissingPartAfterDot, 5),
            ("C+-", FormulaErrorKind::MixedSigns, 2),
            ("C 6", FormulaErrorKind::DetachedCount, 2),
            ("C6H6^2", FormulaErrorKind::MissingSign, 6),
            ("C+ H", FormulaErrorKind::UnexpectedChar { found: 'H' }, 3),
            (
                "Au",
                FormulaErrorKind::UnsupportedElement {
                    symbol: "Au".into(),
                },
                0,
            ),
            (
                "[14C]H4",
                FormulaErrorKind::UnknownIsotope {
                    symbol: "C".into(),
                    mass_number: 14,
                    natural: vec![12, 13],
                },
                1,
            ),
        ];
        for (input, kind, offset) in table {
            assert_eq!(&err(input), &(kind.clone(), *offset), "{input:?}");
            // Messages are lower case without a trailing period (diag convention).
            let message = kind.to_string();
            assert!(!message.starts_with(char::is_uppercase), "{message}");
            assert!(!message.ends_with('.'), "{message}");
        }
    }

    #[test]
    fn unknown_symbols_get_a_did_you_mean() {
        let (kind, offset) = err("CH3Cx");
        assert_eq!(offset, 3);
        assert!(matches!(
            kind,
            FormulaErrorKind::UnknownElement { ref symbol, suggestion: Some(_) } if symbol == "Cx"
        ));
        let (kind, _) = err("CH3cl");
        assert_eq!(
            kind,
            FormulaErrorKind::LowercaseSymbol {
                found: 'c',
                suggestion: Some("Cl")
            }
        );
    }

    #[test]
    fn errors_become_diagnostics_with_a_caret() {
        let e = Formula::parse("C6H1x").expect_err("must fail");
        let d = e.to_diagnostic("<argument>");
        assert_eq!(
            d.to_string(),
            "error: <argument>:1:5: element symbols start with a capital letter, found 'x'"
        );
        assert!(d.render().contains("C6H1x\n  |     ^"));
    }

    #[test]
    fn caffeine_masses() {
        // Caffeine C8H10N4O2, monoisotopic 194.080376 (common practice; same value in the
        // pyteomics reference table of tests/reference).
        let caffeine = f("C8H10N4O2");
        assert!((caffeine.monoisotopic_mass() - 194.080_376).abs() < 1e-5);
        assert_eq!(caffeine.nominal_mass(), 194);
        assert_eq!(caffeine.dbe(), 6.0);
        assert!((caffeine.average_mass() - 194.19).abs() < 0.01);
    }

    #[test]
    fn ion_mz_subtracts_electrons() {
        let protonated = f("C8H11N4O2+");
        let mz = protonated.mz().expect("charged");
        // [M+H]+ of caffeine = M + 1.007276 (proton mass, common practice).
        assert!((mz - (194.080_376 + 1.007_276)).abs() < 1e-5);
        assert_eq!(protonated.dbe(), 5.5);
        assert!(f("C8H10N4O2").mz().is_none());
        let doubly = f("C8H12N4O2^2+");
        assert!(
            (doubly.mz().expect("charged") - (194.080_376 + 2.0 * 1.007_276) / 2.0).abs() < 1e-5
        );
    }

    #[test]
    fn arithmetic_builds_adducts_and_losses() {
        let m = f("C8H10N4O2");
        let mh = m.plus(&f("H+")).expect("fits");
        assert_eq!(mh, f("C8H11N4O2+"));
        let loss = f("C2H6O").minus(&f("H2O")).expect("fits");
        assert_eq!(loss.to_string(), "C2H4");
        let mhh = m.minus(&f("H+")).expect("fits");
        assert_eq!(mhh.charge(), -1);
        assert_eq!(
            f("CH4").minus(&f("O")),
            Err(FormulaArithmeticError::NotEnoughAtoms {
                atom: "O".into(),
                held: 0,
                removed: 1
            })
        );
        assert_eq!(m.times(2).expect("fits").to_string(), "C16H20N8O4");
    }

    #[test]
    fn building_without_text_matches_parsing() {
        let mut built = Formula::new();
        let carbon = Atom::from_symbol("C").expect("C");
        let hydrogen = Atom::from_symbol("H").expect("H");
        built.add_atom(carbon, 2).expect("fits");
        built.add_atom(hydrogen, 6).expect("fits");
        built.add_atom(carbon, 0).expect("fits");
        assert_eq!(built, f("C2H6"));
        assert_eq!(
            built.add_atom(carbon, u32::MAX),
            Err(FormulaArithmeticError::Overflow)
        );
        let from_counts = Formula::from_composition(&Composition::from_pairs([("C", 2), ("H", 6)]));
        assert_eq!(from_counts, Some(f("C2H6")));
        assert_eq!(
            serde_json::to_string(&f("OHC2H5")).expect("json"),
            "\"C2H6O\""
        );
    }

    #[test]
    fn radical_marks_vanish_on_neutral_results() {
        let radical_cation = f("C6H6+.");
        assert!(!radical_cation.with_charge(0).is_radical());
        let neutral = radical_cation.minus(&f("H+")).expect("fits");
        assert_eq!(neutral.charge(), 0);
        assert_eq!(Formula::parse(&neutral.to_string()), Ok(neutral));
    }

    #[test]
    fn nitrogen_rule_senior_and_lewis() {
        // common practice: pyridine C5H5N has odd nominal mass 79 and one N.
        let pyridine = f("C5H5N").nitrogen_rule();
        assert_eq!(pyridine.nominal_mass, 79);
        assert!(pyridine.holds);
        // An even-electron ion breaks the rule by design.
        assert!(!f("C5H6N+").nitrogen_rule().holds);
        // CH3 radical: fails SENIOR rule 1 and LEWIS parity.
        assert!(!f("CH3").senior().passes());
        assert!(!f("CH3").lewis().passes());
        assert!(f("C2H6O").senior().passes());
        assert!(f("C2H6O").lewis().passes());
        // H6C would need DBE −1: fails LEWIS and SENIOR rule 3.
        assert!(!f("CH6").lewis().passes());
        assert!(!f("CH6").senior().connected);
        // Both checks judge the neutral molecule: benzene's M+. passes, an even-electron
        // [M+H]+ formula does not.
        assert!(f("C6H6+.").lewis().passes());
        assert!(f("C6H6+.").senior().passes());
        assert!(!f("C5H6N+").lewis().passes());
        assert!(!f("C5H6N+").senior().passes());
        // SENIOR rule 2: a lone carbon cannot satisfy its four valences.
        assert!(!f("C").senior().covers_max_valence);
        assert!(f("C6H6+.").is_odd_electron());
    }
}
