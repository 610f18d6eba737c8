//! Two-component readings: when one compound cannot explain the spectrum (no consistent
//! candidate, or a strong band the leading candidate leaves unexplained), a suspected
//! known component (a cutting agent or diluent the case lists) is subtracted and the
//! residual deduced.
//!
//! With a reference spectrum and an observed spectrum, both baseline-corrected absorbance
//! traces are put on one grid (their overlap, linear interpolation), the factor is the
//! least-squares one capped so that the residual stays non-negative (within a noise
//! allowance), and the residual's bands are picked as the observed ones were; written bands
//! of the case not matched by the component join them. With band lists only, observed
//! bands within [`MATCH_CM1`] of a component band are attributed to it. The reading is
//! shown when it has candidates and the single-compound reading had none, or explains the
//! strong bands the single-compound leader left unexplained. Without a known component the
//! outcome says which bands a second compound would have to explain.

use super::{Outcome, SolveOptions};
use crate::case::{Case, KnownComponent, ObservedBand, Place};
use crate::ir::{Band, PickOptions, PreparedTrace, Strength};
use crate::rules::Catalogue;
use serde::Serialize;

/// An observed band lies on a component's band within this, cm⁻¹: two reference spectra of
/// one compound agree to about two resolution elements of a routine 4 cm⁻¹ scan (common
/// practice, from memory).
pub const MATCH_CM1: f64 = 10.0;

/// Grid step for fitting, cm⁻¹ (finer than any routine resolution).
pub const FIT_STEP_CM1: f64 = 2.0;

/// The residual may dip below zero by this share of the observed maximum (noise, baseline
/// error) before the factor is capped.
pub const RESIDUAL_ALLOWANCE: f64 = 0.03;

/// What the outcome says about a mixture.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct MixtureOutcome {
    /// Why a second component was considered.
    pub trigger: String,
    /// The component subtracted in the shown reading, when one helped.
    pub component: Option<ComponentFit>,
    /// Bands left for the compound deduced (`at` cm⁻¹), when a component was subtracted.
    pub residual_bands: Vec<f64>,
    /// Bands a second compound would have to explain, when no known component did.
    pub unexplained_bands: Vec<f64>,
    /// Evidence for and against the mixture reading, in words.
    pub evidence: Vec<String>,
    /// The other components tried, with what their residual gave.
    pub tried: Vec<String>,
}

/// One known component as fitted.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct ComponentFit {
    /// Its name as written.
    pub name: String,
    /// Where it was written.
    pub place: String,
    /// `spectrum` (fitted traces) or `bands` (band lists by position).
    pub method: &'static str,
    /// Absorbance factor of the reference (spectrum fit only).
    pub factor: Option<f64>,
    /// The component's share of the observed integrated absorbance (spectrum fit only; a
    /// spectral share, not a mass fraction).
    pub absorbance_share: Option<f64>,
    /// Observed bands attributed to it (`at` cm⁻¹).
    pub attributed_bands: Vec<f64>,
}

/// True when the single-compound outcome calls for a second component: no candidate, or a
/// strong band the leading candidate leaves unexplained.
fn trigger(outcome: &Outcome) -> Option<(String, Vec<f64>)> {
    match outcome.candidates.first() {
        None => Some((
            "no single compound is consistent with the evidence".to_owned(),
            Vec::new(),
        )),
        Some(c) => {
            let strong: Vec<f64> = c
                .bands
                .iter()
                .filter(|b| b.explained_by.is_empty() && b.strength == Strength::Strong.word())
                .map(|b| b.at)
                .collect();
            (!strong.is_empty()).then(|| {
                (
                    format!(
                        "the leading candidate leaves strong band(s) unexplained: {}",
                        list(&strong)
                    ),
                    strong,
                )
            })
        }
    }
}

/// A listed component whose strong bands are all observed (at least two of its bands
/// matched): the analyst's suspicion is borne out by the spectrum, so the mixture reading
/// is tested even when one compound could explain every band (a mixture can hide behind a
/// confident wrong candidate).
fn component_seen(case: &Case) -> Option<(String, Vec<f64>)> {
    let observed: Vec<f64> = case
        .ir
        .iter()
        .flat_map(|ir| ir.bands.iter().map(|b| b.band.at))
        .collect();
    let seen = |at: f64| observed.iter().any(|&o| (o - at).abs() <= MATCH_CM1);
    case.components.iter().find_map(|c| {
        let strong: Vec<f64> = c
            .bands
            .iter()
            .filter(|b| b.band.strength == Strength::Strong)
            .map(|b| b.band.at)
            .collect();
        let n_seen = c.bands.iter().filter(|b| seen(b.band.at)).count();
        (!strong.is_empty() && strong.iter().all(|&a| seen(a)) && n_seen >= 2).then(|| {
            (
                format!(
                    "every strong band of the listed component {} is observed ({} of its {} bands)",
                    c.name,
                    n_seen,
                    c.bands.len()
                ),
                Vec::new(),
            )
        })
    })
}

