//! Every sentence quiddity shows about an outcome, in one place: the terminal
//! (`solve`'s text), the text, Markdown and HTML reports and the plot's labels call these
//! functions, so they say the same thing. Renderers add layout, alignment and escaping
//! only; they never compose a sentence of their own nor branch on one.

use crate::engine::{
    BondFailure, CheckBasis, DiscriminatingCheck, EvidenceCheck, Explanation, Reason, ReasonDetail,
    RelationFailure,
};
use crate::rules::{Ionic, MsClueKind};
use std::collections::BTreeMap;

/// The first line of a conflict section.
pub const CONFLICT: &str = "these evidence items cannot hold together";

/// What the candidates section says when there is none.
pub const NO_CANDIDATE: &str = "no consistent candidate (see the conflicts below)";

/// The head of the list of bands the leading candidate excused or reshaped.
pub const TREATMENTS: &str = "how the leading candidate took bands it excused or reshaped";

/// The head of the list of rules behind the leading candidate's assignments.
pub const ASSIGNMENT_RULES: &str = "rules behind the leading candidate's assignments";

/// What a report says without IR bands.
pub const NO_BANDS: &str = "no IR bands";

/// "N consistent combination(s)", with the listing and enumeration limits when they
/// applied.
pub fn count(
    n_consistent: usize,
    listed: usize,
    list_truncated: bool,
    enumeration_truncated: bool,
) -> String {
    let mut out = format!("{n_consistent} consistent combination(s)");
    if list_truncated {
        out.push_str(&format!(", the first {listed} listed"));
    }
    if enumeration_truncated {
        out.push_str("; the enumeration limit was reached, more may exist");
    }
    out
}

/// A band no rule of a candidate explains: loud when it had to be explained.
pub fn unexplained(demanded: bool) -> &'static str {
    if demanded {
        "UNEXPLAINED"
    } else {
        "unexplained (not demanded)"
    }
}

/// The explanation of a band in one line: `group     ketone — C=O stretch (file:line)`,
/// the kind padded to `kind_width`.
pub fn explanation(e: &Explanation, kind_width: usize) -> String {
    let place = if e.defined_at.is_empty() {
        String::new()
    } else {
        format!(" ({})", e.defined_at)
    };
    format!(
        "{:<kind_width$} {} — {}{place}",
        e.kind.word(),
        e.id,
        e.rule
    )
}

/// A band cell of the assignment table: `id (kind)`.
pub fn cell(id: &str, kind: &str) -> String {
    format!("{id} ({kind})")
}

/// The rule behind a band cell: `label (file:line)`.
pub fn cell_rule(e: &Explanation) -> String {
    format!("{} ({})", e.rule, e.defined_at)
}

/// A band the leading candidate excused or reshaped:
/// `2962 cm⁻¹ (medium file:12:7): how it was taken`.
pub fn treatment(at: f64, strength: &str, place: &str, how: &str) -> String {
    format!("{at:.0} cm⁻¹ ({strength} {place}): {how}")
}

/// The verdict word of a formula-level check.
pub fn agreement(agrees: bool) -> &'static str {
    if agrees {
        "agrees"
    } else {
        "DISAGREES"
    }
}

/// A formula-level check in one line, after its verdict word: `molecular_ion: detail`.
pub fn evidence_check(c: &EvidenceCheck) -> String {
    format!("{}: {}", c.item.word(), c.detail)
}

/// Evidence in favour of a candidate.
pub fn supporting(text: &str) -> String {
    format!("for: {text}")
}

/// Evidence against a candidate.
pub fn weakening(text: &str) -> String {
    format!("against: {text}")
}

/// A near miss: its groups and what it lacked.
pub fn near_miss(groups: &BTreeMap<String, u32>, lacked: &[Reason]) -> String {
    let lacked: Vec<String> = lacked.iter().map(reason).collect();
    format!("{}: {}", groups_text(groups), lacked.join("; "))
}

/// A reason in words: the engine's sentence, or the sentence of its typed statement.
pub fn reason(r: &Reason) -> String {
    match &r.detail {
        Some(ReasonDetail::Relation(f)) => relation(f),
        Some(ReasonDetail::Bonds(f)) => bonds(f),
        None => r.text.clone(),
    }
}

