//! Band picking on an evenly spaced, baseline-corrected absorbance trace: local maxima
//! that stand out of the noise by their prominence, centre by parabolic interpolation,
//! full width at half prominence by linear interpolation, width and strength classes, and
//! shoulders on strong bands from minima of the second derivative.
//!
//! Thresholds (all documented in docs/spectra.md):
//! * noise σ = 1.4826 · MAD(second difference) / √6 — robust to bands, since the second
//!   difference of a smooth band is small while that of white noise has variance 6σ²;
//! * a band needs prominence ≥ [`NOISE_PROMINENCE`]·σ and ≥ [`RELATIVE_PROMINENCE`] of
//!   the tallest maximum;
//! * broad when FWHM ≥ [`BROAD_FWHM_CM1`];
//! * strong when its height is ≥ [`STRONG_FRACTION`] of the tallest band of the sample,
//!   medium when ≥ [`MEDIUM_FRACTION`], weak below;
//! * vapour phase ([`SamplePhase::Vapour`]): P/R(/Q) branch maxima merged into one
//!   [`BandKind::Contour`], water-vapour lines marked [`BandKind::LineForest`]; in both
//!   phases CO2 marked [`BandKind::Co2`]. Line-forest and CO2 bands are always weak and
//!   left out of the strength scale.

use super::band::{Shape, Strength};
use super::preprocess::savgol;
use serde::Serialize;

/// Prominence a band needs, in units of the noise σ. Five σ keeps the chance that noise
/// alone makes a maximum this prominent negligible over a few thousand points.
pub const NOISE_PROMINENCE: f64 = 5.0;

/// Prominence a band needs as a fraction of the tallest maximum: 1 %, below which nobody
/// reads a band off a plotted spectrum.
pub const RELATIVE_PROMINENCE: f64 = 0.01;

/// A band at least this wide (FWHM, cm⁻¹) is broad (the one threshold that case files and
/// the engine use too: [`crate::ir::band::BROAD_FROM_CM1`]).
pub const BROAD_FWHM_CM1: f64 = crate::ir::band::BROAD_FROM_CM1;

/// A band at least this fraction of the tallest band's height is strong. With the
/// strongest band near A = 1 (10 %T), 0.45 is about 35 %T: analysts call bands that dip
/// below roughly a third of full transmittance strong (common practice).
pub const STRONG_FRACTION: f64 = 0.45;

/// A band at least this fraction of the tallest band's height is medium; 0.15 is about
/// 70 %T with the strongest band at A = 1, above which a band reads as weak (common practice).
pub const MEDIUM_FRACTION: f64 = 0.15;

/// Span of the default smoothing window, cm⁻¹: well under the narrowest condensed-phase
/// band (≈ 8–10 cm⁻¹ FWHM), so a cubic Savitzky–Golay filter leaves band shapes intact.
pub const SMOOTHING_SPAN_CM1: f64 = 5.0;

/// Span of the second-derivative window used for shoulders, cm⁻¹.
pub const DERIVATIVE_SPAN_CM1: f64 = 9.0;

/// A second-derivative minimum is a shoulder when it is at least this many σ of the
/// derivative's own noise deep, and at least [`SHOULDER_DEPTH_FRACTION`] of the main band's.
pub const SHOULDER_NOISE: f64 = 6.0;

/// See [`SHOULDER_NOISE`].
pub const SHOULDER_DEPTH_FRACTION: f64 = 0.05;

/// How a band was found.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum BandKind {
    /// A local maximum of the trace.
    Peak,
    /// A shoulder: no maximum of its own, a minimum of the second derivative on the flank
    /// of a strong band.
    Shoulder,
    /// Vapour phase: the P and R branch maxima (and the Q branch between them, when
    /// present) of one rotation–vibration band, merged into one band at the band centre.
    Contour,
    /// Vapour phase: one narrow line of a forest of rotation lines (water vapour) in
    /// 3500–3950 or 1300–2000 cm⁻¹; always weak and left out of the strength scale.
    LineForest,
    /// Atmospheric CO2 near 2350 or 667 cm⁻¹ (an imperfect background); always weak and
    /// left out of the strength scale.
    Co2,
}

impl BandKind {
    /// True for the kinds that are most likely not the sample's own bands (water-vapour
    /// lines, CO2): kept in the list for the analyst to see, never stronger than weak.
    pub fn is_artefact_likely(self) -> bool {
        matches!(self, BandKind::LineForest | BandKind::Co2)
    }
}

/// The physical state of the sample, which changes what a band looks like: condensed
/// (film, ATR, KBr, mull, solution) bands are smooth profiles; vapour (gas cell, GC-IR)
/// bands are rotation–vibration contours with P, Q and R branches, and water-vapour lines
/// are not ratioed away as cleanly.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum SamplePhase {
    /// Film, ATR, KBr, mull, solution (the default).
    #[default]
    Condensed,
    /// Gas cell or GC-IR light pipe.
    Vapour,
}

/// A picked band with its measurements.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct PickedBand {
    /// Centre, cm⁻¹.
    pub at: f64,
    /// Absorbance above the baseline at the centre.
    pub height: f64,
    /// Height over the tallest band's height.
    pub relative_height: f64,
    /// Prominence (absorbance): how far the band rises above the higher of its two bases.
    pub prominence: f64,
    /// Full width at half prominence, cm⁻¹ (estimated from the second derivative for a
    /// shoulder), when it could be measured.
    pub fwhm: Option<f64>,
    /// Strength class.
    pub strength: Strength,
    /// Width class, when the width is known.
    pub shape: Option<Shape>,
    /// Peak or shoulder.
    pub kind: BandKind,
}

