//! Engine specifications on the hand-built test catalogue (`testkit`): the worked
//! examples of the trade, the bond conditions, conflicts, the agreement of the
//! enumeration with the integer programme, and the two soundness properties.

use super::*;
use crate::case::parse;
use crate::engine::testkit::small_catalogue;
use proptest::prelude::*;

fn case(src: &str) -> Case {
    let (case, diagnostics) = parse(src, "t.yaml");
    case.unwrap_or_else(|| panic!("invalid test case: {diagnostics:?}"))
}

fn solve_text(src: &str) -> Outcome {
    let options = SolveOptions {
        max_candidates: 10_000,
        ..SolveOptions::default()
    };
    solve(&case(src), &small_catalogue(), &options)
}

fn families(o: &Outcome) -> Vec<Vec<String>> {
    o.candidates
        .iter()
        .map(|c| c.families.keys().cloned().collect())
        .collect()
}

fn any_candidate_has(o: &Outcome, id: &str) -> bool {
    o.candidates.iter().any(|c| c.families.contains_key(id))
}

fn ruled_out_reason(o: &Outcome, id: &str) -> String {
    o.ruled_out
        .iter()
        .find(|r| r.group == id)
        .map(|r| r.reason.clone())
        .unwrap_or_else(|| panic!("{id} not in ruled_out: {:?}", o.ruled_out))
}

#[test]
fn acetone_like_c3h6o_with_a_1715_band_is_a_ketone() {
    // Worked example (common practice, from memory; the classic reading of acetone's
    // spectrum in Silverstein, Webster & Kiemle): C3H6O, strong C=O near 1715, no O–H.
    // Ketone consistent; aldehyde out (no C–H pair near 2720/2820); alcohol out (no O–H).
    let o = solve_text(
        "formula: C3H6O\nir:\n  technique: film\n  bands:\n    - { at: 2965, strength: medium }\n    - { at: 1715, strength: strong }\n    - { at: 1365, strength: medium }\n    - { at: 1220, strength: medium }\n",
    );
    assert_eq!(
        o.candidates[0].groups.get("ketone"),
        Some(&1),
        "{:?}",
        families(&o)
    );
    assert!(
        o.candidates
            .iter()
            .all(|c| c.families.contains_key("ketone")),
        "{:?}",
        families(&o)
    );
    assert!(!any_candidate_has(&o, "aldehyde"));
    assert!(!any_candidate_has(&o, "alcohol"));
    assert!(!any_candidate_has(&o, "alkene"));
    assert!(
        ruled_out_reason(&o, "aldehyde").contains("C–H stretch"),
        "{}",
        ruled_out_reason(&o, "aldehyde")
    );
    assert!(ruled_out_reason(&o, "alcohol").contains("every alcohol ruled out"));
    assert_eq!(o.candidates[0].dbe_accounting, "DBE 1 = ketone 1");
    assert!(o.conflicts.is_empty());
}

#[test]
fn c4h10o_with_a_broad_3350_band_is_an_alcohol_not_an_ether() {
    // Worked example (common practice, from memory): butanol isomers vs diethyl ether.
    let o = solve_text(
        "formula: C4H10O\nir:\n  bands:\n    - { at: 3350, strength: strong, shape: broad }\n    - { at: 2960, strength: strong }\n    - { at: 1050, strength: strong }\n",
    );
    assert!(!o.candidates.is_empty());
    assert!(
        o.candidates
            .iter()
            .all(|c| c.families.contains_key("alcohol")),
        "{:?}",
        families(&o)
    );
    assert!(!any_candidate_has(&o, "ether"));
    // The ether is kept out by the O–H band it cannot explain, not by its own bands.
    assert!(
        o.near_misses
            .iter()
            .any(|n| n.groups.contains_key("ether") && n.reasons[0].text.contains("3350")),
        "{:?}",
        o.near_misses
    );
}

