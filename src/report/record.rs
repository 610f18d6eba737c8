//! The record of a solved case (`solve --record`) and the comparison a review makes
//! (`review`): the conclusion reached, quiddity's version, the rules digest and the
//! SHA-256 of every input, so that a second analyst can tell whether recomputing today
//! gives the same answer from the same bytes — and if not, exactly what moved.

use super::view::{round, InputFile, InputRole, QUIDDITY_VERSION};
use super::wording;
use crate::engine::{Outcome, SolveOptions};
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// The record layout's name and version.
pub const RECORD_FORMAT: &str = "quiddity-record/1";

/// How many leading candidates a record keeps.
pub const RECORDED_TOP: usize = 5;

/// Score differences below this are rounding, not change.
pub const SCORE_EPSILON: f64 = 1e-3;

/// A record file's contents.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Record {
    /// Always [`RECORD_FORMAT`].
    pub record_format: String,
    /// Case identifier.
    pub case: Option<String>,
    /// quiddity's version when recorded.
    pub quiddity_version: String,
    /// Rules catalogue digest when recorded.
    pub rules_digest: String,
    /// Band tolerance used, cm⁻¹.
    pub tolerance_cm1: f64,
    /// Candidates listed at most.
    pub max_candidates: usize,
    /// Consistent combinations collected at most.
    pub enumeration_limit: usize,
    /// Every input with its digest: the case file (by file name) first, then spectra as
    /// written in the case.
    pub inputs: Vec<InputFile>,
    /// What was concluded.
    pub conclusion: RecordedConclusion,
}

/// The conclusion kept in a record.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RecordedConclusion {
    /// Consistent combinations found.
    pub n_consistent: usize,
    /// The leading candidates, best first.
    pub top: Vec<RecordedCandidate>,
    /// Conflicts found (non-zero only when no candidate survives).
    pub n_conflicts: usize,
}

/// One leading candidate in a record.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RecordedCandidate {
    /// 1-based rank.
    pub rank: usize,
    /// Group counts.
    pub groups: BTreeMap<String, u32>,
    /// Score, rounded to 4 decimals.
    pub score: f64,
}

impl Record {
    /// The record of `outcome` made from `inputs`.
    pub fn new(outcome: &Outcome, inputs: Vec<InputFile>, options: &SolveOptions) -> Record {
        Record {
            record_format: RECORD_FORMAT.to_owned(),
            case: outcome.case.clone(),
            quiddity_version: QUIDDITY_VERSION.to_owned(),
            rules_digest: outcome.rules_digest.clone(),
            tolerance_cm1: outcome.tolerance_cm1,
            max_candidates: options.max_candidates,
            enumeration_limit: options.enumeration_limit,
            inputs,
            conclusion: RecordedConclusion {
                n_consistent: outcome.n_consistent,
                top: outcome
                    .candidates
                    .iter()
                    .take(RECORDED_TOP)
                    .map(|c| RecordedCandidate {
                        rank: c.rank,
                        groups: c.groups.clone(),
                        score: round(c.score, 4),
                    })
                    .collect(),
                n_conflicts: outcome.conflicts.len(),
            },
        }
    }

    /// The record as pretty JSON with a final newline.
    pub fn to_json(&self) -> String {
        let mut s = serde_json::to_string_pretty(self).unwrap_or_default();
        s.push('\n');
        s
    }

    /// Parses a record file's text.
    pub fn from_json(text: &str, origin: &str) -> Result<Record, Box<crate::diag::Diagnostic>> {
        let record: Record = serde_json::from_str(text).map_err(|e| {
            Box::new(
                crate::diag::Diagnostic::error(origin, format!("not a quiddity record: {e}"))
                    .at_position(crate::diag::Position {
                        line: e.line().saturating_sub(1),
                        column: e.column().saturating_sub(1),
                    }),
            )
        })?;
        if record.record_format != RECORD_FORMAT {
            return Err(Box::new(crate::diag::Diagnostic::error(
                origin,
                format!(
                    "record format \"{}\" is not \"{RECORD_FORMAT}\"",
                    record.record_format
                ),
            )));
        }
        Ok(record)
    }
}

/// How one rank of the recorded conclusion moved.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum RankMove<'a> {
    /// Another candidate holds the rank: recorded, now.
    Other(&'a BTreeMap<String, u32>, &'a BTreeMap<String, u32>),
    /// The same candidate with another score: groups, recorded, now.
    Rescored(&'a BTreeMap<String, u32>, f64, f64),
    /// The rank is empty now.
    Gone(&'a BTreeMap<String, u32>),
    /// The rank was empty when recorded.
    New(&'a BTreeMap<String, u32>),
}

/// One difference a review found.
#[derive(Clone, Debug, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Difference {
    /// An input file's bytes differ from those recorded.
    InputChanged {
        /// What the file is to the case.
        role: InputRole,
        /// The file.
        path: String,
        /// Digest recorded.
        recorded: String,
        /// Digest now.
        now: String,
    },
    /// An input recorded is no longer named, or a new one is.
    InputSetChanged {
        /// What the file is to the case.
        role: InputRole,
        /// The file.
        path: String,
        /// Which way the set changed.
        what: SetChange,
    },
    /// The rules catalogue differs.
    RulesChanged {
        /// Digest recorded.
        recorded: String,
        /// Digest now.
        now: String,
    },
    /// The conclusion reached differs.
    ConclusionChanged {
        /// What moved, in words.
        detail: String,
    },
    /// The analyst's accepted candidate is not consistent with the evidence now.
    AnalystConclusionDiffers {
        /// What is wrong, in words.
        detail: String,
    },
}

/// Which way the set of inputs changed (serialised as the words of earlier versions).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub enum SetChange {
    /// Recorded, but the case no longer names it.
    #[serde(rename = "no longer named by the case")]
    NoLongerNamed,
    /// Named by the case, but not in the record.
    #[serde(rename = "not in the record")]
    NotInRecord,
}