/// Settings of the picker.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PickParams {
    /// Savitzky–Golay smoothing before picking: `None` picks the window from
    /// [`SMOOTHING_SPAN_CM1`] (no smoothing when that is under 5 points), `Some(0)` turns it
    /// off, `Some(k)` uses `k` points (made odd).
    pub smoothing_points: Option<usize>,
    /// Look for shoulders on strong bands.
    pub shoulders: bool,
    /// Physical state of the sample (vapour-phase contours and line forests; see
    /// [`SamplePhase`]).
    pub phase: SamplePhase,
}

impl Default for PickParams {
    fn default() -> PickParams {
        PickParams {
            smoothing_points: None,
            shoulders: true,
            phase: SamplePhase::Condensed,
        }
    }
}

/// What the picker measured besides the bands.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct PickStats {
    /// Noise σ of the absorbance trace.
    pub noise: f64,
    /// Smoothing window used, points (0 for none).
    pub smoothing_points: usize,
    /// Point spacing, cm⁻¹.
    pub spacing_cm1: f64,
}

/// Median of a slice (which it sorts).
fn median(v: &mut [f64]) -> f64 {
    if v.is_empty() {
        return 0.0;
    }
    let mid = v.len() / 2;
    let (_, m, _) = v.select_nth_unstable_by(mid, f64::total_cmp);
    *m
}

/// Robust noise σ of `y`: 1.4826 · MAD of the second difference / √6.
pub fn noise_sigma(y: &[f64]) -> f64 {
    if y.len() < 5 {
        return 0.0;
    }
    let mut d2: Vec<f64> = y.windows(3).map(|w| w[0] - 2.0 * w[1] + w[2]).collect();
    let mut scratch = d2.clone();
    let m = median(&mut scratch);
    for v in &mut d2 {
        *v = (*v - m).abs();
    }
    1.4826 * median(&mut d2) / 6f64.sqrt()
}

/// The strength class of a band `relative` times the tallest band's height (the one
/// implementation of the strength scale, used for picked bands and for peak tables).
pub fn classify_strength(relative: f64) -> Strength {
    if relative >= STRONG_FRACTION {
        Strength::Strong
    } else if relative >= MEDIUM_FRACTION {
        Strength::Medium
    } else {
        Strength::Weak
    }
}

fn odd_window(points: usize) -> usize {
    if points < 5 {
        0
    } else if points % 2 == 0 {
        points + 1
    } else {
        points
    }
}

struct Maximum {
    index: usize,
    prominence: f64,
    left_base: usize,
    right_base: usize,
}

/// Local maxima (plateaus count once, at their middle) with their prominences.
fn maxima_with_prominence(y: &[f64], min_height: f64) -> Vec<Maximum> {
    let n = y.len();
    let mut out = Vec::new();
    let mut i = 1;
    while i + 1 < n {
        if y[i] > y[i - 1] {
            // Walk over a plateau.
            let mut end = i;
            while end + 1 < n && y[end + 1] == y[i] {
                end += 1;
            }
            if end + 1 < n && y[end + 1] < y[i] && y[i] > min_height {
                let index = (i + end) / 2;
                let top = y[i];
                let mut left_min = top;
                let mut left_base = i;
                let mut j = i;
                while j > 0 {
                    j -= 1;
                    if y[j] > top {
                        break;
                    }
                    if y[j] < left_min {
                        left_min = y[j];
                        left_base = j;
                    }
                }
                let mut right_min = top;
                let mut right_base = end;
                let mut j = end;
                while j + 1 < n {
                    j += 1;
                    if y[j] > top {
                        break;
                    }
                    if y[j] < right_min {
                        right_min = y[j];
                        right_base = j;
                    }
                }
                out.push(Maximum {
                    index,
                    prominence: top - left_min.max(right_min),
                    left_base,
                    right_base,
                });
            }
            i = end + 1;
        } else {
            i += 1;
        }
    }
    out
}

/// Where `y` falls to `level` walking from `from` towards `to` (exclusive), linearly
/// interpolated, in fractional index; `None` when it never does.
fn crossing(y: &[f64], from: usize, to: usize, level: f64) -> Option<f64> {
    if to < from {
        let mut j = from;
        while j > to {
            if y[j - 1] <= level {
                let t = (y[j] - level) / (y[j] - y[j - 1]);
                return Some(j as f64 - t);
            }
            j -= 1;
        }
    } else {
        let mut j = from;
        while j < to {
            if y[j + 1] <= level {
                let t = (y[j] - level) / (y[j] - y[j + 1]);
                return Some(j as f64 + t);
            }
            j += 1;
        }
    }
    None
}

