//! Soundness against the shipped catalogue: a molecule built from catalogue groups, whose
//! band list is generated from the catalogue's own rules (at each range centre, with the
//! expected strength and shape under the technique), must always keep its true group set
//! among the candidates. The molecule is a real tree: a chain of skeleton carbons, each
//! group hung on the chain by one bond, its other must-bonds capped with methyl carbons,
//! hydrogens on every remaining open position. A salt-form group makes the molecule a
//! salt: one HCl per protonated amine after a dot, one Na per carboxylate in place of H.

use proptest::prelude::*;
use quiddity::case::parse;
use quiddity::engine::{solve, SolveOptions};
use quiddity::rules::{
    embedded_catalogue, Catalogue, ExpectedShape, ExpectedStrength, Ionic, Technique,
};
use std::collections::BTreeMap;

struct Molecule {
    groups: BTreeMap<String, u32>,
    formula: String,
}

fn build(cat: &Catalogue, picks: &[usize], chain: u32) -> Option<Molecule> {
    let concrete: Vec<_> = cat.concrete_groups().filter(|g| g.id != "ring").collect();
    let mut chosen: Vec<String> = picks
        .iter()
        .map(|i| concrete[i % concrete.len()].id.clone())
        .collect();
    // Satisfy requires_any with the first concrete group of the first named family.
    let mut k = 0;
    while k < chosen.len() {
        let g = cat.group(&chosen[k])?;
        if !g.requires_any.is_empty()
            && !chosen
                .iter()
                .any(|c| g.requires_any.iter().any(|r| cat.is_a(c, r)))
        {
            let fam = &g.requires_any[0];
            let pick = concrete.iter().find(|c| cat.is_a(&c.id, fam))?;
            chosen.push(pick.id.clone());
        }
        k += 1;
        if chosen.len() > 6 {
            return None;
        }
    }
    // No excluded pairs.
    for a in &chosen {
        for b in &chosen {
            let ga = cat.group(a)?;
            if ga.excludes.iter().any(|x| cat.is_a(b, x)) {
                return None;
            }
        }
    }
    let mut counts: BTreeMap<String, u32> = BTreeMap::new();
    let mut atoms: BTreeMap<String, u32> = BTreeMap::new();
    let mut skeleton = chain.max(1);
    let mut chain_free: i64 = 4 * i64::from(skeleton) - 2 * (i64::from(skeleton) - 1);
    let mut h: i64 = 0;
    for id in &chosen {
        let g = cat.group(id)?;
        *counts.entry(id.clone()).or_insert(0) += 1;
        for (s, n) in g.atoms.iter() {
            if s == "H" {
                h += i64::from(n);
            } else {
                *atoms.entry(s.to_owned()).or_insert(0) += n;
            }
        }
        let b = g.bonds;
        let must = i64::from(b.hetero + b.carbon);
        let optional = i64::from(b.hetero_or_h + b.carbon_or_h);
        if must + optional == 0 {
            return None;
        }
        // Rings the group closes through the rest of the molecule (a lactone, an epoxide,
        // a strained-ring ketone): its DBE minus the rings and pi bonds its own atoms hold.
        let valence_sum: i64 = g
            .atoms
            .iter()
            .map(|(sym, n)| {
                i64::from(quiddity::chem::composition::standard_valence(sym).unwrap_or(0))
                    * i64::from(n)
            })
            .sum();
        let heavy = i64::from(g.atoms.n_atoms() - g.atoms.count("H"));
        let internal_bonds = (valence_sum - must - optional - i64::from(g.atoms.count("H"))) / 2;
        let closures = i64::from(g.dbe) - (internal_bonds - heavy + 1);
        if !(0..=1).contains(&closures) || (closures == 1 && (must < 2 || chain < 2)) {
            return None;
        }
        // One end to the chain (a must end if any, else an optional one); a ring-closing
        // group sends a second must end to the chain as well.
        chain_free -= 1 + closures;
        // Remaining must ends: methyl caps (each a new skeleton carbon with 3 H).
        let caps = (must - 1 - closures).max(0);
        skeleton += caps as u32;
        h += 3 * caps;
        // Remaining optional ends carry H.
        h += if must > 0 { optional } else { optional - 1 };
    }
    if chain_free < 0 {
        return None;
    }
    h += chain_free;
    // Salt forms hold their neutral parent's atoms: a protonated amine comes with one HCl
    // written after a dot, a carboxylate with one Na in place of the acid's H.
    let n_ionic = |side: Ionic| -> u32 {
        counts
            .iter()
            .filter(|(id, _)| cat.group(id).is_some_and(|g| g.ionic == Some(side)))
            .map(|(_, n)| *n)
            .sum()
    };
    let (n_cation, n_anion) = (n_ionic(Ionic::Cation), n_ionic(Ionic::Anion));
    h -= i64::from(n_anion);
    if h < 0 {
        return None;
    }
    if n_anion > 0 {
        atoms.insert("Na".into(), n_anion);
    }
    *atoms.entry("C".into()).or_insert(0) += skeleton;
    let mut formula = format!("C{}H{h}", atoms.get("C").copied().unwrap_or(0));
    for (s, n) in &atoms {
        if s != "C" {
            formula.push_str(&format!("{s}{n}"));
        }
    }
    if n_cation > 0 {
        formula.push_str(&format!("·{n_cation}HCl"));
    }
    Some(Molecule {
        groups: counts,
        formula,
    })
}