impl std::fmt::Display for Difference {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&wording::difference(self))
    }
}

/// What a review found: the differences (exit 1 when any) and notes that are not
/// differences (a new quiddity version with the same answer, the accepted candidate
/// ranked below first).
#[derive(Clone, Debug, Default, PartialEq, Serialize)]
pub struct ReviewFindings {
    /// Differences, inputs first, then rules, then conclusions.
    pub differences: Vec<Difference>,
    /// Observations that are not differences.
    pub notes: Vec<String>,
}

impl ReviewFindings {
    /// True when nothing differs.
    pub fn agrees(&self) -> bool {
        self.differences.is_empty()
    }
}

/// Compares the recomputed record `now` with the `recorded` one, and the analyst's
/// accepted candidate (if any) with the recomputed outcome.
pub fn compare(
    recorded: Option<&Record>,
    now: &Record,
    outcome: &Outcome,
    accepted: Option<&BTreeMap<String, u32>>,
) -> ReviewFindings {
    let mut found = ReviewFindings::default();
    if let Some(rec) = recorded {
        compare_inputs(rec, now, &mut found);
        if rec.rules_digest != now.rules_digest {
            found.differences.push(Difference::RulesChanged {
                recorded: rec.rules_digest.clone(),
                now: now.rules_digest.clone(),
            });
        }
        compare_conclusions(&rec.conclusion, &now.conclusion, &mut found);
        if rec.quiddity_version != now.quiddity_version {
            found.notes.push(wording::recomputed_with(
                &rec.quiddity_version,
                &now.quiddity_version,
            ));
        }
    }
    if let Some(accepted) = accepted.filter(|a| !a.is_empty()) {
        match outcome.candidates.iter().find(|c| &c.groups == accepted) {
            Some(c) if c.rank == 1 => {}
            Some(c) => found.notes.push(wording::accepted_ranked(accepted, c.rank)),
            None => {
                let detail = if outcome.list_truncated || outcome.enumeration_truncated {
                    wording::accepted_not_listed(accepted, outcome.candidates.len())
                } else {
                    wording::accepted_inconsistent(
                        accepted,
                        outcome.candidates.first().map(|c| &c.groups),
                    )
                };
                found
                    .differences
                    .push(Difference::AnalystConclusionDiffers { detail });
            }
        }
    }
    found
}

fn compare_inputs(rec: &Record, now: &Record, found: &mut ReviewFindings) {
    for r in &rec.inputs {
        match now
            .inputs
            .iter()
            .find(|n| n.role == r.role && (n.path == r.path || r.role == InputRole::Case))
        {
            Some(n) if n.sha256 != r.sha256 => found.differences.push(Difference::InputChanged {
                role: r.role,
                path: n.path.clone(),
                recorded: r.sha256.clone(),
                now: n.sha256.clone(),
            }),
            Some(_) => {}
            None => found.differences.push(Difference::InputSetChanged {
                role: r.role,
                path: r.path.clone(),
                what: SetChange::NoLongerNamed,
            }),
        }
    }
    for n in &now.inputs {
        if n.role != InputRole::Case
            && !rec
                .inputs
                .iter()
                .any(|r| r.role == n.role && r.path == n.path)
        {
            found.differences.push(Difference::InputSetChanged {
                role: n.role,
                path: n.path.clone(),
                what: SetChange::NotInRecord,
            });
        }
    }
}

fn compare_conclusions(
    rec: &RecordedConclusion,
    now: &RecordedConclusion,
    found: &mut ReviewFindings,
) {
    let mut push = |detail: String| {
        found
            .differences
            .push(Difference::ConclusionChanged { detail });
    };
    if rec.n_consistent != now.n_consistent {
        push(wording::count_moved(
            "consistent combination(s)",
            rec.n_consistent,
            now.n_consistent,
        ));
    }
    if rec.n_conflicts != now.n_conflicts {
        push(wording::count_moved(
            "conflict(s)",
            rec.n_conflicts,
            now.n_conflicts,
        ));
    }
    let n = rec.top.len().max(now.top.len());
    for i in 0..n {
        let moved = match (rec.top.get(i), now.top.get(i)) {
            (Some(a), Some(b)) if a.groups != b.groups => {
                Some(RankMove::Other(&a.groups, &b.groups))
            }
            (Some(a), Some(b)) if (a.score - b.score).abs() > SCORE_EPSILON => {
                Some(RankMove::Rescored(&a.groups, a.score, b.score))
            }
            (Some(a), None) => Some(RankMove::Gone(&a.groups)),
            (None, Some(b)) => Some(RankMove::New(&b.groups)),
            _ => None,
        };
        if let Some(m) = moved {
            push(wording::rank_moved(i + 1, m));
        }
    }
}