/// Least-squares parabola through the points around maximum `m` that lie above `level`;
/// returns its vertex when it has at least 5 points and a proper top inside them.
fn top_parabola(x: &[f64], y: &[f64], i: usize, m: &Maximum, level: f64) -> Option<(f64, f64)> {
    let mut l = i;
    while l > m.left_base && y[l - 1] > level {
        l -= 1;
    }
    let mut r = i;
    while r < m.right_base && y[r + 1] > level {
        r += 1;
    }
    if r - l + 1 < 5 {
        return None;
    }
    // Fit y = c0 + c1 t + c2 t² with t centred on x[i] for conditioning.
    let (mut s0, mut s1, mut s2, mut s3, mut s4) = (0.0, 0.0, 0.0, 0.0, 0.0);
    let (mut sy, mut sty, mut stty) = (0.0, 0.0, 0.0);
    for j in l..=r {
        let t = x[j] - x[i];
        let t2 = t * t;
        s0 += 1.0;
        s1 += t;
        s2 += t2;
        s3 += t2 * t;
        s4 += t2 * t2;
        sy += y[j];
        sty += t * y[j];
        stty += t2 * y[j];
    }
    // Cramer's rule on the 3×3 normal equations.
    let det3 = |a: [[f64; 3]; 3]| {
        a[0][0] * (a[1][1] * a[2][2] - a[1][2] * a[2][1])
            - a[0][1] * (a[1][0] * a[2][2] - a[1][2] * a[2][0])
            + a[0][2] * (a[1][0] * a[2][1] - a[1][1] * a[2][0])
    };
    let n = [[s0, s1, s2], [s1, s2, s3], [s2, s3, s4]];
    let d = det3(n);
    if d.abs() < 1e-300 {
        return None;
    }
    let rhs = [sy, sty, stty];
    let solve = |col: usize| {
        let mut a = n;
        for row in 0..3 {
            a[row][col] = rhs[row];
        }
        det3(a) / d
    };
    let (c0, c1, c2) = (solve(0), solve(1), solve(2));
    if c2 >= 0.0 {
        return None;
    }
    let t = -c1 / (2.0 * c2);
    if t < x[l] - x[i] || t > x[r] - x[i] {
        return None;
    }
    Some((x[i] + t, c0 + c1 * t + c2 * t * t))
}

/// Picks bands of the absorbance trace `y` on the evenly spaced ascending grid `x`
/// (baseline already removed). Bands come out in decreasing wavenumber, as analysts list them,
/// with notes on what the phase-specific steps did (contours merged, line forests and CO2
/// marked).
pub fn pick_bands_noted(
    x: &[f64],
    y: &[f64],
    params: &PickParams,
) -> (Vec<PickedBand>, PickStats, Vec<String>) {
    let n = y.len();
    let spacing = if n >= 2 {
        (x[n - 1] - x[0]) / (n - 1) as f64
    } else {
        0.0
    };
    let noise = noise_sigma(y);
    let mut stats = PickStats {
        noise,
        smoothing_points: 0,
        spacing_cm1: spacing,
    };
    if n < 5 || spacing <= 0.0 {
        return (Vec::new(), stats, Vec::new());
    }
    let mut notes = Vec::new();
    let working = working_trace(y, spacing, params.phase, &mut notes);
    let y = &working[..];
    let window = match params.smoothing_points {
        Some(k) => odd_window(k),
        None => odd_window((SMOOTHING_SPAN_CM1 / spacing).round() as usize),
    };
    let smooth = if window >= 5 {
        savgol(y, window / 2, 3, 0)
    } else {
        y.to_vec()
    };
    stats.smoothing_points = window;
    let tallest = smooth.iter().copied().fold(0.0f64, f64::max);
    if tallest <= 0.0 {
        return (Vec::new(), stats, Vec::new());
    }
    let min_prominence = (NOISE_PROMINENCE * noise).max(RELATIVE_PROMINENCE * tallest);
    let maxima: Vec<Maximum> = maxima_with_prominence(&smooth, min_prominence)
        .into_iter()
        .filter(|m| m.prominence >= min_prominence)
        .collect();
    let mut bands: Vec<PickedBand> = maxima
        .iter()
        .map(|m| peak_band(x, &smooth, m, spacing))
        .collect();
    let max_height = bands.iter().map(|b| b.height).fold(0.0f64, f64::max);
    if params.shoulders && max_height > 0.0 {
        let search = ShoulderSearch::new(x, y, &smooth, spacing, min_prominence);
        let shoulders = search.shoulders(&maxima, &bands, max_height);
        search.add_shoulders(&mut bands, shoulders);
    }
    if params.phase == SamplePhase::Vapour {
        // Contours first, so that a Q branch or a branch narrowed by its neighbours is not
        // taken for a water line; then the lines left over.
        let forests = find_forests(&bands, spacing);
        merge_contours(x, &smooth, &mut bands, &forests, &mut notes);
        mark_line_forests(&mut bands, &forests, &mut notes);
    }
    mark_co2(&mut bands, params.phase, &mut notes);
    grade_strengths(&mut bands, max_height, &mut notes);
    bands.sort_by(|a, b| b.at.total_cmp(&a.at));
    (bands, stats, notes)
}

/// The trace bands are judged on. A vapour recorded at high resolution resolves single
/// rotational lines and needle-thin Q branches far taller than the contours around them:
/// on that scale a medium C≡N or C=O contour falls under the 1 % floor, so such a trace
/// is blurred to a survey resolution (and a note says so).
fn working_trace<'y>(
    y: &'y [f64],
    spacing: f64,
    phase: SamplePhase,
    notes: &mut Vec<String>,
) -> std::borrow::Cow<'y, [f64]> {
    if phase == SamplePhase::Vapour && spacing < HIGH_RESOLUTION_SPACING_CM1 {
        notes.push(format!(
            "vapour phase: points {spacing:.2} cm-1 apart resolve single rotational lines; bands picked at {VAPOUR_WORKING_RESOLUTION_CM1:.0} cm-1 resolution (Gaussian line shape)"
        ));
        std::borrow::Cow::Owned(gaussian_blur(y, VAPOUR_WORKING_RESOLUTION_CM1 / spacing))
    } else {
        std::borrow::Cow::Borrowed(y)
    }
}

