//! Salts and hydrates: which part of a stated formula is the organic compound to deduce,
//! and how the rest (counter-ion, water of crystallisation) is accounted for.
//!
//! A hydrochloride R-NH3+ Cl- is the free base plus HCl: the engine deduces the free base
//! (its atoms and DBE) with the salt-form group `amine_*_salt` in place of the amine, whose
//! bands are the salt's. A sodium carboxylate is the free acid minus H plus Na: the engine
//! deduces the free acid with `carboxylate_salt`. Water of crystallisation is taken off
//! and its bands (catalogue `hydrate_bands`) may explain observed bands.
//!
//! How a formula is read (each reading is stated in the outcome, never silently):
//! - written parts (`C10H15N·HCl`, `C7H5NaO2·3H2O`, `(C9H13N)2·H2SO4`): the first part
//!   holding carbon is the organic part; H2O parts are water; a part without carbon made
//!   of H and non-metals is an acid (its H are the protons it can give); others are kept
//!   in the atom balance only;
//! - a metal (alkali, alkaline earth, Zn) inside the organic part: a metal salt, each
//!   metal atom replacing as many acidic H as its charge (organometallic compounds are not
//!   expected in this work: common practice);
//! - N together with Cl, Br or I and no written part: both the covalent reading and the
//!   hydrohalide reading(s) are solved, the better supported one is shown and the other
//!   named; when the covalent reading is impossible (negative or half-integer DBE) only
//!   the hydrohalide reading is solved.

use super::constraints::ionic::IonicSites;
use super::{solve_stated_within, Outcome, SolveOptions};
use crate::budget::{Meter, Stage};
use crate::case::{Case, StatedFormula};
use crate::chem::{Composition, Formula};
use crate::rules::{Catalogue, Group, Ionic};
use serde::Serialize;
use std::borrow::Cow;

/// Metals read as counter-ions, with their usual charge (common practice).
const METALS: [(&str, u32); 10] = [
    ("Li", 1),
    ("Na", 1),
    ("K", 1),
    ("Rb", 1),
    ("Cs", 1),
    ("Mg", 2),
    ("Ca", 2),
    ("Sr", 2),
    ("Ba", 2),
    ("Zn", 2),
];

/// Halogens that form hydrohalide salts of amines (HF salts are rare: common practice).
const HYDROHALIDE_HALOGENS: [&str; 3] = ["Cl", "Br", "I"];

/// How a reading came about.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ReadingKind {
    /// The formula's written parts (`·`).
    WrittenParts,
    /// A metal inside the organic part.
    Metal,
    /// N with a halogen and no written part: the halide taken as a hydrohalide.
    PossibleHydrohalide,
    /// As above, and the covalent reading is impossible.
    RequiredHydrohalide,
    /// N with a halogen, read as one covalent molecule (the alternative to a hydrohalide).
    Covalent,
}

/// One counter-ion or other accounted part.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct CounterIon {
    /// Formula of one unit (Hill order).
    pub formula: String,
    /// Units per formula unit of the salt.
    pub count: u32,
    /// What the part is to the salt.
    pub role: PartRole,
}

/// What an accounted part is to a salt (serialised as the lower-case word).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum PartRole {
    /// A counter-ion from an acid (HCl, H2SO4).
    Acid,
    /// A metal cation read out of the organic part.
    Metal,
    /// Water of crystallisation.
    Water,
    /// Anything else, kept in the atom balance only.
    Other,
}

impl PartRole {
    /// The word the statements and the JSON use.
    pub fn word(self) -> &'static str {
        match self {
            PartRole::Acid => "acid",
            PartRole::Metal => "metal",
            PartRole::Water => "water",
            PartRole::Other => "other",
        }
    }
}

/// One way of reading a stated formula.
#[derive(Clone, Debug, PartialEq)]
pub struct Reading {
    /// How it came about.
    pub kind: ReadingKind,
    /// One molecule of the organic part (free base or free acid).
    pub organic: Composition,
    /// Molecules of the organic part per formula unit.
    pub organic_count: u32,
    /// Counter-ions, water and other parts.
    pub parts: Vec<CounterIon>,
    /// Water of crystallisation per formula unit.
    pub water: u32,
    /// Salt-form groups the organic part must hold.
    pub sites: IonicSites,
    /// Why the formula is read this way, in words.
    pub why: String,
}

