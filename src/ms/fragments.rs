//! Fragment evidence: characteristic fragment ions and neutral losses from the molecular
//! ion, matched against the MS clues of the rules catalogue.
//!
//! A clue `Ion { mz }` matches an observed fragment within `tolerance` u of `mz`. A clue
//! `Loss { mass }` matches an observed fragment at (molecular-ion m/z − mass) within
//! `tolerance` u; losses are taken from the molecular ion as observed (M+. in EI, the
//! adduct ion otherwise), so no ion-type correction is needed. Both are nominal-mass
//! matches (EI fragment lists are integer m/z; common practice tolerance 0.5 u).
//!
//! A match is soft evidence: it supports the group that owns the clue; a clue that does
//! not match rules nothing out (a fragment may be weak or absent). Matches carry the
//! clue's rule place (`defined_at`) and source so that the engine's explanation can cite
//! them, and the observed fragment with its relative intensity.

use crate::rules::{Catalogue, MsClue, MsClueKind};

/// Default matching tolerance for nominal fragment m/z, u (common practice).
pub const DEFAULT_FRAGMENT_TOLERANCE: f64 = 0.5;

/// One observed fragment ion.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize)]
pub struct ObservedFragment {
    /// m/z.
    pub mz: f64,
    /// Intensity relative to the base peak (100).
    pub relative_intensity: f64,
}

/// One clue that the observed fragments bear out.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct FragmentMatch<'a> {
    /// The group whose clue it is.
    pub group_id: &'a str,
    /// The clue.
    pub clue: &'a MsClue,
    /// The m/z the clue predicts (the ion, or molecular ion − loss).
    pub expected_mz: f64,
    /// The observed fragment that matched.
    pub observed: ObservedFragment,
    /// observed − expected, u.
    pub difference: f64,
}

/// Matches `clues` (group id, clue) against `fragments`.
///
/// `molecular_ion_mz` is needed for loss clues (they are skipped without it).
/// For each clue, every fragment within `tolerance` u is reported (best intensity
/// first); results are ordered by group id, then by clue order.
pub fn match_fragments<'a>(
    clues: &[(&'a str, &'a MsClue)],
    molecular_ion_mz: Option<f64>,
    fragments: &[ObservedFragment],
    tolerance: f64,
) -> Vec<FragmentMatch<'a>> {
    let mut out = Vec::new();
    for (group_id, clue) in clues {
        let expected_mz = match clue.kind {
            MsClueKind::Ion { mz } => mz,
            MsClueKind::Loss { mass } => match molecular_ion_mz {
                Some(m) => m - mass,
                None => continue,
            },
        };
        if expected_mz <= 0.0 {
            continue;
        }
        let mut hits: Vec<FragmentMatch<'a>> = fragments
            .iter()
            .filter(|f| (f.mz - expected_mz).abs() <= tolerance)
            .map(|f| FragmentMatch {
                group_id,
                clue,
                expected_mz,
                observed: *f,
                difference: f.mz - expected_mz,
            })
            .collect();
        hits.sort_by(|a, b| {
            b.observed
                .relative_intensity
                .total_cmp(&a.observed.relative_intensity)
        });
        out.extend(hits);
    }
    out.sort_by(|a, b| a.group_id.cmp(b.group_id));
    out
}

/// Every (group id, clue) pair of a catalogue, in catalogue order.
pub fn catalogue_clues(catalogue: &Catalogue) -> Vec<(&str, &MsClue)> {
    catalogue
        .groups
        .iter()
        .flat_map(|g| g.ms.iter().map(move |c| (g.id.as_str(), c)))
        .collect()
}

/// [`match_fragments`] over every MS clue of `catalogue`.
pub fn match_catalogue<'a>(
    catalogue: &'a Catalogue,
    molecular_ion_mz: Option<f64>,
    fragments: &[ObservedFragment],
    tolerance: f64,
) -> Vec<FragmentMatch<'a>> {
    match_fragments(
        &catalogue_clues(catalogue),
        molecular_ion_mz,
        fragments,
        tolerance,
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::rules::RuleRef;

    fn clue(kind: MsClueKind, label: &str) -> MsClue {
        MsClue {
            kind,
            label: label.into(),
            source: "common practice".into(),
            defined_at: RuleRef {
                file: "test.yaml".into(),
                line: 1,
            },
        }
    }

    fn frag(mz: f64, relative_intensity: f64) -> ObservedFragment {
        ObservedFragment {
            mz,
            relative_intensity,
        }
    }

    #[test]
    fn acetophenone_fragments_support_ketone_and_aromatic_ring() {
        // Invented EI list modelled on acetophenone (M+. 120): m/z 105 (benzoyl, loss of
        // CH3, 15 u) and 77 (phenyl) are common-practice textbook ions.
        let loss_methyl = clue(MsClueKind::Loss { mass: 15.0 }, "loss of methyl");
        let benzoyl = clue(MsClueKind::Ion { mz: 105.0 }, "benzoyl ion");
        let phenyl = clue(MsClueKind::Ion { mz: 77.0 }, "phenyl ion");
        let water = clue(MsClueKind::Loss { mass: 18.0 }, "loss of water");
        let clues = [
            ("ketone", &loss_methyl),
            ("ketone", &benzoyl),
            ("aromatic_ring", &phenyl),
            ("alcohol", &water),
        ];
        let observed = [frag(120.0, 28.0), frag(105.0, 100.0), frag(77.0, 62.0)];
        let m = match_fragments(&clues, Some(120.0), &observed, 0.5);
        let found: Vec<(&str, &str, f64)> = m
            .iter()
            .map(|x| (x.group_id, x.clue.label.as_str(), x.observed.mz))
            .collect();
        assert_eq!(
            found,
            vec![
                ("aromatic_ring", "phenyl ion", 77.0),
                ("ketone", "loss of methyl", 105.0),
                ("ketone", "benzoyl ion", 105.0),
            ]
        );
        assert_eq!(m[1].expected_mz, 105.0);
        assert_eq!(m[1].observed.relative_intensity, 100.0);
    }

    #[test]
    fn losses_need_the_molecular_ion_and_tolerance_is_respected() {
        let water = clue(MsClueKind::Loss { mass: 18.0 }, "loss of water");
        let clues = [("alcohol", &water)];
        let observed = [frag(70.0, 40.0)];
        assert!(match_fragments(&clues, None, &observed, 0.5).is_empty());
        assert_eq!(match_fragments(&clues, Some(88.0), &observed, 0.5).len(), 1);
        assert!(match_fragments(&clues, Some(88.7), &observed, 0.5).is_empty());
    }

    #[test]
    fn catalogue_clues_walk_every_group() {
        let catalogue = Catalogue::default();
        assert!(catalogue_clues(&catalogue).is_empty());
    }
}