/// The band at one maximum of the smoothed trace: centre and height from the top (a
/// parabola through three points, or through the top quarter on a wide top), width at
/// half prominence.
fn peak_band(x: &[f64], smooth: &[f64], m: &Maximum, spacing: f64) -> PickedBand {
    let i = m.index;
    let (a, b, c) = (smooth[i - 1], smooth[i], smooth[i + 1]);
    let curvature = a - 2.0 * b + c;
    let delta = if curvature < 0.0 {
        (0.5 * (a - c) / curvature).clamp(-0.5, 0.5)
    } else {
        0.0
    };
    let mut at = x[i] + delta * spacing;
    let mut height = b - 0.25 * (a - c) * delta;
    // On a wide top, noise moves the highest point about; a least-squares parabola
    // through the top quarter of the band (by prominence) finds the centre better.
    if let Some((top_at, top_height)) = top_parabola(x, smooth, i, m, height - 0.25 * m.prominence)
    {
        at = top_at;
        height = top_height;
    }
    // Half prominence below the highest sample, the point the prominence is measured
    // from (the fitted top can differ slightly and would shift the level).
    let level = b - m.prominence / 2.0;
    let left = crossing(smooth, i, m.left_base, level);
    let right = crossing(smooth, i, m.right_base, level);
    let centre_index = (at - x[0]) / spacing;
    let fwhm = match (left, right) {
        (Some(l), Some(r)) => Some((r - l) * spacing),
        // One side runs into a taller neighbour: mirror the side that was measured.
        (Some(l), None) => Some(2.0 * (centre_index - l) * spacing),
        (None, Some(r)) => Some(2.0 * (r - centre_index) * spacing),
        (None, None) => None,
    }
    .filter(|w| *w > 0.0);
    PickedBand {
        at,
        height,
        relative_height: 0.0,
        prominence: m.prominence,
        fwhm,
        strength: Strength::Weak,
        shape: fwhm.map(Shape::from_width),
        kind: BandKind::Peak,
    }
}

/// Shoulders: minima of the second derivative on the flanks of strong bands that no
/// picked maximum explains.
struct ShoulderSearch<'t> {
    /// The grid.
    x: &'t [f64],
    /// The smoothed trace.
    smooth: &'t [f64],
    /// Its second derivative.
    d2: Vec<f64>,
    /// Robust noise of the second derivative (1.4826 × median absolute deviation).
    d2_noise: f64,
    /// Points of the derivative window.
    d_window: usize,
    /// Point spacing, cm⁻¹.
    spacing: f64,
    /// The smallest prominence a band may have.
    min_prominence: f64,
}

impl<'t> ShoulderSearch<'t> {
    /// Takes the second derivative of `y` over [`DERIVATIVE_SPAN_CM1`].
    fn new(x: &'t [f64], y: &[f64], smooth: &'t [f64], spacing: f64, min_prominence: f64) -> Self {
        let d_window = odd_window((DERIVATIVE_SPAN_CM1 / spacing).round() as usize).max(5);
        let d2 = savgol(y, d_window / 2, 3, 2);
        let d2_noise = {
            let mut tmp: Vec<f64> = d2.clone();
            let m = median(&mut tmp);
            tmp.copy_from_slice(&d2);
            for v in &mut tmp {
                *v = (*v - m).abs();
            }
            1.4826 * median(&mut tmp)
        };
        Self {
            x,
            smooth,
            d2,
            d2_noise,
            d_window,
            spacing,
            min_prominence,
        }
    }

    /// The shoulders on the flanks of every strong band (`bands` are the peaks of
    /// `maxima`, in the same order).
    fn shoulders(
        &self,
        maxima: &[Maximum],
        bands: &[PickedBand],
        max_height: f64,
    ) -> Vec<PickedBand> {
        let n = self.d2.len();
        let peaks: Vec<(usize, f64)> = maxima
            .iter()
            .zip(bands)
            .map(|(m, b)| (m.index, b.fwhm.unwrap_or(0.0)))
            .collect();
        let mut shoulders = Vec::new();
        for (m, band) in maxima.iter().zip(bands) {
            if band.height < STRONG_FRACTION * max_height {
                continue;
            }
            let Some(fwhm) = band.fwhm else {
                continue;
            };
            let half_points = (fwhm / self.spacing / 2.0).max(1.0);
            let reach = (3.0 * half_points) as usize;
            let lo = m.index.saturating_sub(reach).max(m.left_base).max(1);
            let hi = (m.index + reach).min(m.right_base).min(n - 2);
            shoulders.extend((lo..=hi).filter_map(|j| self.shoulder_at(j, m, half_points, &peaks)));
        }
        shoulders
    }

