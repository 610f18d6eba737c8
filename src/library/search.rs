//! Search: the unknown's signature against every reference's, by a weighted spectral
//! correlation over the range both cover, best first, with the regions where the two
//! agree or disagree.
//!
//! **Similarity.** For the unknown's signature q and a reference's r (see [`super::grid`]:
//! smoothed absorbance scaled to 1 and weighted by region, on the common grid), over the
//! grid points both cover,
//!
//! ```text
//! similarity = Σ q·r / √(Σ q² · Σ r²)
//! ```
//!
//! the cosine of the two weighted absorbance vectors: 1 for the same spectrum whatever
//! its concentration or path length, near 0 for spectra whose bands never overlap. A pair
//! that shares less than [`MIN_OVERLAP_CELLS`] grid points, or less than half of the
//! unknown's range, is not compared. The weights count the fingerprint region twice.
//!
//! **Phase.** An unknown of stated phase is compared with references of the same phase and
//! with those whose phase is not stated (their hits say so); references of the other phase
//! are counted and left out unless [`PhaseRule::Any`] asks for them (their hits say so too).

use super::grid::{grid_x, GridSpectrum, GRID_POINTS};
use super::index::LibraryIndex;
use super::meta::Phase;
use serde::Serialize;

/// Fewest shared grid points for a comparison (1000 cm⁻¹).
pub const MIN_OVERLAP_CELLS: usize = 250;

/// Which references of another phase to compare.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum PhaseRule {
    /// Only the same phase (and references of unknown phase).
    #[default]
    Same,
    /// Every reference; cross-phase hits are marked.
    Any,
}

/// What to search for.
#[derive(Clone, Debug, PartialEq)]
pub struct SearchOptions {
    /// Hits returned at most.
    pub top: usize,
    /// Phase rule.
    pub phase_rule: PhaseRule,
    /// An entry to skip (a leave-one-out test, or the unknown's own file).
    pub exclude: Option<usize>,
}

impl Default for SearchOptions {
    fn default() -> SearchOptions {
        SearchOptions {
            top: 5,
            phase_rule: PhaseRule::Same,
            exclude: None,
        }
    }
}

/// The unknown, prepared for searching.
#[derive(Clone, Debug, PartialEq)]
pub struct Query {
    /// The unknown on the grid.
    pub grid: GridSpectrum,
    /// Its phase.
    pub phase: Phase,
    signature: Vec<f32>,
    prefix_squares: Vec<f64>,
}

impl Query {
    /// A query from the unknown on the grid and its phase.
    pub fn new(grid: GridSpectrum, phase: Phase) -> Query {
        let signature: Vec<f32> = grid.signature.iter().map(|v| f32::from(*v)).collect();
        let mut prefix_squares = Vec::with_capacity(GRID_POINTS + 1);
        prefix_squares.push(0.0);
        for v in &signature {
            let last = prefix_squares[prefix_squares.len() - 1];
            prefix_squares.push(last + f64::from(*v) * f64::from(*v));
        }
        Query {
            grid,
            phase,
            signature,
            prefix_squares,
        }
    }

    fn squares(&self, lo: usize, hi: usize) -> f64 {
        self.prefix_squares[hi + 1] - self.prefix_squares[lo]
    }
}

/// How a region compares.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Agreement {
    /// Similar bands (local similarity ≥ [`AGREE_AT`]).
    Agrees,
    /// Partly similar.
    Partly,
    /// Different bands, or bands in one spectrum only.
    Disagrees,
    /// Neither spectrum has bands here.
    BothEmpty,
    /// Outside the compared range.
    NotCompared,
}

impl Agreement {
    /// The words reports use.
    pub fn words(self) -> &'static str {
        match self {
            Agreement::Agrees => "agrees",
            Agreement::Partly => "partly agrees",
            Agreement::Disagrees => "disagrees",
            Agreement::BothEmpty => "no bands in either",
            Agreement::NotCompared => "not compared",
        }
    }
}

/// Local similarity at or above which a region agrees (our choice, checked on the
/// measured corpus: same-compound pairs agree in every region with bands).
pub const AGREE_AT: f64 = 0.8;
/// Local similarity below which a region disagrees.
pub const DISAGREE_BELOW: f64 = 0.5;
/// A region holding less than this share of a spectrum's weighted band area has no bands
/// of note.
pub const EMPTY_SHARE: f64 = 0.02;