/// What the outcome says about a salt or hydrate formula.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SaltOutcome {
    /// The stated formula, Hill order.
    pub stated_formula: String,
    /// Its DBE by the general formula (salts and hydrates count the counter-ion's atoms).
    pub stated_dbe: Option<f64>,
    /// How the shown result reads the formula.
    pub reading: ReadingKind,
    /// The organic part deduced (free base or free acid), Hill order.
    pub organic_formula: String,
    /// Its DBE.
    pub organic_dbe: Option<f64>,
    /// Molecules of the organic part per formula unit.
    pub organic_count: u32,
    /// Counter-ions, water and other parts.
    pub parts: Vec<CounterIon>,
    /// Why the formula is read this way, and the DBE bookkeeping.
    pub statements: Vec<String>,
    /// Salt or free base, hydrate or not: what the bands say.
    pub checks: Vec<String>,
    /// The other readings solved, with what they gave.
    pub alternatives: Vec<AlternativeReading>,
}

/// A reading solved and not shown.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct AlternativeReading {
    /// How it reads the formula.
    pub reading: ReadingKind,
    /// Its organic part.
    pub organic_formula: String,
    /// Consistent combinations it gave.
    pub n_consistent: usize,
    /// Its best score, when it has a candidate.
    pub best_score: Option<f64>,
    /// Why it was read, in words.
    pub why: String,
}

fn metal_charge(symbol: &str) -> Option<u32> {
    METALS.iter().find(|(s, _)| *s == symbol).map(|(_, v)| *v)
}

fn minus(c: &Composition, symbol: &str, n: u32) -> Option<Composition> {
    let have = c.count(symbol);
    if have < n {
        return None;
    }
    let mut out = Composition::new();
    for (s, k) in c.iter() {
        out.add(s, if s == symbol { k - n } else { k });
    }
    Some(out)
}

fn is_water(c: &Composition) -> bool {
    c.n_atoms() == 3 && c.count("H") == 2 && c.count("O") == 1
}

/// True when a part without carbon is an acid: H and non-metals only, at least one H.
fn is_acid(c: &Composition) -> bool {
    c.count("H") > 0 && c.count("C") == 0 && c.iter().all(|(s, _)| metal_charge(s).is_none())
}

fn whole_dbe(c: &Composition) -> bool {
    c.dbe().is_some_and(|d| d >= 0.0 && d.fract() == 0.0)
}

/// The readings of the case's formula; empty when it is one plain neutral molecule with
/// nothing to read (the ordinary solve then applies unchanged).
pub fn readings(case: &Case) -> Vec<Reading> {
    let Some(stated) = &case.formula else {
        return Vec::new();
    };
    read_formula(stated)
}

fn read_formula(stated: &StatedFormula) -> Vec<Reading> {
    if stated.parts.is_empty() {
        return Vec::new();
    }
    let SortedParts {
        organic,
        mut parts,
        water,
        acids,
        extra_organic,
    } = SortedParts::of(stated);
    let Some(organic) = organic else {
        return Vec::new();
    };
    let m = organic.count;
    let written = stated.parts.len() > 1;
    let mut why: Vec<String> = Vec::new();
    if written {
        why.push(format!(
            "the formula is written in parts; the organic part is {}{}",
            organic.text,
            if m > 1 {
                format!(" ({m} molecules per formula unit)")
            } else {
                String::new()
            }
        ));
    }
    let metals = MetalSalt::free_acid(organic.composition, m);
    // Each metal goes before the parts already listed, the last one read first.
    for ion in metals.ions {
        parts.insert(0, ion);
    }
    why.extend(metals.why);
    let comp = metals.organic;
    let cation = acids.cation_sites(comp.count("N"), m, extra_organic, &mut why);
    if water > 0 {
        why.push(format!(
            "{water} H2O per formula unit is water of crystallisation: taken off the organic \
             part, its bands may explain observed bands"
        ));
    }
    if !written && !metals.found {
        return hydrohalide_readings(&comp);
    }
    let kind = if metals.found {
        ReadingKind::Metal
    } else {
        ReadingKind::WrittenParts
    };
    vec![Reading {
        kind,
        organic: comp,
        organic_count: m,
        parts,
        water,
        sites: IonicSites {
            cation,
            anion: (metals.anion_sites, metals.anion_sites),
        },
        why: why.join("; "),
    }]
}