    /// A shoulder at point `j` on the flank of maximum `m`, unless `j` is no derivative
    /// minimum, too shallow, in the band's own core, explained by a picked maximum
    /// (`peaks`: index and width of each), or below the prominence floor.
    fn shoulder_at(
        &self,
        j: usize,
        m: &Maximum,
        half_points: f64,
        peaks: &[(usize, f64)],
    ) -> Option<PickedBand> {
        let d2 = &self.d2;
        if !(d2[j] < d2[j - 1] && d2[j] <= d2[j + 1]) {
            return None;
        }
        let depth = -d2[j];
        let main_depth = d2[m.index].min(0.0).abs();
        if depth < SHOULDER_NOISE * self.d2_noise || depth < SHOULDER_DEPTH_FRACTION * main_depth {
            return None;
        }
        let half_window = self.d_window as f64 / 2.0;
        // Not the band's own core, and not any picked maximum.
        let distance_to_peak = (j as f64 - m.index as f64).abs();
        if distance_to_peak < 0.5 * half_points.max(half_window) {
            return None;
        }
        // Another picked maximum explains the derivative minimum within its own core:
        // three quarters of its width (at least half the derivative window). The host
        // band's core was excluded above.
        let explained = peaks.iter().any(|&(p, w)| {
            let core = if p == m.index {
                half_window.max(2.0)
            } else {
                (0.75 * w / self.spacing).max(half_window).max(2.0)
            };
            (p as f64 - j as f64).abs() < core
        });
        if explained || self.smooth[j] < self.min_prominence {
            return None;
        }
        Some(self.shoulder_band(j))
    }

    /// The shoulder band at derivative minimum `j`.
    fn shoulder_band(&self, j: usize) -> PickedBand {
        let d2 = &self.d2;
        // Width between the zero crossings of the second derivative around j.
        let mut l = j;
        while l > 0 && d2[l] < 0.0 {
            l -= 1;
        }
        let mut r = j;
        while r + 1 < d2.len() && d2[r] < 0.0 {
            r += 1;
        }
        // Zero-crossing width is FWHM/√3 for a Lorentzian and 0.85·FWHM for a
        // Gaussian; 1.4 sits between, enough for the broad/sharp class.
        let width = 1.4 * (r - l) as f64 * self.spacing;
        let (a, b, c) = (d2[j - 1], d2[j], d2[j + 1]);
        let curvature = a - 2.0 * b + c;
        let delta = if curvature > 0.0 {
            (0.5 * (a - c) / curvature).clamp(-0.5, 0.5)
        } else {
            0.0
        };
        PickedBand {
            at: self.x[j] + delta * self.spacing,
            height: self.smooth[j],
            relative_height: 0.0,
            prominence: 0.0,
            fwhm: Some(width),
            strength: Strength::Weak,
            shape: Some(Shape::from_width(width)),
            kind: BandKind::Shoulder,
        }
    }

    /// Adds the shoulders to `bands`, one per place even when two strong bands both
    /// reach it.
    fn add_shoulders(&self, bands: &mut Vec<PickedBand>, shoulders: Vec<PickedBand>) {
        let same_place = (self.d_window as f64 / 2.0).max(2.0) * self.spacing;
        for s in shoulders {
            if !bands
                .iter()
                .any(|b| b.kind == BandKind::Shoulder && (b.at - s.at).abs() < same_place)
            {
                bands.push(s);
            }
        }
    }
}

/// Grades each band's strength against the tallest band that is the sample's own: a CO2
/// doublet or a water line taller than every band of the compound (a poor background)
/// must not make the compound's bands all weak. Strong water lines get a note.
fn grade_strengths(bands: &mut [PickedBand], max_height: f64, notes: &mut Vec<String>) {
    let own_max = bands
        .iter()
        .filter(|b| !b.kind.is_artefact_likely())
        .map(|b| b.height)
        .fold(0.0f64, f64::max);
    let scale = if own_max > 0.0 { own_max } else { max_height };
    let tallest_line = bands
        .iter()
        .filter(|b| b.kind == BandKind::LineForest)
        .map(|b| b.height)
        .fold(0.0f64, f64::max);
    if scale > 0.0 && tallest_line >= STRONG_FOREST_FRACTION * scale {
        notes.push(format!(
            "vapour phase: water-vapour lines are strong in this spectrum (the tallest {:.0} % of the strongest band); blended lines may pass for bands in 3500-3950 and 1300-2000 cm-1: compare with the plotted spectrum",
            100.0 * tallest_line / scale
        ));
    }
    for b in bands {
        b.relative_height = if scale > 0.0 { b.height / scale } else { 0.0 };
        b.strength = if b.kind.is_artefact_likely() {
            Strength::Weak
        } else {
            classify_strength(b.relative_height)
        };
    }
}

/// Point spacing below which a vapour spectrum counts as high resolution, cm⁻¹ (survey
/// and GC-IR spectra are recorded at 2–8 cm⁻¹ resolution, about 1–4 cm⁻¹ apart;
/// common practice).
pub const HIGH_RESOLUTION_SPACING_CM1: f64 = 0.5;

/// Resolution at which a high-resolution vapour spectrum is picked, cm⁻¹ (a common
/// survey resolution; P and R branches 20–60 cm⁻¹ apart stay resolved).
pub const VAPOUR_WORKING_RESOLUTION_CM1: f64 = 4.0;