/// The regions compared one by one (common practice: where the stretching and bending
/// vibrations of the main bond classes fall).
pub const REGIONS: [(&str, f64, f64); 5] = [
    ("X–H stretching (O–H, N–H, C–H)", 2500.0, 4000.0),
    ("triple and cumulated bonds", 2000.0, 2500.0),
    ("double bonds (C=O, C=C, C=N)", 1500.0, 2000.0),
    ("fingerprint, upper (C–O, C–N, CH bends)", 1000.0, 1500.0),
    ("fingerprint, lower (out-of-plane bends, C–X)", 0.0, 1000.0),
];

/// One region of one hit.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct RegionAgreement {
    /// The region's name.
    pub region: String,
    /// Its range, cm⁻¹ (clipped to the grid).
    pub range_cm1: (f64, f64),
    /// Local similarity, when both have bands there.
    pub similarity: Option<f64>,
    /// Share of the unknown's weighted band area in this region (of the compared range).
    pub unknown_share: f64,
    /// Share of the reference's weighted band area in this region.
    pub reference_share: f64,
    /// The verdict.
    pub agreement: Agreement,
}

/// One hit.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Hit {
    /// 1-based rank.
    pub rank: usize,
    /// Index of the entry in the library index.
    pub entry: usize,
    /// The similarity.
    pub score: f64,
    /// The range compared, cm⁻¹.
    pub compared_cm1: (f64, f64),
    /// When the reference's phase differs from the unknown's or is not stated.
    pub phase_note: Option<String>,
    /// Region by region.
    pub regions: Vec<RegionAgreement>,
}

/// What a search found and what it left out.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SearchOutcome {
    /// Best first.
    pub hits: Vec<Hit>,
    /// References in the library.
    pub n_references: usize,
    /// References compared.
    pub n_compared: usize,
    /// References of the other phase left out.
    pub n_other_phase: usize,
    /// Compared references whose phase is not stated.
    pub n_unknown_phase: usize,
    /// References left out for too little shared range.
    pub n_too_little_overlap: usize,
    /// The unknown's phase.
    pub query_phase: Phase,
}

/// Σ q·r and Σ r² over `q.len()` points, in eight independent lanes so that the compiler
/// can keep them in vector registers.
#[inline]
fn dot_and_squares(q: &[f32], r: &[i16]) -> (f64, f64) {
    let mut dot = [0f32; 8];
    let mut sq = [0f32; 8];
    let qc = q.chunks_exact(8);
    let rc = r.chunks_exact(8);
    let (q_rest, r_rest) = (qc.remainder(), rc.remainder());
    for (a, b) in qc.zip(rc) {
        for k in 0..8 {
            let v = f32::from(b[k]);
            dot[k] += a[k] * v;
            sq[k] += v * v;
        }
    }
    let mut d: f64 = dot.iter().map(|v| f64::from(*v)).sum();
    let mut s: f64 = sq.iter().map(|v| f64::from(*v)).sum();
    for (a, b) in q_rest.iter().zip(r_rest) {
        let v = f64::from(*b);
        d += f64::from(*a) * v;
        s += v * v;
    }
    (d, s)
}

fn phase_allowed(query: Phase, reference: Phase, rule: PhaseRule) -> bool {
    rule == PhaseRule::Any
        || query == Phase::Unknown
        || reference == Phase::Unknown
        || query == reference
}

/// The shared window of the unknown and entry `i`, when large enough.
fn window(query: &Query, index: &LibraryIndex, i: usize) -> Option<(usize, usize)> {
    let (r_first, r_last) = index.entries()[i].covered;
    let lo = query.grid.first.max(usize::from(r_first));
    let hi = query.grid.last.min(usize::from(r_last));
    if hi < lo {
        return None;
    }
    let n = hi - lo + 1;
    let query_n = query.grid.last - query.grid.first + 1;
    (n >= MIN_OVERLAP_CELLS && 2 * n >= query_n).then_some((lo, hi))
}

/// The similarity of the unknown and entry `i` over `(lo, hi)`.
fn similarity(query: &Query, index: &LibraryIndex, i: usize, lo: usize, hi: usize) -> f64 {
    let r = index.signature(i);
    let (dot, r_sq) = dot_and_squares(&query.signature[lo..=hi], &r[lo..=hi]);
    let q_sq = query.squares(lo, hi);
    if q_sq <= 0.0 || r_sq <= 0.0 {
        0.0
    } else {
        dot / (q_sq * r_sq).sqrt()
    }
}