fn list(at: &[f64]) -> String {
    at.iter()
        .map(|a| format!("{a:.0}"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// Linear interpolation of an ascending trace at `at` (None outside it).
fn interpolate(t: &PreparedTrace, at: f64) -> Option<f64> {
    let n = t.x.len();
    if n < 2 || at < t.x[0] || at > t.x[n - 1] {
        return None;
    }
    let i = t.x.partition_point(|&x| x < at).clamp(1, n - 1);
    let (x0, x1, y0, y1) = (t.x[i - 1], t.x[i], t.y[i - 1], t.y[i]);
    Some(if x1 > x0 {
        y0 + (y1 - y0) * (at - x0) / (x1 - x0)
    } else {
        y0
    })
}

/// The fit of `reference` to `observed`: the common grid, the factor, the residual and the
/// reference's share of the observed integrated absorbance.
#[derive(Clone, Debug, PartialEq)]
pub struct Fit {
    /// The common grid, ascending.
    pub x: Vec<f64>,
    /// Observed minus factor × reference on the grid.
    pub residual: Vec<f64>,
    /// The factor.
    pub factor: f64,
    /// Σ factor·reference / Σ observed over the grid (positive parts).
    pub share: f64,
}

/// Least squares `observed ≈ a·reference`, `a ≥ 0`, capped so that the residual never
/// falls below −[`RESIDUAL_ALLOWANCE`] × max(observed). `None` when the traces do not
/// overlap over at least 10 grid points or the reference is flat.
pub fn fit(observed: &PreparedTrace, reference: &PreparedTrace) -> Option<Fit> {
    let lo = observed.x.first()?.max(*reference.x.first()?);
    let hi = observed.x.last()?.min(*reference.x.last()?);
    if hi - lo < 10.0 * FIT_STEP_CM1 {
        return None;
    }
    let n = ((hi - lo) / FIT_STEP_CM1).floor() as usize + 1;
    let x: Vec<f64> = (0..n).map(|i| lo + i as f64 * FIT_STEP_CM1).collect();
    let o: Vec<f64> = x
        .iter()
        .map(|&a| interpolate(observed, a).unwrap_or(0.0))
        .collect();
    let r: Vec<f64> = x
        .iter()
        .map(|&a| interpolate(reference, a).unwrap_or(0.0))
        .collect();
    let rr: f64 = r.iter().map(|v| v * v).sum();
    if rr <= 0.0 {
        return None;
    }
    let least_squares = (o.iter().zip(&r).map(|(a, b)| a * b).sum::<f64>() / rr).max(0.0);
    let o_max = o.iter().copied().fold(0.0f64, f64::max);
    let r_max = r.iter().copied().fold(0.0f64, f64::max);
    let allowance = RESIDUAL_ALLOWANCE * o_max;
    // Only points where the reference really absorbs can cap the factor.
    let cap = o
        .iter()
        .zip(&r)
        .filter(|(_, rv)| **rv > 0.05 * r_max)
        .map(|(ov, rv)| (ov + allowance) / rv)
        .fold(f64::INFINITY, f64::min);
    let factor = least_squares.min(cap).max(0.0);
    let residual: Vec<f64> = o.iter().zip(&r).map(|(a, b)| a - factor * b).collect();
    let total: f64 = o.iter().map(|v| v.max(0.0)).sum();
    let part: f64 = r.iter().map(|v| factor * v.max(0.0)).sum();
    let share = if total > 0.0 {
        (part / total).min(1.0)
    } else {
        0.0
    };
    Some(Fit {
        x,
        residual,
        factor,
        share,
    })
}

fn matched(at: f64, component: &KnownComponent) -> bool {
    component
        .bands
        .iter()
        .any(|c| (c.band.at - at).abs() <= MATCH_CM1)
}

/// The residual band list for one component and how it was obtained.
fn residual_bands(case: &Case, component: &KnownComponent) -> (Vec<ObservedBand>, ComponentFit) {
    let observed: Vec<&ObservedBand> = case.ir.iter().flat_map(|ir| ir.bands.iter()).collect();
    let attributed: Vec<f64> = observed
        .iter()
        .filter(|b| matched(b.band.at, component))
        .map(|b| b.band.at)
        .collect();
    let traces = case
        .ir
        .as_ref()
        .and_then(|ir| ir.absorbance.as_ref())
        .zip(component.trace.as_ref());
    if let Some((obs, reference)) = traces {
        if let Some(f) = fit(obs, reference) {
            let options = PickOptions::default();
            let (picked, _) = crate::ir::pick::pick_bands(&f.x, &f.residual, &options.pick);
            let origin = case
                .ir
                .as_ref()
                .and_then(|ir| ir.spectrum.as_ref())
                .map_or_else(|| case.origin.clone(), |s| s.origin.clone());
            let mut bands: Vec<ObservedBand> = picked
                .into_iter()
                .enumerate()
                .map(|(i, p)| ObservedBand {
                    band: Band {
                        at: (p.at * 10.0).round() / 10.0,
                        strength: p.strength,
                        shape: p.shape,
                        width: p.fwhm.map(|w| (w * 10.0).round() / 10.0),
                    },
                    place: Place {
                        origin: origin.clone(),
                        position: None,
                        key_path: format!(
                            "residual band {} after subtracting {}",
                            i + 1,
                            component.name
                        ),
                    },
                })
                .collect();
            // Written bands are the analyst's reading: they stay unless the component
            // explains them.
            for b in &observed {
                let written = b.place.position.is_some();
                if written
                    && !matched(b.band.at, component)
                    && !bands
                        .iter()
                        .any(|r| (r.band.at - b.band.at).abs() < crate::case::OVERRIDE_CM1)
                {
                    bands.push((*b).clone());
                }
            }
            bands.sort_by(|a, b| b.band.at.total_cmp(&a.band.at));
            let fit = ComponentFit {
                name: component.name.clone(),
                place: component.place.display(),
                method: "spectrum",
                factor: Some(round(f.factor, 4)),
                absorbance_share: Some(round(f.share, 3)),
                attributed_bands: attributed,
            };
            return (bands, fit);
        }
    }
    let bands: Vec<ObservedBand> = observed
        .iter()
        .filter(|b| !matched(b.band.at, component))
        .map(|b| (*b).clone())
        .collect();
    let fit = ComponentFit {
        name: component.name.clone(),
        place: component.place.display(),
        method: "bands",
        factor: None,
        absorbance_share: None,
        attributed_bands: attributed,
    };
    (bands, fit)
}

fn round(v: f64, digits: i32) -> f64 {
    let p = 10f64.powi(digits);
    (v * p).round() / p
}

/// Considers a second component for a single-compound outcome; returns the outcome to
/// show (the residual's, when a known component explains what one compound could not)
/// with its `mixture` section, or the single outcome with the bands a second compound
/// would have to explain.
pub fn consider(
    case: &Case,
    catalogue: &Catalogue,
    options: &SolveOptions,
    single: Outcome,
) -> Outcome {
    if case.ir.is_none() {
        return single;
    }
    let Some((trigger_text, strong_unexplained)) =
        trigger(&single).or_else(|| component_seen(case))
    else {
        return single;
    };
    let mut tried = Vec::new();
    let mut best: Option<Trial> = None;
    for component in &case.components {
        let trial = Trial::run(case, catalogue, options, component);
        let helps = trial.helps(&single, &strong_unexplained);
        tried.push(trial.summary(helps));
        let better = best
            .as_ref()
            .is_none_or(|b| trial.leader_score() > b.leader_score());
        if helps && better {
            best = Some(trial);
        }
    }
    let reading = Reading {
        trigger_text,
        strong_unexplained,
        tried,
    };
    match best {
        Some(trial) => reading.with_component(&single, trial),
        None => reading.without_component(case, single),
    }
}

/// One known component subtracted and the residual deduced.
struct Trial<'c> {
    /// The component as written.
    component: &'c KnownComponent,
    /// The residual's outcome.
    outcome: Outcome,
    /// How the component was fitted and which bands it took.
    fitted: ComponentFit,
    /// The residual's bands (`at` cm⁻¹).
    residual: Vec<f64>,
}

impl<'c> Trial<'c> {
    /// Subtracts `component` from the case's bands and solves what is left.
    fn run(
        case: &Case,
        catalogue: &Catalogue,
        options: &SolveOptions,
        component: &'c KnownComponent,
    ) -> Self {
        let (bands, fitted) = residual_bands(case, component);
        let mut residual_case = case.clone();
        if let Some(ir) = residual_case.ir.as_mut() {
            ir.bands = bands;
        }
        let outcome = super::budget_free_single(&residual_case, catalogue, options);
        let residual = residual_case
            .ir
            .iter()
            .flat_map(|ir| ir.bands.iter().map(|b| b.band.at))
            .collect();
        Self {
            component,
            outcome,
            fitted,
            residual,
        }
    }

    /// Whether the residual reading helps: it has candidates, needs no second component
    /// itself, and either one compound had none or the component takes the strong bands
    /// the single leader left unexplained.
    fn helps(&self, single: &Outcome, strong_unexplained: &[f64]) -> bool {
        let explains_strong = strong_unexplained.iter().all(|&at| {
            self.fitted
                .attributed_bands
                .iter()
                .any(|&b| (b - at).abs() <= MATCH_CM1)
        });
        !self.outcome.candidates.is_empty()
            && (single.candidates.is_empty() || explains_strong)
            && trigger(&self.outcome).is_none()
    }

    /// The residual leader's score, if any.
    fn leader_score(&self) -> Option<f64> {
        self.outcome.candidates.first().map(|c| c.score)
    }

    /// One line for the `tried` list.
    fn summary(&self, helps: bool) -> String {
        format!(
            "{} ({}): {} band(s) attributed, residual gives {} consistent combination(s){}",
            self.component.name,
            self.fitted.method,
            self.fitted.attributed_bands.len(),
            self.outcome.n_consistent,
            if helps { "" } else { " — not taken" }
        )
    }
}

/// What is known of the mixture reading before choosing the outcome to show.
struct Reading {
    /// Why a second component was considered.
    trigger_text: String,
    /// Strong bands the single-compound leader left unexplained.
    strong_unexplained: Vec<f64>,
    /// The components tried, in words.
    tried: Vec<String>,
}

impl Reading {
    /// The residual's outcome, with the evidence for the mixture reading.
    fn with_component(self, single: &Outcome, trial: Trial<'_>) -> Outcome {
        let Trial {
            mut outcome,
            fitted,
            residual,
            ..
        } = trial;
        let mut evidence = vec![format!(
            "one compound alone: {}",
            self.single_summary(single)
        )];
        for c in &single.conflicts {
            evidence.push(format!(
                "single-compound conflict: {}",
                c.explanation
                    .iter()
                    .map(|e| e.text.as_str())
                    .collect::<Vec<_>>()
                    .join("; ")
            ));
        }
        evidence.push(format!(
            "{} accounts for the band(s) at {}{}",
            fitted.name,
            list(&fitted.attributed_bands),
            fit_method_words(&fitted)
        ));
        evidence.push(format!(
            "the residual ({} band(s)) gives {} consistent combination(s) for the compound deduced",
            residual.len(),
            outcome.n_consistent
        ));
        outcome.mixture = Some(MixtureOutcome {
            trigger: self.trigger_text,
            component: Some(fitted),
            residual_bands: residual,
            unexplained_bands: Vec::new(),
            evidence,
            tried: self.tried,
        });
        outcome
    }

    /// What one compound alone gave, in words.
    fn single_summary(&self, single: &Outcome) -> String {
        match single.candidates.first() {
            None => "no consistent candidate".to_owned(),
            Some(_) if !self.strong_unexplained.is_empty() => format!(
                "{} consistent, the leader leaving {} unexplained",
                single.n_consistent,
                list(&self.strong_unexplained)
            ),
            Some(c) => format!(
                "{} consistent, the leader ({}) explaining the component's bands with its own groups",
                single.n_consistent,
                c.groups
                    .iter()
                    .map(|(g, n)| if *n > 1 { format!("{n} × {g}") } else { g.clone() })
                    .collect::<Vec<_>>()
                    .join(" + ")
            ),
        }
    }

    /// The single outcome, with the bands a second compound would have to explain.
    fn without_component(self, case: &Case, single: Outcome) -> Outcome {
        let mut outcome = single;
        let unexplained = if self.strong_unexplained.is_empty() {
            conflict_bands(case, &outcome)
        } else {
            self.strong_unexplained
        };
        let mut evidence = Vec::new();
        if !unexplained.is_empty() {
            let sentence = format!(
                "a mixture: a second compound would have to explain the band(s) at {} cm⁻¹{}",
                list(&unexplained),
                if case.components.is_empty() {
                    " (list suspected components with their reference spectra or bands under `components:` to test it)"
                } else {
                    " (no listed component explains them)"
                }
            );
            evidence.push(sentence.clone());
            for c in &mut outcome.conflicts {
                c.suggested_causes.push(sentence.clone());
            }
        }
        outcome.mixture = Some(MixtureOutcome {
            trigger: self.trigger_text,
            component: None,
            residual_bands: Vec::new(),
            unexplained_bands: unexplained,
            evidence,
            tried: self.tried,
        });
        outcome
    }
}

/// How a component's bands were matched, in words (the fitted factor and share, or why
/// band lists give none).
fn fit_method_words(fitted: &ComponentFit) -> String {
    match (fitted.factor, fitted.absorbance_share) {
        (Some(f), Some(s)) => format!(
            " (reference spectrum fitted with factor {f}, {:.0} % of the integrated absorbance)",
            s * 100.0
        ),
        _ => " (band lists matched within ±10 cm⁻¹; no fraction can be fitted from band lists)"
            .to_owned(),
    }
}

/// The bands among a conflict's items.
fn conflict_bands(case: &Case, outcome: &Outcome) -> Vec<f64> {
    let Some(ir) = &case.ir else {
        return Vec::new();
    };
    let mut out = Vec::new();
    for c in &outcome.conflicts {
        for item in &c.evidence {
            if let crate::engine::EvidenceItem::Band(i) = item {
                if let Some(b) = ir.bands.get(*i) {
                    if !out.contains(&b.band.at) {
                        out.push(b.band.at);
                    }
                }
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn gaussian(x: &[f64], centre: f64, width: f64, height: f64) -> Vec<f64> {
        x.iter()
            .map(|&v| height * (-((v - centre) / width).powi(2) / 2.0).exp())
            .collect()
    }

    #[test]
    fn the_fit_recovers_the_factor_of_a_known_admixture() {
        let x: Vec<f64> = (0..1500).map(|i| 1000.0 + i as f64).collect();
        let reference = gaussian(&x, 1200.0, 8.0, 1.0);
        let other = gaussian(&x, 1700.0, 10.0, 0.8);
        let observed: Vec<f64> = reference
            .iter()
            .zip(&other)
            .map(|(r, o)| 0.35 * r + o)
            .collect();
        let f = fit(
            &PreparedTrace {
                x: x.clone(),
                y: observed,
            },
            &PreparedTrace {
                x: x.clone(),
                y: reference,
            },
        )
        .expect("overlapping traces");
        assert!((f.factor - 0.35).abs() < 0.01, "factor {}", f.factor);
        // The residual keeps the other compound's band and loses the reference's.
        let at = |w: f64| f.residual[f.x.iter().position(|&v| (v - w).abs() < 1.0).unwrap()];
        assert!(at(1200.0).abs() < 0.02);
        assert!((at(1700.0) - 0.8).abs() < 0.02);
    }

    #[test]
    fn the_factor_is_capped_so_the_residual_stays_non_negative() {
        // The reference has a band the observed spectrum lacks in part: least squares alone
        // would drive the residual negative there.
        let x: Vec<f64> = (0..1000).map(|i| 1000.0 + i as f64).collect();
        let reference: Vec<f64> = gaussian(&x, 1200.0, 8.0, 1.0)
            .iter()
            .zip(gaussian(&x, 1600.0, 8.0, 1.0))
            .map(|(a, b)| a + b)
            .collect();
        let observed: Vec<f64> = gaussian(&x, 1200.0, 8.0, 1.0)
            .iter()
            .zip(gaussian(&x, 1600.0, 8.0, 0.2))
            .map(|(a, b)| a + b)
            .collect();
        let f = fit(
            &PreparedTrace {
                x: x.clone(),
                y: observed.clone(),
            },
            &PreparedTrace { x, y: reference },
        )
        .expect("fit");
        let max = observed.iter().copied().fold(0.0f64, f64::max);
        assert!(f
            .residual
            .iter()
            .all(|&r| r >= -RESIDUAL_ALLOWANCE * max - 1e-9));
        assert!(f.factor < 0.3, "factor {}", f.factor);
    }

    #[test]
    fn no_overlap_gives_no_fit() {
        let a = PreparedTrace {
            x: vec![1000.0, 1001.0, 1002.0, 1003.0],
            y: vec![0.0, 1.0, 0.0, 0.0],
        };
        let b = PreparedTrace {
            x: vec![3000.0, 3001.0, 3002.0, 3003.0],
            y: vec![0.0, 1.0, 0.0, 0.0],
        };
        assert!(fit(&a, &b).is_none());
    }
}