/// Convolves `y` with a unit-area Gaussian of `fwhm_points` full width at half maximum
/// (in points), truncated at ±3σ; the ends use the part of the kernel that fits.
pub fn gaussian_blur(y: &[f64], fwhm_points: f64) -> Vec<f64> {
    let sigma = fwhm_points / (8.0 * std::f64::consts::LN_2).sqrt();
    if sigma < 0.5 {
        return y.to_vec();
    }
    let half = (3.0 * sigma).ceil() as usize;
    let kernel: Vec<f64> = (0..=2 * half)
        .map(|k| {
            let d = k as f64 - half as f64;
            (-0.5 * (d / sigma).powi(2)).exp()
        })
        .collect();
    (0..y.len())
        .map(|i| {
            let (mut sum, mut weight) = (0.0, 0.0);
            for (k, w) in kernel.iter().enumerate() {
                if let Some(j) = (i + k).checked_sub(half).filter(|j| *j < y.len()) {
                    sum += w * y[j];
                    weight += w;
                }
            }
            sum / weight
        })
        .collect()
}

/// Picks bands like [`pick_bands_noted`], without the notes.
pub fn pick_bands(x: &[f64], y: &[f64], params: &PickParams) -> (Vec<PickedBand>, PickStats) {
    let (bands, stats, _) = pick_bands_noted(x, y, params);
    (bands, stats)
}

/// Wavenumber windows where water vapour shows its rotation–vibration lines: the O–H
/// stretches (ν1, ν3) 3500–3950 cm⁻¹ and the H–O–H bend (ν2) 1300–2000 cm⁻¹ (common
/// practice; the same windows as the water-vapour artefacts of `rules/artefacts.yaml`,
/// the low one widened to 2000 because bend lines reach about 1980).
pub const FOREST_WINDOWS_CM1: [(f64, f64); 2] = [(1300.0, 2000.0), (3500.0, 3950.0)];

/// A line of a forest is at most this wide (FWHM, cm⁻¹), or 3 point spacings when that is
/// more. Water-vapour lines are far narrower than any spectrometer's resolution, so they
/// appear with the instrument's line width: about 1.2–1.5 × the nominal resolution after
/// apodisation, i.e. 5–6 cm⁻¹ at 4 cm⁻¹ and 10–12 cm⁻¹ at 8 cm⁻¹ resolution (common
/// practice), a little more where two lines blend. A P or R branch of an organic
/// molecule's band spans about 10–20 cm⁻¹, so some branches pass this test too: they are
/// merged into contours first and saved by [`FOREST_STANDOUT`].
pub const FOREST_LINE_FWHM_CM1: f64 = 14.0;

/// A window holds a forest when at least this many narrow maxima lie in it: water vapour
/// gives dozens of lines in each window even after a fair background ratio, while one
/// vapour-phase band gives at most three maxima (P, Q, R) and two neighbouring bands six.
pub const FOREST_MIN_LINES: usize = 8;

/// A narrow line more prominent than this multiple of the median prominence of the
/// window's narrow lines stands out of the forest and is read as a band of the sample (a Q
/// branch, a free O–H). Residual water lines after a background ratio are of comparable
/// size: the picked ones (the top one to two decades of a line list) mostly lie within
/// 4 × their median, whereas a sample band that happens to be narrow usually dominates
/// them. The median, not a higher quantile, because the sample's own narrow branches in
/// the window (a handful among dozens of lines) must not raise the bar.
pub const FOREST_STANDOUT: f64 = 4.0;

/// Water lines this tall against the strongest band of the sample earn a note: at 8 cm⁻¹
/// resolution such lines blend into maxima 20–40 cm⁻¹ wide that pass for bands (seen on
/// the invented spectra of `tests/ir_phase.rs` with the forest at 30 % of the strongest
/// band), so the analyst must look at the plotted spectrum. Lines up to about a tenth of
/// the strongest band (a fair ratio) stay below it.
pub const STRONG_FOREST_FRACTION: f64 = 0.2;

/// P–R separation range of a contour, cm⁻¹. The Gerhard–Dennison estimate
/// Δν(PR) ≈ 2.36·√(B·T) (B in cm⁻¹, T in K; Gerhard & Dennison, Phys. Rev. 43 (1933) 197,
/// from memory) gives about 9 cm⁻¹ for B = 0.05 cm⁻¹ at room temperature and about
/// 30 cm⁻¹ for B = 0.3 cm⁻¹ in a GC-IR light pipe near 530 K; small organic molecules
/// (acetonitrile, acetone, ethanol, ethyl acetate) lie between.
pub const CONTOUR_MIN_SEPARATION_CM1: f64 = 8.0;

/// See [`CONTOUR_MIN_SEPARATION_CM1`].
pub const CONTOUR_MAX_SEPARATION_CM1: f64 = 35.0;

/// The weaker of the P and R maxima is at least this fraction of the stronger: the two
/// branches of one band hold similar intensity (R somewhat stronger at high temperature),
/// while two different bands that close are usually of unequal height.
pub const CONTOUR_HEIGHT_RATIO: f64 = 0.4;

/// The trace between the branches stays at least this fraction of the lower maximum: the
/// branches of one band overlap (the dip typically reaches 25–70 % of the maxima; two
/// Gaussian branches of 10.8 cm⁻¹ FWHM 22 cm⁻¹ apart, a small molecule at 4 cm⁻¹
/// resolution, still keep 11 %), while two separate narrow lines 8–35 cm⁻¹ apart fall
/// nearly to the baseline between them. Overlapping
/// water lines that pass this test are caught by the forest test instead.
pub const CONTOUR_VALLEY_FRACTION: f64 = 0.1;