/// Searches `index` for `query`.
pub fn search(index: &LibraryIndex, query: &Query, options: &SearchOptions) -> SearchOutcome {
    let mut scored: Vec<(f64, usize, (usize, usize))> = Vec::new();
    let mut outcome = SearchOutcome {
        hits: Vec::new(),
        n_references: index.len(),
        n_compared: 0,
        n_other_phase: 0,
        n_unknown_phase: 0,
        n_too_little_overlap: 0,
        query_phase: query.phase,
    };
    for (i, entry) in index.entries().iter().enumerate() {
        if options.exclude == Some(i) {
            continue;
        }
        let phase = entry.meta.phase();
        if !phase_allowed(query.phase, phase, options.phase_rule) {
            outcome.n_other_phase += 1;
            continue;
        }
        let Some((lo, hi)) = window(query, index, i) else {
            outcome.n_too_little_overlap += 1;
            continue;
        };
        outcome.n_compared += 1;
        if phase == Phase::Unknown {
            outcome.n_unknown_phase += 1;
        }
        scored.push((similarity(query, index, i, lo, hi), i, (lo, hi)));
    }
    let top = options.top.min(scored.len());
    let order = |a: &(f64, usize, (usize, usize)), b: &(f64, usize, (usize, usize))| {
        b.0.total_cmp(&a.0).then(a.1.cmp(&b.1))
    };
    if top > 0 && top < scored.len() {
        scored.select_nth_unstable_by(top - 1, order);
        scored.truncate(top);
    }
    scored.sort_by(order);
    scored.truncate(top);
    outcome.hits = scored
        .into_iter()
        .enumerate()
        .map(|(rank, (score, i, (lo, hi)))| {
            let phase = index.entries()[i].meta.phase();
            let phase_note = if phase == Phase::Unknown {
                Some("the reference's phase is not stated".to_owned())
            } else if query.phase == Phase::Unknown {
                Some(format!(
                    "the unknown's phase is not stated; the reference is {}",
                    phase.word()
                ))
            } else if phase != query.phase {
                Some(format!(
                    "other phase: the reference is {}, the unknown {}",
                    phase.word(),
                    query.phase.word()
                ))
            } else {
                None
            };
            Hit {
                rank: rank + 1,
                entry: i,
                score: (score * 1e4).round() / 1e4,
                compared_cm1: (grid_x(lo), grid_x(hi)),
                phase_note,
                regions: regions(query, index.signature(i), lo, hi),
            }
        })
        .collect();
    outcome
}

/// Region-by-region agreement of the unknown and a reference signature over `(lo, hi)`.
pub fn regions(query: &Query, r: &[i16], lo: usize, hi: usize) -> Vec<RegionAgreement> {
    let q = &query.signature;
    let total = |f: &dyn Fn(usize) -> f64| (lo..=hi).map(f).sum::<f64>();
    let q_all = total(&|k| f64::from(q[k]).abs());
    let r_all = total(&|k| f64::from(r[k]).abs());
    REGIONS
        .iter()
        .map(|&(name, low, high)| {
            let ks: Vec<usize> = (lo..=hi)
                .filter(|&k| grid_x(k) >= low && grid_x(k) < high)
                .collect();
            let range = (low.max(grid_x(0)), high.min(grid_x(GRID_POINTS - 1) + 2.0));
            if ks.len() < 5 {
                return RegionAgreement {
                    region: name.to_owned(),
                    range_cm1: range,
                    similarity: None,
                    unknown_share: 0.0,
                    reference_share: 0.0,
                    agreement: Agreement::NotCompared,
                };
            }
            let qq: f64 = ks.iter().map(|&k| f64::from(q[k]).powi(2)).sum();
            let rr: f64 = ks.iter().map(|&k| f64::from(r[k]).powi(2)).sum();
            let qr: f64 = ks.iter().map(|&k| f64::from(q[k]) * f64::from(r[k])).sum();
            let q_area: f64 = ks.iter().map(|&k| f64::from(q[k]).abs()).sum();
            let r_area: f64 = ks.iter().map(|&k| f64::from(r[k]).abs()).sum();
            let q_share = if q_all > 0.0 { q_area / q_all } else { 0.0 };
            let r_share = if r_all > 0.0 { r_area / r_all } else { 0.0 };
            let local = (qq > 0.0 && rr > 0.0).then(|| qr / (qq * rr).sqrt());
            let agreement = if q_share < EMPTY_SHARE && r_share < EMPTY_SHARE {
                Agreement::BothEmpty
            } else {
                match local {
                    Some(s) if s >= AGREE_AT => Agreement::Agrees,
                    Some(s) if s >= DISAGREE_BELOW => Agreement::Partly,
                    _ => Agreement::Disagrees,
                }
            };
            RegionAgreement {
                region: name.to_owned(),
                range_cm1: range,
                similarity: local.map(|s| (s * 1e3).round() / 1e3),
                unknown_share: (q_share * 1e3).round() / 1e3,
                reference_share: (r_share * 1e3).round() / 1e3,
                agreement,
            }
        })
        .collect()
}