fn case_text(cat: &Catalogue, m: &Molecule, technique: Technique) -> String {
    let mut s = format!(
        "# generated\nformula: {}\nir:\n  technique: {}\n  bands:\n",
        m.formula,
        technique.word()
    );
    let mut push = |rule: &quiddity::rules::BandRule| {
        let o = rule.by_technique.get(&technique);
        let range = o.and_then(|o| o.range).unwrap_or(rule.range);
        let strength = match o.and_then(|o| o.strength).unwrap_or(rule.strength) {
            ExpectedStrength::Weak => "weak",
            ExpectedStrength::Strong => "strong",
            _ => "medium",
        };
        let shape = match o.and_then(|o| o.shape).unwrap_or(rule.shape) {
            ExpectedShape::Broad => ", shape: broad",
            ExpectedShape::Sharp => ", shape: sharp",
            ExpectedShape::Any => "",
        };
        s.push_str(&format!(
            "    - {{ at: {:.0}, strength: {strength}{shape} }}\n",
            range.centre()
        ));
    };
    for id in m.groups.keys() {
        for rule in &cat.group(id).map(|g| g.bands.clone()).unwrap_or_default() {
            push(rule);
        }
    }
    if let Some(sp3) = cat
        .skeleton
        .iter()
        .find(|r| r.needs_any.iter().any(|n| n == "sp3_carbon"))
    {
        push(&sp3.band);
    }
    s
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, .. ProptestConfig::default() })]

    #[test]
    fn the_true_group_set_is_never_excluded(
        picks in proptest::collection::vec(0usize..200, 1..3),
        chain in 1u32..4,
        technique in proptest::sample::select(vec![Technique::Film, Technique::Atr, Technique::Kbr, Technique::Gas, Technique::Solution]),
    ) {
        let cat = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
        let Some(m) = build(&cat, &picks, chain) else { return Ok(()); };
        let text = case_text(&cat, &m, technique);
        let (case, diagnostics) = parse(&text, "generated.yaml");
        let case = case.unwrap_or_else(|| panic!("{diagnostics:?}\n{text}"));
        let options = SolveOptions { max_candidates: 100_000, ..SolveOptions::default() };
        let o = solve(&case, &cat, &options);
        prop_assume!(!o.enumeration_truncated);
        let found = o.candidates.iter().any(|c| c.groups == m.groups);
        prop_assert!(found, "truth {:?} lost\n{}\nnear misses: {:?}", m.groups, text, o.near_misses.iter().filter(|n| n.groups == m.groups).collect::<Vec<_>>());
    }
}

#[test]
fn every_single_catalogue_group_keeps_its_truth_under_every_technique() {
    // Exhaustive companion of the property: each concrete group alone on a short chain
    // (and with what it requires), every technique. Fails if too few molecules were built,
    // so it cannot pass vacuously.
    let cat = embedded_catalogue().unwrap_or_else(|d| panic!("{d:?}"));
    let n = cat.concrete_groups().count();
    let mut built = 0;
    let mut lost = Vec::new();
    for i in 0..n {
        for chain in [2, 3] {
            let Some(m) = build(&cat, &[i], chain) else {
                continue;
            };
            for technique in Technique::ALL {
                let text = case_text(&cat, &m, technique);
                let (case, _) = parse(&text, "generated.yaml");
                let Some(case) = case else { continue };
                built += 1;
                let o = solve(
                    &case,
                    &cat,
                    &SolveOptions {
                        max_candidates: 100_000,
                        ..SolveOptions::default()
                    },
                );
                if !o.enumeration_truncated && !o.candidates.iter().any(|c| c.groups == m.groups) {
                    lost.push(format!("{:?} {}", m.groups, technique.word()));
                }
            }
        }
    }
    assert!(built > 3 * n, "only {built} molecules built for {n} groups");
    assert!(lost.is_empty(), "truth lost: {lost:#?}");
}