/// A CO2 band lies in 2330–2370 cm⁻¹ (asymmetric stretch, P and R maxima near 2360 and
/// 2340, centre 2349; common practice) and is at most this wide (FWHM, cm⁻¹; the merged
/// P/R envelope measures about 40–50 cm⁻¹ at 8 cm⁻¹ resolution). Organic
/// groups absorbing there are rare (P–H near 2280–2440 is the one to keep in mind) and
/// isocyanates (2240–2290) and nitriles (2210–2260) lie below the window.
pub const CO2_WINDOW_CM1: (f64, f64) = (2330.0, 2370.0);

/// See [`CO2_WINDOW_CM1`].
pub const CO2_MAX_FWHM_CM1: f64 = 60.0;

/// The CO2 bend (Q branch at 667 cm⁻¹, common practice), flagged in the vapour phase
/// only when the stretch was: C–Cl stretches also lie near 650–750 cm⁻¹.
pub const CO2_BEND_WINDOW_CM1: (f64, f64) = (660.0, 675.0);

fn in_window(at: f64, (lo, hi): (f64, f64)) -> bool {
    at >= lo && at <= hi
}

/// A water-vapour line forest found in one of [`FOREST_WINDOWS_CM1`].
#[derive(Clone, Copy, Debug)]
struct Forest {
    window: (f64, f64),
    /// Median prominence of the window's narrow lines.
    median: f64,
    /// Widest FWHM a line may have, cm⁻¹.
    max_width: f64,
}

impl Forest {
    /// True when a band of this position, width and prominence reads as one of its lines.
    fn holds(&self, at: f64, fwhm: Option<f64>, prominence: f64) -> bool {
        in_window(at, self.window)
            && fwhm.is_some_and(|w| w <= self.max_width)
            && prominence <= FOREST_STANDOUT * self.median
    }
}

/// Finds the water-vapour line forests: a window holds one when at least
/// [`FOREST_MIN_LINES`] narrow maxima lie in it. Statistics are taken over the whole window
/// so that the sparse edges of a forest are recognised too.
fn find_forests(bands: &[PickedBand], spacing: f64) -> Vec<Forest> {
    let max_width = FOREST_LINE_FWHM_CM1.max(3.0 * spacing);
    let mut forests = Vec::new();
    for window in FOREST_WINDOWS_CM1 {
        let mut prominences: Vec<f64> = bands
            .iter()
            .filter(|b| {
                b.kind == BandKind::Peak
                    && in_window(b.at, window)
                    && b.fwhm.is_some_and(|w| w <= max_width)
            })
            .map(|b| b.prominence)
            .collect();
        if prominences.len() < FOREST_MIN_LINES {
            continue;
        }
        prominences.sort_by(f64::total_cmp);
        forests.push(Forest {
            window,
            median: prominences[prominences.len() / 2],
            max_width,
        });
    }
    forests
}

/// Marks the maxima that read as lines of a forest ([`BandKind::LineForest`]).
fn mark_line_forests(bands: &mut [PickedBand], forests: &[Forest], notes: &mut Vec<String>) {
    for forest in forests {
        let mut marked = 0;
        for b in bands.iter_mut() {
            if matches!(b.kind, BandKind::Peak | BandKind::LineForest)
                && forest.holds(b.at, b.fwhm, b.prominence)
            {
                b.kind = BandKind::LineForest;
                marked += 1;
            }
        }
        notes.push(format!(
            "vapour phase: {marked} narrow line(s) in {:.0}-{:.0} cm-1 read as a water-vapour line forest; kept in the list as weak (kind line-forest) and left out of the strength scale",
            forest.window.0, forest.window.1
        ));
    }
}

/// Lowest value of `smooth` between wavenumbers `a` < `b`.
fn valley(x: &[f64], smooth: &[f64], a: f64, b: f64) -> f64 {
    let spacing = (x[x.len() - 1] - x[0]) / (x.len() - 1) as f64;
    let index = |at: f64| (((at - x[0]) / spacing).round().max(0.0) as usize).min(x.len() - 1);
    let (ia, ib) = (index(a), index(b));
    smooth[ia.min(ib)..=ia.max(ib)]
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min)
}

/// True when maxima `p` < `r` can be the P and R branches of one band.
fn branch_pair(x: &[f64], smooth: &[f64], p: &PickedBand, r: &PickedBand) -> bool {
    let separation = r.at - p.at;
    let (low, high) = (p.height.min(r.height), p.height.max(r.height));
    (CONTOUR_MIN_SEPARATION_CM1..=CONTOUR_MAX_SEPARATION_CM1).contains(&separation)
        && low >= CONTOUR_HEIGHT_RATIO * high
        && valley(x, smooth, p.at, r.at) >= CONTOUR_VALLEY_FRACTION * low
        && p.shape != Some(Shape::Broad)
        && r.shape != Some(Shape::Broad)
}