#[test]
fn c7h5n_with_2230_and_aromatic_ch_is_an_aromatic_nitrile() {
    // Worked example (common practice, from memory): benzonitrile, C≡N near 2230 sharp,
    // aromatic C–H above 3000, ring stretches near 1600 and 1490.
    let o = solve_text(
        "formula: C7H5N\nir:\n  bands:\n    - { at: 3065, strength: medium }\n    - { at: 2230, strength: medium, shape: sharp }\n    - { at: 1600, strength: medium }\n    - { at: 1490, strength: medium }\n    - { at: 760, strength: strong }\n",
    );
    let top = &o.candidates[0];
    assert_eq!(top.groups.get("nitrile"), Some(&1));
    assert_eq!(top.groups.get("aromatic_ring"), Some(&1));
    assert_eq!(top.dbe_accounting, "DBE 6 = nitrile 2 + aromatic_ring 4");
    let band_2230 = top
        .bands
        .iter()
        .find(|b| b.at == 2230.0)
        .map(|b| b.explained_by[0].id.clone());
    assert_eq!(band_2230.as_deref(), Some("nitrile"));
}

#[test]
fn c2h4o2_with_a_very_broad_oh_and_1710_is_an_acid_not_an_ester() {
    // Worked example (common practice, from memory): acetic acid vs methyl formate.
    let o = solve_text(
        "formula: C2H4O2\nir:\n  bands:\n    - { at: 3000, strength: strong, shape: broad }\n    - { at: 1710, strength: strong }\n    - { at: 1290, strength: strong }\n",
    );
    assert!(!o.candidates.is_empty());
    assert!(
        o.candidates
            .iter()
            .all(|c| c.groups.contains_key("carboxylic_acid")),
        "{:?}",
        families(&o)
    );
    assert!(!any_candidate_has(&o, "ester"));
}

#[test]
fn no_ether_in_ch4o_and_no_ester_in_c2h6o() {
    // common practice: CH4O is methanol only; an ether needs two carbons.
    let o = solve_text("formula: CH4O\n");
    assert!(!any_candidate_has(&o, "ether"), "{:?}", families(&o));
    assert!(any_candidate_has(&o, "alcohol"));
    let o = solve_text("formula: C2H6O\n");
    assert!(any_candidate_has(&o, "ether"), "dimethyl ether exists");
    assert!(!any_candidate_has(&o, "ester"));
}

#[test]
fn a_carbonyl_band_in_a_saturated_hydrocarbon_is_a_conflict() {
    // The example of the issue: C6H14 has DBE 0, but a strong 1715 band needs a C=O.
    let o = solve_text(
        "formula: C6H14\nir:\n  bands:\n    - { at: 2960, strength: strong }\n    - { at: 1715, strength: strong }\n    - { at: 1460, strength: medium }\n",
    );
    assert!(o.candidates.is_empty());
    assert_eq!(o.conflicts.len(), 1);
    let items = &o.conflicts[0].items;
    assert_eq!(items.len(), 2, "{items:?}");
    assert!(items[0].starts_with("formula C6H14"));
    assert!(items[1].starts_with("band at 1715"));
    assert!(o.conflicts[0]
        .suggested_causes
        .iter()
        .any(|c| c.starts_with("wrong formula")));
}

#[test]
fn a_molecular_ion_that_disagrees_with_the_formula_is_a_conflict() {
    let o = solve_text("formula: C3H6O\nms:\n  molecular_ion: 59\n  ion: \"M+.\"\n");
    assert!(o.candidates.is_empty());
    let c = &o.conflicts[0];
    assert_eq!(c.items.len(), 2, "{:?}", c.items);
    assert!(
        c.explanation
            .iter()
            .any(|e| e.text.contains("nitrogen rule")),
        "{:?}",
        c.explanation
    );
    // accurate mass within 5 ppm agrees (acetone M+. 58.041316)
    let o = solve_text("formula: C3H6O\nms:\n  molecular_ion: 58.0413\n  ppm: 5\n");
    assert!(!o.candidates.is_empty(), "{:?}", o.evidence_checks);
}