/// A relation between groups that does not hold.
pub fn relation(f: &RelationFailure) -> String {
    match f {
        RelationFailure::Excludes { group, other } => {
            format!("{group} and {other} exclude each other")
        }
        RelationFailure::RequiresAny { group, any_of } => {
            format!("{group} requires one of: {}", any_of.join(", "))
        }
        RelationFailure::SaltSites {
            side,
            fewest,
            most,
            held,
        } => {
            let want = if fewest == most {
                format!("{fewest}")
            } else {
                format!("{fewest} to {most}")
            };
            let partner = match side {
                Ionic::Cation => "acid counter-ions pair",
                Ionic::Anion => "metal counter-ions pair",
            };
            format!(
                "the {partner} {want} {} group(s), the combination holds {held}",
                side.word()
            )
        }
    }
}

/// A bond condition that fails, `bonds: …`.
pub fn bonds(f: &BondFailure) -> String {
    let why = match f {
        BondFailure::RingAtoms { have } => format!(
            "a ring needs at least three atoms that bond twice; the candidate has {have}"
        ),
        BondFailure::GroupHydrogens { held, formula } => {
            format!("the groups hold {held} H but the formula has {formula}")
        }
        BondFailure::OpenPositions { free, positions } => format!(
            "{free} H must sit on open positions but only {positions} positions may carry H"
        ),
        BondFailure::OddEnds => "the hydrogen count leaves an odd number of bond ends".to_owned(),
        BondFailure::NoHeavyAtoms => "no atoms besides hydrogen".to_owned(),
        BondFailure::TooFewBonds { parts, bonds } => format!(
            "{parts} parts need at least {} bonds to form one molecule, the hydrogen count leaves {bonds}",
            parts.saturating_sub(1)
        ),
        BondFailure::TooManyBonds { parts, bonds } => format!(
            "{bonds} bonds between {parts} parts would need multiple bonds outside the groups"
        ),
        BondFailure::Unpaired {
            hetero,
            carbon,
            bonds,
        } => format!(
            "the open bonds cannot be paired: {hetero} heteroatom-borne and {carbon} carbon-borne ends for {bonds} bonds (heteroatoms bond only to carbon between groups)"
        ),
        BondFailure::NoSaturatedCarbon => {
            "a band needs sp3 C–H but the candidate has no saturated carbon".to_owned()
        }
        BondFailure::NoSp2Hydrogen => {
            "a band needs an sp2 C–H but no sp2 carbon of the candidate can carry H".to_owned()
        }
        BondFailure::DistinctAtoms {
            group,
            need,
            outside,
        } => format!(
            "{group} needs {need} bonds to distinct atoms outside it, the candidate has {outside}"
        ),
        BondFailure::DistinctCarbons {
            group,
            need,
            offered,
        } => format!(
            "{group} needs {need} distinct carbons to bond its heteroatom to, the candidate offers {offered}"
        ),
    };
    format!("bonds: {why}")
}

/// Why the items of a conflict cannot hold together.
pub fn because(why: &str) -> String {
    format!("because {why}")
}

/// A test of the conflict search that stopped at its limit.
pub fn search_limit(limit: &str) -> String {
    format!("search limit: {limit} (the set may not be minimal)")
}

/// A usual cause of a conflict, to check.
pub fn check_cause(cause: &str) -> String {
    format!("check: {cause}")
}

/// The rule behind a rule-out, after its reason: ` [rule id: label (file:line)]`.
pub fn ruled_out_rule(rule: Option<&str>) -> String {
    rule.map(|r| format!(" [rule {r}]")).unwrap_or_default()
}

/// How many groups the terminal leaves out because the formula cannot hold them.
pub fn composition_left_out(n: usize) -> String {
    format!("({n} more groups cannot fit the formula; see --json)")
}

/// An observation that would separate two candidates, with its kind and the rank it
/// favours (`#` is the caller's: Markdown escapes it).
pub fn discriminating(d: &DiscriminatingCheck, hash: &str) -> String {
    format!(
        "{hash}{} vs {hash}{} ({}, favours {hash}{}): {}",
        d.between[0],
        d.between[1],
        d.kind.word(),
        d.favours,
        observation(d)
    )
}