/// Merges the P and R maxima (with a Q between them) of each vapour-phase band into one
/// [`BandKind::Contour`] at the band centre: the Q branch when there is one, else the
/// midpoint of P and R. Its height is the tallest branch; its width runs from P's low
/// half-height point to R's high one.
/// Two or three narrow lines of a forest window that pass for branches but do not stand out
/// of the forest are overlapping water lines: they are marked as forest lines instead.
fn merge_contours(
    x: &[f64],
    smooth: &[f64],
    bands: &mut Vec<PickedBand>,
    forests: &[Forest],
    notes: &mut Vec<String>,
) {
    let mut peaks: Vec<PickedBand> = Vec::new();
    let mut rest: Vec<PickedBand> = Vec::new();
    for b in bands.drain(..) {
        if b.kind == BandKind::Peak {
            peaks.push(b);
        } else {
            rest.push(b);
        }
    }
    peaks.sort_by(|a, b| a.at.total_cmp(&b.at));
    let mut out: Vec<PickedBand> = Vec::new();
    let mut merged_words = Vec::new();
    let mut i = 0;
    while i < peaks.len() {
        let triplet = i + 2 < peaks.len() && {
            let (p, q, r) = (&peaks[i], &peaks[i + 1], &peaks[i + 2]);
            let span = r.at - p.at;
            let (low, high) = (p.height.min(r.height), p.height.max(r.height));
            (CONTOUR_MIN_SEPARATION_CM1..=CONTOUR_MAX_SEPARATION_CM1).contains(&span)
                && (q.at - 0.5 * (p.at + r.at)).abs() <= 0.25 * span
                && low >= CONTOUR_HEIGHT_RATIO * high
                && valley(x, smooth, p.at, q.at) >= CONTOUR_VALLEY_FRACTION * p.height.min(q.height)
                && valley(x, smooth, q.at, r.at) >= CONTOUR_VALLEY_FRACTION * q.height.min(r.height)
                && [p, q, r].iter().all(|b| b.shape != Some(Shape::Broad))
        };
        let pair =
            !triplet && i + 1 < peaks.len() && branch_pair(x, smooth, &peaks[i], &peaks[i + 1]);
        let members = if triplet {
            3
        } else if pair {
            2
        } else {
            1
        };
        if members == 1 {
            out.push(peaks[i].clone());
            i += 1;
            continue;
        }
        let group = &peaks[i..i + members];
        // Overlapping water lines: every member in a forest window, none standing out of
        // the forest by its height, at least one as narrow as a line (the others may have
        // been measured wider against their neighbours).
        let forest_group = forests.iter().any(|f| {
            group
                .iter()
                .all(|b| in_window(b.at, f.window) && b.height <= FOREST_STANDOUT * f.median)
                && group
                    .iter()
                    .any(|b| b.fwhm.is_some_and(|w| w <= f.max_width))
        });
        if forest_group {
            for b in group {
                let mut line = b.clone();
                line.kind = BandKind::LineForest;
                out.push(line);
            }
            i += members;
            continue;
        }
        let (p, r) = (&group[0], &group[members - 1]);
        let centre = if triplet {
            group[1].at
        } else {
            0.5 * (p.at + r.at)
        };
        let tallest = group
            .iter()
            .max_by(|a, b| a.height.total_cmp(&b.height))
            .expect("a contour has members");
        let width = (r.at + r.fwhm.unwrap_or(0.0) / 2.0) - (p.at - p.fwhm.unwrap_or(0.0) / 2.0);
        merged_words.push(format!(
            "{} -> {centre:.0}",
            group
                .iter()
                .map(|b| format!("{:.0}", b.at))
                .collect::<Vec<_>>()
                .join("+")
        ));
        out.push(PickedBand {
            at: centre,
            height: tallest.height,
            relative_height: 0.0,
            prominence: tallest.prominence,
            fwhm: Some(width),
            strength: Strength::Weak,
            shape: Some(Shape::from_width(width)),
            kind: BandKind::Contour,
        });
        i += members;
    }
    // A shoulder inside a contour is one of its branches, not a band of its own.
    rest.retain(|s| {
        s.kind != BandKind::Shoulder
            || !out.iter().any(|c| {
                c.kind == BandKind::Contour && (s.at - c.at).abs() <= c.fwhm.unwrap_or(0.0) / 2.0
            })
    });
    if !merged_words.is_empty() {
        notes.push(format!(
            "vapour phase: P/R branch maxima (with a Q branch when present) merged into one band each: {}",
            merged_words.join(", ")
        ));
    }
    out.extend(rest);
    *bands = out;
}

/// Marks atmospheric CO2 ([`BandKind::Co2`]): narrow maxima in [`CO2_WINDOW_CM1`], and in
/// the vapour phase the bend near 667 cm⁻¹ when the stretch was found.
fn mark_co2(bands: &mut [PickedBand], phase: SamplePhase, notes: &mut Vec<String>) {
    let mut found = Vec::new();
    for b in bands.iter_mut() {
        if matches!(b.kind, BandKind::Peak | BandKind::Contour)
            && in_window(b.at, CO2_WINDOW_CM1)
            && b.fwhm.is_none_or(|w| w <= CO2_MAX_FWHM_CM1)
        {
            b.kind = BandKind::Co2;
            found.push(b.at);
        }
    }
    if phase == SamplePhase::Vapour && !found.is_empty() {
        for b in bands.iter_mut() {
            if matches!(b.kind, BandKind::Peak | BandKind::Contour)
                && in_window(b.at, CO2_BEND_WINDOW_CM1)
                && b.fwhm.is_none_or(|w| w <= 20.0)
            {
                b.kind = BandKind::Co2;
                found.push(b.at);
            }
        }
    }
    if !found.is_empty() {
        notes.push(format!(
            "atmospheric CO2 likely at {}: kept in the list as weak (kind co2) and left out of the strength scale",
            found
                .iter()
                .map(|at| format!("{at:.0}"))
                .collect::<Vec<_>>()
                .join(", ")
        ));
    }
}