/// The first part holding carbon: the organic compound to deduce.
struct OrganicPart {
    /// One molecule of it.
    composition: Composition,
    /// Molecules per formula unit.
    count: u32,
    /// As written.
    text: String,
}

/// The acid parts of a formula.
#[derive(Default)]
struct Acids {
    /// Acid units per formula unit.
    units: u32,
    /// Protons they can give in all.
    protons: u32,
}

impl Acids {
    /// How many basic nitrogens the acids protonate (lowest, highest), saying why in
    /// `why`; a second organic part may be an organic acid paired with the base.
    fn cation_sites(
        &self,
        n_nitrogen: u32,
        m: u32,
        extra_organic: bool,
        why: &mut Vec<String>,
    ) -> (u32, u32) {
        if self.units > 0 {
            // Each acid gives at least one proton; no more than its H or the bases' N.
            let lo = self.units.div_ceil(m);
            let hi = (self.protons.min(m * n_nitrogen) / m).max(lo);
            why.push(format!(
                "the acid part(s) protonate {} basic nitrogen(s) of the organic part, the amine taking the salt form",
                if lo == hi {
                    lo.to_string()
                } else {
                    format!("{lo} to {hi}")
                }
            ));
            (lo, hi)
        } else if extra_organic && n_nitrogen > 0 {
            why.push(
                "a second organic part is kept in the atom balance, not deduced; it may be an \
                 organic acid paired with the base, so salt forms of the amine are admitted"
                    .to_owned(),
            );
            (0, n_nitrogen)
        } else {
            (0, 0)
        }
    }
}

/// A formula's written parts sorted by role.
struct SortedParts {
    /// The organic part, when some part holds carbon.
    organic: Option<OrganicPart>,
    /// Water, acids and other parts, in written order.
    parts: Vec<CounterIon>,
    /// Water of crystallisation per formula unit.
    water: u32,
    /// The acid parts.
    acids: Acids,
    /// True when a second part holds carbon (kept in the atom balance only).
    extra_organic: bool,
}

impl SortedParts {
    /// Sorts each written part: water, the (first) organic part, other carbon parts,
    /// acids, and the rest.
    fn of(stated: &StatedFormula) -> Self {
        let mut sorted = Self {
            organic: None,
            parts: Vec::new(),
            water: 0,
            acids: Acids::default(),
            extra_organic: false,
        };
        for part in &stated.parts {
            let c = &part.composition;
            let n = part.multiplier;
            let other = |role| CounterIon {
                formula: c.to_string(),
                count: n,
                role,
            };
            if is_water(c) {
                sorted.water += n;
                sorted.parts.push(other(PartRole::Water));
            } else if c.count("C") > 0 && sorted.organic.is_none() {
                sorted.organic = Some(OrganicPart {
                    composition: c.clone(),
                    count: n,
                    text: part.text.clone(),
                });
            } else if c.count("C") > 0 {
                sorted.extra_organic = true;
                sorted.parts.push(other(PartRole::Other));
            } else if is_acid(c) {
                sorted.acids.units += n;
                sorted.acids.protons += n * c.count("H");
                // Counter-ions keep their written spelling (HCl, not Hill's ClH).
                let written_unit = part
                    .text
                    .trim_start_matches(|ch: char| ch.is_ascii_digit())
                    .trim()
                    .to_owned();
                sorted.parts.push(CounterIon {
                    formula: written_unit,
                    count: n,
                    role: PartRole::Acid,
                });
            } else {
                sorted.parts.push(other(PartRole::Other));
            }
        }
        sorted
    }
}

/// The organic part with its metals (alkali, alkaline earth, Zn) read as counter-ions.
struct MetalSalt {
    /// The free acid: each metal replaced by as many H as its charge.
    organic: Composition,
    /// True when the organic part held a metal.
    found: bool,
    /// Acidic H the metals replaced (carboxylate sites).
    anion_sites: u32,
    /// The metal cations, in the order read.
    ions: Vec<CounterIon>,
    /// Why, one sentence a metal.
    why: Vec<String>,
}