#[test]
fn a_symmetric_internal_alkyne_may_lack_its_band_but_scores_lower() {
    // common practice: a symmetric internal C≡C stretch may be absent (no dipole change).
    let o = solve_text("formula: C4H6\nir:\n  bands:\n    - { at: 2920, strength: strong }\n");
    // No band tells an internal C≡C from two rings here, so the splits collapse into one
    // candidate; the alkyne split is kept, as an alternative of the better-scored one.
    let holder = o.candidates.iter().find(|c| {
        c.groups.contains_key("alkyne_internal")
            || c.alternatives
                .iter()
                .any(|a| a.contains_key("alkyne_internal"))
    });
    let holder = holder.unwrap_or_else(|| panic!("{:?}", families(&o)));
    assert!(
        !holder.groups.contains_key("alkyne_internal"),
        "the alkyne split, penalised for its missing band, does not stand for the class"
    );
}

#[test]
fn the_enumeration_agrees_with_the_integer_programme() {
    // The DFS and the ILP (good_lp + microlp) must agree on feasibility and on the
    // smallest number of group instances, formula by formula.
    let cat = small_catalogue();
    for formula in [
        "C3H6O", "C4H10O", "C7H5N", "C2H4O2", "C6H14", "C8H8O", "C6H5Cl", "C3H9N", "CH4O",
        "C10H12O2", "C2H2", "C6H6O",
    ] {
        let c = case(&format!("formula: {formula}\n"));
        let options = SolveOptions::default();
        let problem = Problem::new(&c, &cat, &options, &BTreeSet::new());
        let allowed = problem.composable_groups();
        let mut dfs_min: Option<u32> = None;
        enumerate::walk(&problem, &allowed, |counts, _| {
            let n: u32 = counts.iter().sum();
            dfs_min = Some(dfs_min.map_or(n, |m| m.min(n)));
            Flow::Continue
        });
        assert_eq!(
            dfs_min,
            lp::min_group_instances(&problem, &allowed),
            "{formula}"
        );
    }
}

#[test]
fn pruning_the_walk_loses_no_candidate() {
    // The pruned walk must accept exactly the combinations the full walk accepts.
    let cat = small_catalogue();
    let cases = [
        "formula: C3H6O\nir:\n  bands:\n    - { at: 2965, strength: medium }\n    - { at: 1715, strength: strong }\n",
        "formula: C8H8O2\nir:\n  bands:\n    - { at: 3000, strength: strong, shape: broad }\n    - { at: 1705, strength: strong }\n    - { at: 1600, strength: medium }\n",
        "formula: C9H9N\nir:\n  bands:\n    - { at: 3060, strength: medium }\n    - { at: 2240, strength: medium }\n    - { at: 1600, strength: medium }\n",
        "formula: C6H12O2\n",
    ];
    for text in cases {
        let c = case(text);
        let options = SolveOptions::default();
        let problem = Problem::new(&c, &cat, &options, &BTreeSet::new());
        let allowed = problem.allowed_groups();
        let mut full = Vec::new();
        let mut pruned = Vec::new();
        let leaves_full = enumerate::walk(&problem, &allowed, |counts, sk| {
            if evaluate::evaluate(&problem, counts, sk, false).is_empty() {
                full.push(counts.to_vec());
            }
            Flow::Continue
        });
        let leaves_pruned = enumerate::walk_pruned(&problem, &allowed, |counts, sk| {
            if evaluate::evaluate(&problem, counts, sk, false).is_empty() {
                pruned.push(counts.to_vec());
            }
            Flow::Continue
        });
        assert_eq!(full, pruned, "{text}");
        assert!(leaves_pruned <= leaves_full);
        assert!(!full.is_empty(), "{text}");
    }
}