/// What a discriminating check asks to look for.
pub fn observation(d: &DiscriminatingCheck) -> String {
    let (a, b, group) = (d.favours, d.against, &d.group);
    match &d.basis {
        CheckBasis::Band { label, lo, hi } => format!(
            "IR: {label} at {lo:.0}–{hi:.0} cm⁻¹ expected for {group} (rank {a}), not for rank {b}"
        ),
        CheckBasis::Ms { label, clue } => {
            let what = match clue {
                MsClueKind::Ion { mz } => format!("m/z {mz}"),
                MsClueKind::Loss { mass } => format!("loss of {mass} u from M"),
            };
            format!("MS: {what} ({label}) supports {group} (rank {a})")
        }
        CheckBasis::Catalogue { text } => {
            format!("{text} — expected for rank {a}, not rank {b}")
        }
    }
}

/// The label of the cautions line.
pub const CAUTION: &str = "caution";

/// The cautions in one run of text, `; ` between them.
pub fn cautions(cautions: &[String]) -> String {
    cautions.join("; ")
}

/// The cautions in one sentence, as a report's head and the terminal's foot show them.
pub fn cautions_sentence(list: &[String]) -> String {
    format!("{CAUTION}: {}.", cautions(list))
}

/// A DBE, or `not defined`.
pub fn dbe(d: Option<f64>) -> String {
    d.map_or("not defined".to_owned(), |d| format!("{d}"))
}

/// The IR evidence in one line.
pub fn ir_evidence(
    technique: Option<&str>,
    window: (f64, f64),
    n_written: usize,
    n_picked: usize,
) -> String {
    format!(
        "technique {}, window {:.0}–{:.0} cm⁻¹, {n_written} band(s) written, {n_picked} picked from the spectrum",
        technique.unwrap_or("not stated"),
        window.0,
        window.1
    )
}

/// The MS evidence of a case, one line per item.
pub fn ms_evidence(m: &crate::case::MsEvidence) -> Vec<String> {
    let mut ms = Vec::new();
    if let Some((mz, _)) = &m.molecular_ion {
        ms.push(format!(
            "molecular ion m/z {mz} as {} (tolerance {} ppm when accurate)",
            m.ion.canonical(),
            m.ppm
        ));
    }
    if let Some((v, _)) = &m.m_plus_1 {
        ms.push(format!("M+1 {v} % of M"));
    }
    if let Some((v, _)) = &m.m_plus_2 {
        ms.push(format!("M+2 {v} % of M"));
    }
    if !m.fragments.is_empty() {
        let list: Vec<String> = m
            .fragments
            .iter()
            .map(|((mz, rel), _)| format!("{mz} ({rel})"))
            .collect();
        ms.push(format!(
            "fragments m/z (relative intensity): {}",
            list.join(", ")
        ));
    }
    ms
}

/// How the analyst's accepted candidate stands against the outcome.
pub fn standing(accepted_empty: bool, matches_rank: Option<usize>, list_cut: bool) -> String {
    if accepted_empty {
        return "no candidate accepted yet".to_owned();
    }
    match matches_rank {
        Some(1) => "the accepted candidate is the leading candidate".to_owned(),
        Some(r) => format!("the accepted candidate is consistent, ranked {r}"),
        None if list_cut => {
            "the accepted candidate is not among the listed candidates (the list is cut)".to_owned()
        }
        None => "the accepted candidate is not among the consistent candidates".to_owned(),
    }
}

/// The salt or hydrate section as lines.
pub fn salt_lines(salt: &crate::engine::salt::SaltOutcome) -> Vec<String> {
    let dbe = |d: Option<f64>| d.map_or("not defined".to_owned(), |d| format!("{d}"));
    let mut out = vec![
        format!(
            "organic part deduced: {}{} (DBE {}); stated formula {} (DBE {})",
            if salt.organic_count > 1 {
                format!("{} × ", salt.organic_count)
            } else {
                String::new()
            },
            salt.organic_formula,
            dbe(salt.organic_dbe),
            salt.stated_formula,
            dbe(salt.stated_dbe)
        ),
        format!(
            "read as: {}",
            crate::engine::salt::reading_word(salt.reading)
        ),
    ];
    let parts: Vec<String> = salt
        .parts
        .iter()
        .map(|p| {
            use crate::engine::salt::PartRole;
            let role = match p.role {
                PartRole::Acid => "counter-ion from the acid",
                PartRole::Metal => "counter-ion (metal cation)",
                PartRole::Water => "water of crystallisation",
                PartRole::Other => "other part, in the atom balance only",
            };
            format!("{} {}: {role}", p.count, p.formula)
        })
        .collect();
    if !parts.is_empty() {
        out.push(format!("accounted for: {}", parts.join("; ")));
    }
    out.extend(salt.statements.iter().cloned());
    out.extend(salt.checks.iter().cloned());
    out
}