impl MetalSalt {
    /// Reads the metals of `comp` (`m` molecules per formula unit) as cations.
    fn free_acid(mut comp: Composition, m: u32) -> Self {
        let metals: Vec<(String, u32, u32)> = comp
            .iter()
            .filter_map(|(s, n)| metal_charge(s).map(|v| (s.to_owned(), n, v)))
            .collect();
        let mut anion_sites = 0u32;
        let mut ions = Vec::new();
        let mut why = Vec::new();
        for (symbol, n, v) in &metals {
            if let Some(c) = minus(&comp, symbol, *n) {
                comp = c;
                comp.add("H", n * v);
                anion_sites += n * v;
                ions.push(CounterIon {
                    formula: format!("{symbol}{}", if *v == 1 { "+" } else { "2+" }),
                    count: n * m,
                    role: PartRole::Metal,
                });
                why.push(format!(
                    "{symbol} in an organic formula is read as the cation of a salt (common practice): \
                     each {symbol} replaced {v} acidic H, so the free acid holds {} more H",
                    n * v
                ));
            }
        }
        Self {
            organic: comp,
            found: !metals.is_empty(),
            anion_sites,
            ions,
            why,
        }
    }
}

/// N with Cl, Br or I in one unwritten formula: the covalent reading (when possible) and
/// each hydrohalide reading `k HX` for k up to the smaller of N and X.
fn hydrohalide_readings(comp: &Composition) -> Vec<Reading> {
    let n_nitrogen = comp.count("N");
    if n_nitrogen == 0 {
        return Vec::new();
    }
    let covalent_ok = whole_dbe(comp);
    let mut out = Vec::new();
    for x in HYDROHALIDE_HALOGENS {
        for k in 1..=comp.count(x).min(n_nitrogen) {
            let Some(organic) = minus(comp, x, k).and_then(|c| minus(&c, "H", k)) else {
                continue;
            };
            if !whole_dbe(&organic) {
                continue;
            }
            let acid = format!("H{x}");
            let kind = if covalent_ok {
                ReadingKind::PossibleHydrohalide
            } else {
                ReadingKind::RequiredHydrohalide
            };
            let because = if covalent_ok {
                format!("{x} with N and no written part may be the chloride of an amine salt as well as a covalent halogen; read here as {k} {acid}")
            } else {
                format!(
                    "the formula cannot be one covalent molecule (DBE {}), so the {x} is read as {k} {acid} of an amine salt",
                    comp.dbe().map_or("?".to_owned(), |d| format!("{d}"))
                )
            }
            .replace("chloride", halide_word(x));
            out.push(Reading {
                kind,
                organic,
                organic_count: 1,
                parts: vec![CounterIon {
                    formula: format!("H{x}"),
                    count: k,
                    role: PartRole::Acid,
                }],
                water: 0,
                sites: IonicSites {
                    cation: (k, k),
                    anion: (0, 0),
                },
                why: because,
            });
        }
    }
    if out.is_empty() {
        return out;
    }
    if covalent_ok {
        out.insert(
            0,
            Reading {
                kind: ReadingKind::Covalent,
                organic: comp.clone(),
                organic_count: 1,
                parts: Vec::new(),
                water: 0,
                sites: IonicSites::default(),
                why: "read as written: one covalent molecule, the halogen bonded to carbon"
                    .to_owned(),
            },
        );
    }
    out
}

fn halide_word(x: &str) -> &'static str {
    match x {
        "Br" => "bromide",
        "I" => "iodide",
        _ => "chloride",
    }
}