// ---------------------------------------------------------------- properties

/// A generated molecule: group counts (by testkit id), skeleton carbons, its formula and
/// the bands its groups' rules predict.
#[derive(Debug, Clone)]
struct Generated {
    groups: Vec<(&'static str, u32)>,
    formula: String,
    bands: Vec<(f64, &'static str, Option<&'static str>)>,
    technique: Option<&'static str>,
}

/// Builds a real molecule: a chain of skeleton carbons with in-chain groups (ether,
/// ketone, ester, internal alkyne, p-disubstituted benzene, 1,2-disubstituted alkene)
/// and end groups (alcohol, nitrile, chloro, aldehyde, acid, primary amine) hanging on
/// the skeleton carbons. Hydrogens fill every remaining open position.
fn generate(
    skeleton: u32,
    in_chain: &[usize],
    ends: &[usize],
    technique: Option<&'static str>,
) -> Option<Generated> {
    const IN_CHAIN: [&str; 6] = [
        "ether",
        "ketone",
        "ester",
        "alkyne_internal",
        "aromatic_ring",
        "alkene",
    ];
    const ENDS: [&str; 6] = [
        "alcohol_primary",
        "nitrile",
        "chloro",
        "aldehyde",
        "carboxylic_acid",
        "amine_primary",
    ];
    let cat = small_catalogue();
    if skeleton == 0 {
        return None;
    }
    // Chain: C (group C)* with each in-chain group followed by a skeleton carbon, so
    // heteroatom ends always meet carbons; needs one skeleton carbon per in-chain group + 1.
    if (in_chain.len() as u32) + 1 > skeleton {
        return None;
    }
    let mut counts: std::collections::BTreeMap<&str, u32> = Default::default();
    let mut c = skeleton;
    let mut h: i64 = 0;
    let mut other: std::collections::BTreeMap<String, u32> = Default::default();
    // skeleton carbons: 4 valences; chain bonds between consecutive units
    let units = skeleton + in_chain.len() as u32;
    let mut free_skeleton_valence: i64 = 4 * i64::from(skeleton);
    // each in-chain group bonds to two skeleton carbons (its neighbours in the chain)
    let chain_bonds_between_skeleton = i64::from(skeleton) - 1 - in_chain.len() as i64;
    free_skeleton_valence -= 2 * chain_bonds_between_skeleton + 2 * in_chain.len() as i64;
    let _ = units;
    for &k in in_chain {
        let g = cat.group(IN_CHAIN[k])?;
        *counts.entry(IN_CHAIN[k]).or_insert(0) += 1;
        c += g.atoms.count("C");
        h += i64::from(g.atoms.count("H"));
        for (s, n) in g.atoms.iter() {
            if s != "C" && s != "H" {
                *other.entry(s.to_owned()).or_insert(0) += n;
            }
        }
        // open positions beyond the two chain bonds carry H
        let b = g.bonds;
        let open_or_h = i64::from(b.carbon_or_h + b.hetero_or_h);
        let must = i64::from(b.carbon + b.hetero);
        h += open_or_h - (2 - must);
    }
    for &k in ends {
        let g = cat.group(ENDS[k])?;
        *counts.entry(ENDS[k]).or_insert(0) += 1;
        c += g.atoms.count("C");
        h += i64::from(g.atoms.count("H"));
        for (s, n) in g.atoms.iter() {
            if s != "C" && s != "H" {
                *other.entry(s.to_owned()).or_insert(0) += n;
            }
        }
        let b = g.bonds;
        // one bond to a skeleton carbon; other open-or-H positions carry H
        h += i64::from(b.carbon_or_h + b.hetero_or_h)
            - i64::from(b.carbon_or_h + b.hetero_or_h > 0 && b.carbon + b.hetero == 0);
        free_skeleton_valence -= 1;
    }
    if free_skeleton_valence < 0 {
        return None;
    }
    h += free_skeleton_valence;
    let mut formula = format!("C{c}H{h}");
    for (s, n) in &other {
        formula.push_str(&format!("{s}{n}"));
    }
    let t = technique.and_then(|w| {
        crate::rules::Technique::ALL
            .into_iter()
            .find(|t| t.word() == w)
    });
    let mut bands = Vec::new();
    let mut push_rule = |rule: &crate::rules::BandRule| {
        let e = &constraints::diagnostic_bands::effective_variants(rule, t)[0];
        let strength = match e.strength {
            crate::rules::ExpectedStrength::Weak => "weak",
            crate::rules::ExpectedStrength::Strong => "strong",
            _ => "medium",
        };
        let shape = match e.shape {
            crate::rules::ExpectedShape::Broad => Some("broad"),
            crate::rules::ExpectedShape::Sharp => Some("sharp"),
            crate::rules::ExpectedShape::Any => None,
        };
        bands.push((e.range.centre().round(), strength, shape));
    };
    for id in counts.keys() {
        for rule in &cat.group(id)?.bands {
            push_rule(rule);
        }
    }
    if free_skeleton_valence > 0 {
        push_rule(&cat.skeleton[0].band);
    }
    Some(Generated {
        groups: counts.into_iter().collect(),
        formula,
        bands,
        technique,
    })
}

fn case_text(g: &Generated, drop: &[bool]) -> String {
    let mut s = format!("# generated\nformula: {}\nir:\n", g.formula);
    if let Some(t) = g.technique {
        s.push_str(&format!("  technique: {t}\n"));
    }
    s.push_str("  bands:\n");
    for (i, (at, strength, shape)) in g.bands.iter().enumerate() {
        if drop.get(i).copied().unwrap_or(false) {
            continue;
        }
        let shape = shape.map(|x| format!(", shape: {x}")).unwrap_or_default();
        s.push_str(&format!(
            "    - {{ at: {at}, strength: {strength}{shape} }}\n"
        ));
    }
    s
}

fn candidate_sets(o: &Outcome) -> Vec<std::collections::BTreeMap<String, u32>> {
    o.candidates.iter().map(|c| c.groups.clone()).collect()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, .. ProptestConfig::default() })]

    /// The true group set of a molecule whose bands come from the catalogue itself is
    /// always among the candidates (never falsely excluded).
    #[test]
    fn the_truth_is_never_excluded(
        skeleton in 1u32..6,
        in_chain in proptest::collection::vec(0usize..6, 0..3),
        ends in proptest::collection::vec(0usize..6, 0..3),
        technique in proptest::sample::select(vec![None, Some("film"), Some("gas"), Some("ATR"), Some("KBr")]),
    ) {
        let Some(g) = generate(skeleton, &in_chain, &ends, technique) else { return Ok(()); };
        let o = solve_text(&case_text(&g, &[]));
        let truth: std::collections::BTreeMap<String, u32> = g.groups.iter().map(|(k, v)| ((*k).to_owned(), *v)).collect();
        prop_assert!(!o.enumeration_truncated);
        prop_assert!(candidate_sets(&o).contains(&truth), "truth {:?} missing for {}; near misses {:?}", truth, case_text(&g, &[]), o.near_misses);
    }

    /// Setting evidence aside never removes a candidate (monotonicity): dropping bands
    /// from the case keeps every candidate of the full case.
    #[test]
    fn removing_evidence_never_removes_a_candidate(
        skeleton in 1u32..5,
        in_chain in proptest::collection::vec(0usize..6, 0..2),
        ends in proptest::collection::vec(0usize..6, 0..2),
        drop in proptest::collection::vec(any::<bool>(), 8),
    ) {
        let Some(g) = generate(skeleton, &in_chain, &ends, Some("film")) else { return Ok(()); };
        let full = solve_text(&case_text(&g, &[]));
        let c = case(&case_text(&g, &[]));
        let set_aside: BTreeSet<EvidenceItem> = drop.iter().enumerate().filter(|(i, d)| **d && *i < g.bands.len()).map(|(i, _)| EvidenceItem::Band(i)).collect();
        let cat = small_catalogue();
        let options = SolveOptions::default();
        let problem = Problem::new(&c, &cat, &options, &set_aside);
        let mut reduced: Vec<std::collections::BTreeMap<String, u32>> = Vec::new();
        enumerate::walk(&problem, &problem.allowed_groups(), |counts, sk| {
            if evaluate::evaluate(&problem, counts, sk, false).is_empty() {
                reduced.push(explain::group_map(&problem, counts));
            }
            Flow::Continue
        });
        for cand in candidate_sets(&full) {
            prop_assert!(reduced.contains(&cand), "{:?} lost when setting aside {:?}", cand, set_aside);
        }
    }
}