/// The mixture section as lines.
pub fn mixture_lines(m: &crate::engine::mixture::MixtureOutcome) -> Vec<String> {
    let at = |v: &[f64]| {
        v.iter()
            .map(|a| format!("{a:.0}"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let mut out = vec![format!("considered because {}", m.trigger)];
    if let Some(c) = &m.component {
        out.push(format!(
            "conclusion: a mixture of {} ({}) and the compound deduced below",
            c.name, c.place
        ));
        out.push(match (c.factor, c.absorbance_share) {
            (Some(f), Some(s)) => format!(
                "fraction: {:.0} % of the integrated absorbance (reference factor {f}; a spectral share, not a mass fraction)",
                s * 100.0
            ),
            _ => "fraction: not estimated (band lists only)".to_owned(),
        });
        out.push(format!(
            "bands attributed to it: {}",
            at(&c.attributed_bands)
        ));
        out.push(format!("residual bands deduced: {}", at(&m.residual_bands)));
    }
    if !m.unexplained_bands.is_empty() && m.component.is_none() {
        out.push(format!(
            "a second compound would have to explain: {} cm⁻¹",
            at(&m.unexplained_bands)
        ));
    }
    out.extend(m.evidence.iter().map(|e| format!("evidence: {e}")));
    out.extend(m.tried.iter().map(|t| format!("tried: {t}")));
    out
}

/// A candidate in words: its groups, prefixed with its formula when the formula came from
/// the molecular ion (`C4H8O2: ester_saturated`).
pub fn candidate_text(c: &crate::engine::Candidate) -> String {
    match &c.formula {
        Some(f) => format!("{f}: {}", groups_text(&c.groups)),
        None => groups_text(&c.groups),
    }
}

/// Group counts in words: `2 × alkene + ketone`.
pub fn groups_text(groups: &BTreeMap<String, u32>) -> String {
    if groups.is_empty() {
        return "(hydrocarbon skeleton only)".into();
    }
    crate::engine::group_counts_notation(groups)
}

/// A sentence of this module at the head of a paragraph or a heading: its first letter
/// upper case.
pub fn capitalised(text: &str) -> String {
    let mut c = text.chars();
    c.next()
        .map(|first| first.to_uppercase().chain(c).collect())
        .unwrap_or_default()
}

/// The head of the formulas proposed from the molecular ion.
pub const FORMULA_LEADS: &str = "formulas from the molecular ion (no formula stated), each solved";

/// How candidates of different formulas are compared.
pub const FORMULA_LEADS_COMPARED: &str =
    "candidates of different formulas are compared by their candidate score alone; \
     the MS score only chose which formulas were solved and breaks ties";

/// How many constitutional isomers a candidate has.
pub fn isomer_count(n: usize) -> String {
    format!(
        "{n} constitutional isomer{}, best IR feature score first",
        if n == 1 { "" } else { "s" }
    )
}

/// The isomers left out of a short list.
pub fn more_isomers(n: usize) -> String {
    format!("... {n} more (see --json)")
}

/// "N reference(s)" of a library.
pub fn references(n: usize) -> String {
    format!("{n} reference(s)")
}

/// How many library references were compared, and the unknown's phase.
pub fn library_compared(n_compared: usize, phase: &str) -> String {
    format!("{n_compared} compared; unknown's phase {phase}")
}

/// A library hit region by region: `fingerprint: agrees (0.91); …` (regions not compared
/// left out).
pub fn regions(h: &crate::verdict::CheckedHit) -> String {
    use crate::library::Agreement;
    h.regions
        .iter()
        .filter(|r| r.agreement != Agreement::NotCompared)
        .map(|r| match (r.agreement, r.similarity) {
            (Agreement::BothEmpty, _) | (_, None) => {
                format!("{}: {}", r.region, r.agreement.words())
            }
            (a, Some(s)) => format!("{}: {} ({s:.2})", r.region, a.words()),
        })
        .collect::<Vec<_>>()
        .join("; ")
}

/// The range a library hit was compared over, with its regions.
pub fn compared_over(h: &crate::verdict::CheckedHit) -> String {
    format!(
        "compared over {:.0}–{:.0} cm⁻¹: {}",
        h.compared_cm1.0,
        h.compared_cm1.1,
        regions(h)
    )
}

/// The first twelve characters of a digest, as reviews show it.
fn short(digest: &str) -> &str {
    digest.get(..12).unwrap_or(digest)
}

/// One difference a review found.
pub fn difference(d: &crate::report::record::Difference) -> String {
    use crate::report::record::{Difference, SetChange};
    use crate::report::view::InputRole;
    match d {
        Difference::InputChanged {
            role: InputRole::Library,
            path,
            recorded,
            now,
        } => format!(
            "library {path} changed since recording: references added, removed or changed (library digest {} recorded, {} now)",
            short(recorded),
            short(now)
        ),
        Difference::InputChanged {
            role,
            path,
            recorded,
            now,
        } => format!(
            "{role} file {path} changed since recording (sha256 {} recorded, {} now)",
            short(recorded),
            short(now)
        ),
        Difference::InputSetChanged { role, path, what } => {
            let what = match what {
                SetChange::NoLongerNamed => "no longer named by the case",
                SetChange::NotInRecord => "not in the record",
            };
            format!("{role} file {path}: {what}")
        }
        Difference::RulesChanged { recorded, now } => format!(
            "rules catalogue changed since recording (digest {} recorded, {} now)",
            short(recorded),
            short(now)
        ),
        Difference::ConclusionChanged { detail } => format!("conclusion changed: {detail}"),
        Difference::AnalystConclusionDiffers { detail } => {
            format!("analyst's conclusion: {detail}")
        }
    }
}

/// A review's note that the version moved.
pub fn recomputed_with(recorded: &str, now: &str) -> String {
    format!("recorded with quiddity {recorded}, recomputed with {now}")
}

/// A review's note that the accepted candidate is consistent but not first.
pub fn accepted_ranked(accepted: &BTreeMap<String, u32>, rank: usize) -> String {
    format!(
        "the accepted candidate {} is consistent but ranked {rank}",
        groups_text(accepted)
    )
}

/// The accepted candidate is beyond the listed candidates.
pub fn accepted_not_listed(accepted: &BTreeMap<String, u32>, listed: usize) -> String {
    format!(
        "the accepted candidate {} is not among the {listed} listed candidates (raise --max to look further)",
        groups_text(accepted)
    )
}

/// The accepted candidate is not consistent with the evidence (`leading`: the best
/// candidate now, if any).
pub fn accepted_inconsistent(
    accepted: &BTreeMap<String, u32>,
    leading: Option<&BTreeMap<String, u32>>,
) -> String {
    let lead = leading.map_or_else(
        || " (no candidate is consistent)".to_owned(),
        |g| format!(" (the leading candidate is {})", groups_text(g)),
    );
    format!(
        "the accepted candidate {} is not consistent with the evidence{lead}",
        groups_text(accepted)
    )
}

/// A count of the conclusion that moved: `3 conflict(s) recorded, 1 now`.
pub fn count_moved(what: &str, recorded: usize, now: usize) -> String {
    format!("{recorded} {what} recorded, {now} now")
}

/// How one rank (1-based) of the recorded conclusion moved.
pub fn rank_moved(rank: usize, m: crate::report::record::RankMove<'_>) -> String {
    use crate::report::record::RankMove;
    match m {
        RankMove::Other(a, b) => {
            format!("rank {rank} was {}, now {}", groups_text(a), groups_text(b))
        }
        RankMove::Rescored(g, a, b) => format!(
            "rank {rank} ({}) scored {a} when recorded, {b} now",
            groups_text(g)
        ),
        RankMove::Gone(g) => format!("rank {rank} was {}, now absent", groups_text(g)),
        RankMove::New(g) => format!("rank {rank} is new: {}", groups_text(g)),
    }
}

/// The first line of a review: whether it agrees, and with what (`record`: the record
/// file, when there is one).
pub fn review_headline(case: &str, record: Option<&str>, differences: usize) -> String {
    let against = record.map_or_else(
        || "the analyst's conclusion (no record)".to_owned(),
        |r| format!("the record {r}"),
    );
    if differences == 0 {
        format!("review of {case}: agrees with {against}")
    } else {
        format!("review of {case}: {differences} difference(s) from {against}")
    }
}