/// Solves every reading, shows the best supported one (a reading with candidates before
/// one without, then the higher best score, then the earlier reading: the covalent one
/// first) and names the others.
pub fn solve_readings<M: Meter>(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    readings: &[Reading],
    meter: &mut M,
) -> Result<Outcome, M::Stop> {
    let Some(stated) = &case.formula else {
        return solve_stated_within(case, catalogue, options, meter, Stage::Enumeration);
    };
    let mut solved = solve_each(case, stated, catalogue, options, readings, meter)?;
    let best = (0..solved.len())
        .max_by(|&a, &b| {
            let key = |i: usize| {
                let o: &Outcome = &solved[i];
                (
                    !o.candidates.is_empty(),
                    o.candidates.first().map_or(f64::NEG_INFINITY, |c| c.score),
                )
            };
            let (ha, sa) = key(a);
            let (hb, sb) = key(b);
            ha.cmp(&hb)
                .then(sa.total_cmp(&sb))
                // Earlier wins a tie: max_by keeps the last maximum, so reverse the index.
                .then(b.cmp(&a))
        })
        .unwrap_or(0);
    let alternatives: Vec<AlternativeReading> = readings
        .iter()
        .zip(&solved)
        .enumerate()
        .filter(|(i, _)| *i != best)
        .map(|(_, (r, o))| AlternativeReading {
            reading: r.kind,
            organic_formula: r.organic.to_string(),
            n_consistent: o.n_consistent,
            best_score: o.candidates.first().map(|c| c.score),
            why: r.why.clone(),
        })
        .collect();
    let reading = &readings[best];
    let mut outcome = solved.swap_remove(best);
    let checks = band_checks(case, catalogue, options, reading, &outcome);
    let organic_dbe = reading.organic.dbe();
    let mut statements = vec![reading.why.clone()];
    if reading.kind != ReadingKind::Covalent {
        statements.push(dbe_statement(
            &stated.composition,
            &reading.organic,
            reading,
        ));
        statements.push(format!(
            "the MS evidence is compared with the organic part {} (a salt shows its free base or free acid in the mass spectrum: common practice)",
            reading.organic
        ));
    }
    if !alternatives.is_empty() {
        statements.push(format!(
            "also solved: {}",
            alternatives
                .iter()
                .map(|a| format!(
                    "{} ({}, {} consistent)",
                    a.organic_formula,
                    reading_word(a.reading),
                    a.n_consistent
                ))
                .collect::<Vec<_>>()
                .join("; ")
        ));
    }
    outcome.formula = Some(stated.composition.to_string());
    outcome.dbe = stated.composition.dbe();
    outcome.salt = Some(SaltOutcome {
        stated_formula: stated.composition.to_string(),
        stated_dbe: stated.composition.dbe(),
        reading: reading.kind,
        organic_formula: reading.organic.to_string(),
        organic_dbe,
        organic_count: reading.organic_count,
        parts: reading.parts.clone(),
        statements,
        checks,
        alternatives,
    });
    Ok(outcome)
}

/// A short word for a reading.
pub fn reading_word(kind: ReadingKind) -> &'static str {
    match kind {
        ReadingKind::WrittenParts => "written parts",
        ReadingKind::Metal => "metal salt",
        ReadingKind::PossibleHydrohalide | ReadingKind::RequiredHydrohalide => "hydrohalide salt",
        ReadingKind::Covalent => "covalent",
    }
}

fn dbe_statement(stated: &Composition, organic: &Composition, reading: &Reading) -> String {
    let show = |d: Option<f64>| d.map_or("?".to_owned(), |d| format!("{d}"));
    let mut accounted = Vec::new();
    for p in &reading.parts {
        let times = if p.count > 1 {
            format!("{} ", p.count)
        } else {
            String::new()
        };
        accounted.push(format!("{times}{} ({})", p.formula, p.role.word()));
    }
    format!(
        "atoms: {stated} = {}{organic} + {}; DBE of the stated formula {}, of the organic part {} \
         (an acid's H and anion add a saturating pair, so a hydrohalide's DBE is one less per HX \
         than its free base's; a metal counts like the H it replaced)",
        if reading.organic_count > 1 {
            format!("{} × ", reading.organic_count)
        } else {
            String::new()
        },
        accounted.join(" + "),
        show(stated.dbe()),
        show(organic.dbe()),
    )
}