#[test]
fn the_generator_builds_the_molecules_it_claims() {
    // 4-hydroxybutan-2-one: CH3–CO–CH2–CH2OH, C4H8O2 (the test catalogue's alcohol holds
    // O and H only, so the carbinol carbon is a skeleton carbon).
    let g = generate(3, &[1], &[0], None).unwrap_or_else(|| panic!("generated"));
    assert_eq!(g.formula, "C4H8O2");
    // 4-methylbenzyl chloride: CH3–C6H4–CH2Cl, C8H9Cl.
    let g = generate(2, &[4], &[2], None).unwrap_or_else(|| panic!("generated"));
    assert_eq!(g.formula, "C8H9Cl1");
}

#[test]
fn a_catalogue_past_512_concrete_groups_is_not_cut() {
    // The group bit sets grow: a group placed after 600 others is still enumerated.
    let mut cat = small_catalogue();
    let chloro = cat.group("chloro").cloned().expect("testkit has chloro");
    let mut late_ketone = cat.group("ketone").cloned().expect("testkit has ketone");
    for k in 0..600 {
        let mut pad = chloro.clone();
        pad.id = format!("padding_{k}");
        cat.groups.push(pad);
    }
    late_ketone.id = "ketone_late".into();
    cat.groups.push(late_ketone);
    let c = case(
        "formula: C3H6O\nir:\n  technique: film\n  bands:\n    - { at: 2965, strength: medium }\n    - { at: 1715, strength: strong }\n",
    );
    let options = SolveOptions::default();
    let problem = Problem::new(&c, &cat, &options, &BTreeSet::new());
    let late = problem
        .groups
        .iter()
        .position(|g| g.group.id == "ketone_late")
        .expect("the late group is in the problem");
    assert!(late > 512, "index {late}");
    let o = solve(&c, &cat, &options);
    assert!(
        o.candidates
            .iter()
            .any(|cand| cand.groups.contains_key("ketone_late")),
        "{:?}",
        families(&o)
    );
}

#[test]
fn the_free_composition_search_reports_its_limit_instead_of_answering_no() {
    // The formula set aside: the search must find groups for the 1715 and 2230 bands.
    // With one step it cannot decide and must say so; with its normal budget it decides.
    let c = case(
        "formula: C8H7NO\nir:\n  technique: film\n  bands:\n    - { at: 2230, strength: medium }\n    - { at: 1715, strength: strong }\n",
    );
    let cat = small_catalogue();
    let options = SolveOptions::default();
    let problem = Problem::new(&c, &cat, &options, &BTreeSet::from([EvidenceItem::Formula]));
    assert!(problem.formula.is_none());
    match conflicts::free_composition_feasible_within(&problem, 1) {
        conflicts::Consistency::Undecided(why) => {
            assert!(why.contains("stopped after 1 search steps"), "{why}")
        }
        other => panic!("expected a reported limit, got {other:?}"),
    }
    assert_eq!(
        conflicts::free_composition_feasible(&problem),
        conflicts::Consistency::Consistent
    );
}