/// Each reading solved, in order. Two readings or more are solved at once on two
/// threads when the machine has two cores and the meter splits (half the memory left
/// for each side); the outcomes are those of solving them one after the other. A stop
/// on either side solves them again one after the other under the whole budget, so a
/// case stops only where it would have stopped on one thread (past the deadline, the
/// second run stops at its first clock read).
fn solve_each<M: Meter>(
    case: &Case,
    stated: &StatedFormula,
    catalogue: &Catalogue,
    options: &SolveOptions,
    readings: &[Reading],
    meter: &mut M,
) -> Result<Vec<Outcome>, M::Stop> {
    let in_turn = |readings: &[Reading], meter: &mut M| {
        readings
            .iter()
            .map(|r| solve_reading(case, stated, catalogue, options, r, meter))
            .collect::<Result<Vec<Outcome>, M::Stop>>()
    };
    let two_cores = std::thread::available_parallelism().is_ok_and(|n| n.get() >= 2);
    if readings.len() < 2 || !two_cores {
        return in_turn(readings, meter);
    }
    let Some(mut part) = meter.split() else {
        return in_turn(readings, meter);
    };
    let held_before = meter.held();
    let (here, there) = readings.split_at(readings.len().div_ceil(2));
    let (first, second) = std::thread::scope(|scope| {
        let other = scope.spawn(|| {
            let r = in_turn(there, &mut part);
            (r, part)
        });
        let first = in_turn(here, meter);
        let (second, part) = other
            .join()
            .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
        meter.rejoin(part);
        (first, second)
    });
    match (first, second) {
        (Ok(mut a), Ok(b)) => {
            a.extend(b);
            Ok(a)
        }
        _ => {
            // What the stopped attempt still holds is given back first.
            let left = meter.held().saturating_sub(held_before);
            meter.release(left);
            in_turn(readings, meter)
        }
    }
}

/// One reading solved: its organic part taken as the formula, with its ionic sites
/// (and the water bands of a hydrate).
fn solve_reading<M: Meter>(
    case: &Case,
    stated: &StatedFormula,
    catalogue: &Catalogue,
    options: &SolveOptions,
    reading: &Reading,
    meter: &mut M,
) -> Result<Outcome, M::Stop> {
    let mut organic_case = case.clone();
    let Some(formula) = Formula::from_composition(&reading.organic) else {
        return solve_stated_within(case, catalogue, options, meter, Stage::Enumeration);
    };
    organic_case.formula = Some(StatedFormula {
        text: reading.organic.to_string(),
        formula,
        composition: reading.organic.clone(),
        place: stated.place.clone(),
        parts: Vec::new(),
    });
    let catalogue = with_hydrate_bands(catalogue, reading.water > 0);
    let options = SolveOptions {
        ionic_sites: reading.sites,
        ..options.clone()
    };
    solve_stated_within(
        &organic_case,
        &catalogue,
        &options,
        meter,
        Stage::Enumeration,
    )
}

/// The catalogue with its water-of-crystallisation bands among the artefacts when the
/// formula states water (the digest stays the catalogue's).
pub fn with_hydrate_bands(catalogue: &Catalogue, hydrate: bool) -> Cow<'_, Catalogue> {
    if !hydrate || catalogue.hydrate_bands.is_empty() {
        return Cow::Borrowed(catalogue);
    }
    let mut c = catalogue.clone();
    c.artefacts.extend(c.hydrate_bands.iter().cloned());
    Cow::Owned(c)
}

/// Observed bands within `range ± tolerance`, in words.
fn seen_in(case: &Case, lo: f64, hi: f64, tolerance: f64) -> Vec<String> {
    case.ir
        .iter()
        .flat_map(|ir| ir.bands.iter())
        .filter(|b| b.band.at >= lo - tolerance && b.band.at <= hi + tolerance)
        .map(|b| {
            format!(
                "{:.0} {}{}",
                b.band.at,
                b.band.strength.word(),
                b.band
                    .shape
                    .map_or(String::new(), |s| format!(" {}", s.word()))
            )
        })
        .collect()
}

fn diagnostic_summary(case: &Case, g: &Group, tolerance: f64) -> String {
    let parts: Vec<String> = g
        .bands
        .iter()
        .filter(|b| b.role == crate::rules::BandRole::Diagnostic)
        .map(|b| {
            let seen = seen_in(case, b.range.lo, b.range.hi, tolerance);
            format!(
                "{} {:.0}–{:.0} ({})",
                b.label,
                b.range.lo,
                b.range.hi,
                if seen.is_empty() {
                    "not seen".to_owned()
                } else {
                    format!("seen: {}", seen.join(", "))
                }
            )
        })
        .collect();
    parts.join("; ")
}

/// Salt or free base (each salt form of the leading candidate against its neutral parent)
/// and hydrate or not (the water bands), from the observed bands.
fn band_checks(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    reading: &Reading,
    outcome: &Outcome,
) -> Vec<String> {
    let mut out = Vec::new();
    if case.ir.is_none() {
        return out;
    }
    let tolerance = options.tolerance_cm1;
    let leading: Vec<&Group> = outcome
        .candidates
        .first()
        .map(|c| {
            c.groups
                .keys()
                .filter_map(|id| catalogue.group(id))
                .filter(|g| g.ionic.is_some())
                .collect()
        })
        .unwrap_or_default();
    for g in leading {
        let Some(parent) = g.salt_of.as_deref().and_then(|p| catalogue.group(p)) else {
            continue;
        };
        out.push(format!(
            "salt or free base: {} expects {}; the free {} {} would need {}",
            g.id,
            diagnostic_summary(case, g, tolerance),
            if g.ionic == Some(Ionic::Cation) {
                "base's"
            } else {
                "acid's"
            },
            parent.id,
            diagnostic_summary(case, parent, tolerance)
        ));
    }
    if reading.water > 0 {
        for b in &catalogue.hydrate_bands {
            let seen = seen_in(case, b.range.lo, b.range.hi, tolerance);
            out.push(format!(
                "hydrate: {} {:.0}–{:.0}: {}",
                b.label,
                b.range.lo,
                b.range.hi,
                if seen.is_empty() {
                    "not seen — the stated water is not confirmed by the spectrum".to_owned()
                } else {
                    format!("seen: {}", seen.join(", "))
                }
            ));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::case::parse;

    fn read(formula: &str) -> Vec<Reading> {
        let src = format!("case: T-1\nformula: \"{formula}\"\n");
        let (case, d) = parse(&src, "t.yaml");
        let case = case.unwrap_or_else(|| panic!("{d:?}"));
        readings(&case)
    }

    #[test]
    fn a_plain_formula_has_no_reading() {
        assert!(read("C8H8O").is_empty());
        // A halogen without nitrogen is covalent: nothing to read.
        assert!(read("C6H5Cl").is_empty());
    }

    #[test]
    fn a_written_hydrochloride_deduces_the_free_base() {
        let r = read("C10H15N·HCl");
        assert_eq!(r.len(), 1);
        assert_eq!(r[0].kind, ReadingKind::WrittenParts);
        assert_eq!(r[0].organic.to_string(), "C10H15N");
        assert_eq!(r[0].sites.cation, (1, 1));
        assert_eq!(r[0].sites.anion, (0, 0));
    }

    #[test]
    fn a_sodium_salt_deduces_the_free_acid() {
        // Sodium acetate (common practice): C2H3NaO2 is acetic acid minus H plus Na.
        let r = read("C2H3NaO2");
        assert_eq!(r.len(), 1);
        assert_eq!(r[0].kind, ReadingKind::Metal);
        assert_eq!(r[0].organic.to_string(), "C2H4O2");
        assert_eq!(r[0].sites.anion, (1, 1));
        let hydrate = read("C2H3NaO2·3H2O");
        assert_eq!(hydrate[0].water, 3);
        assert_eq!(hydrate[0].organic.to_string(), "C2H4O2");
    }

    #[test]
    fn a_sulfate_of_two_bases_gives_one_proton_each() {
        let r = read("(C9H13N)2·H2SO4");
        assert_eq!(r[0].organic.to_string(), "C9H13N");
        assert_eq!(r[0].organic_count, 2);
        assert_eq!(r[0].sites.cation, (1, 1));
    }

    #[test]
    fn an_unwritten_hydrochloride_is_solved_both_ways() {
        // C10H16ClN: DBE 3 as written, so both readings stand.
        let r = read("C10H16ClN");
        let kinds: Vec<ReadingKind> = r.iter().map(|x| x.kind).collect();
        assert_eq!(
            kinds,
            vec![ReadingKind::Covalent, ReadingKind::PossibleHydrohalide]
        );
        assert_eq!(r[1].organic.to_string(), "C10H15N");
        // CH6ClN (methylamine hydrochloride) has DBE -1 as written: only the salt stands.
        let r = read("CH6ClN");
        assert_eq!(r.len(), 1);
        assert_eq!(r[0].kind, ReadingKind::RequiredHydrohalide);
        assert_eq!(r[0].organic.to_string(), "CH5N");
    }

    /// A budget meter that never splits: readings are solved one after the other.
    struct InTurn(crate::budget::Metered);

    impl Meter for InTurn {
        type Stop = crate::budget::LimitReached;
        fn tick(&mut self, stage: Stage) -> Result<(), Self::Stop> {
            self.0.tick(stage)
        }
        fn hold(&mut self, bytes: u64, stage: Stage) -> Result<(), Self::Stop> {
            self.0.hold(bytes, stage)
        }
        fn release(&mut self, bytes: u64) {
            self.0.release(bytes)
        }
        fn held(&self) -> u64 {
            self.0.held()
        }
        fn split(&mut self) -> Option<Self> {
            None
        }
        fn rejoin(&mut self, _: Self) {}
    }

    /// An invented loose case whose Cl with N is read both ways (covalent and HCl).
    fn two_reading_case() -> Case {
        let src = concat!(
            "# invented test case\n",
            "formula: C12H18ClNO2\n",
            "ir:\n  technique: KBr\n  bands:\n",
            "    - { at: 3300, strength: medium }\n",
            "    - { at: 2950, strength: medium }\n",
            "    - { at: 1730, strength: strong }\n",
            "    - { at: 1600, strength: medium }\n",
            "    - { at: 1240, strength: strong }\n",
            "    - { at: 750, strength: medium }\n",
        );
        let (case, d) = parse(src, "t.yaml");
        case.unwrap_or_else(|| panic!("{d:?}"))
    }

    fn solved_with<M: Meter>(case: &Case, meter: &mut M) -> Result<String, M::Stop> {
        let catalogue = crate::rules::embedded_catalogue().expect("shipped catalogue loads");
        let rs = readings(case);
        assert_eq!(rs.len(), 2, "the case is read two ways");
        let o = solve_readings(case, &catalogue, &SolveOptions::default(), &rs, meter)?;
        Ok(serde_json::to_string(&o).expect("an outcome serialises"))
    }

    #[test]
    fn readings_solved_at_once_conclude_what_readings_solved_in_turn_do() {
        let case = two_reading_case();
        let mut in_turn = InTurn(crate::budget::Metered::new(
            crate::budget::Budget::UNLIMITED,
        ));
        let expected = solved_with(&case, &mut in_turn).expect("no limit");
        let at_once = solved_with(&case, &mut crate::budget::Unmetered).expect("never stops");
        assert_eq!(at_once, expected);
        let metered = solved_with(
            &case,
            &mut crate::budget::Metered::new(crate::budget::Budget::UNLIMITED),
        )
        .expect("no limit");
        assert_eq!(metered, expected);
    }

    #[test]
    fn a_case_that_fits_its_memory_budget_in_turn_is_not_stopped_by_solving_at_once() {
        let case = two_reading_case();
        let mut in_turn = InTurn(crate::budget::Metered::new(
            crate::budget::Budget::UNLIMITED,
        ));
        let expected = solved_with(&case, &mut in_turn).expect("no limit");
        // One after the other, the case peaks at the larger reading's hold; at once, each
        // side gets half of it, which the larger reading overruns: the readings are then
        // solved again in turn under the whole budget.
        let peak = in_turn.0.peak();
        assert!(peak > 0);
        let budget = crate::budget::Budget {
            time: None,
            memory_bytes: Some(peak),
        };
        let mut tight = crate::budget::Metered::new(budget);
        let solved = solved_with(&case, &mut tight).expect("fits in turn");
        assert_eq!(solved, expected);
        // One byte less does not fit either way.
        let budget = crate::budget::Budget {
            time: None,
            memory_bytes: Some(peak - 1),
        };
        let stop = solved_with(&case, &mut crate::budget::Metered::new(budget)).unwrap_err();
        assert_eq!(stop.limit, crate::budget::Limit::Memory { bytes: peak - 1 });
    }
}
