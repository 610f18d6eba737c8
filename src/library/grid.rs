//! One spectrum on the library's common grid: read, turned into baseline-corrected
//! absorbance by [`crate::ir::prepare_trace`], averaged into 4 cm⁻¹ cells, smoothed to one
//! common resolution, scaled to a maximum of 1 (the *profile*, what plots show), then
//! weighted by region and quantised (the *signature*, what searches compare).
//!
//! The method, step by step (the numbers are this module's constants):
//!
//! 1. **Cells.** Grid point k sits at `GRID_LOW_CM1 + k·GRID_STEP_CM1` and owns the cell
//!    of ±2 cm⁻¹ around it. Its value is the mean of the linearly interpolated spectrum over
//!    the cell (an exact integral), so a 0.24 cm⁻¹ vapour file and a 4 cm⁻¹ ATR file land
//!    on the same footing without aliasing rotational lines. Cells not wholly inside the
//!    measured range are *not covered*.
//! 2. **Common resolution.** A binomial 1-8-28-56-70-56-28-8-1 filter (a Gaussian of
//!    σ = 8 cm⁻¹) brings every spectrum to about 20 cm⁻¹ resolution: calibration shifts,
//!    instrument resolution and vapour-phase rotational structure stop dominating.
//! 3. **Profile.** Scaled so that the largest absorbance in the covered range is 1.
//! 4. **Signature.** The profile multiplied by √w of the region weight w:
//!    [`FINGERPRINT_WEIGHT`] below 1500 cm⁻¹ (where two compounds differ most, common
//!    practice), 1 above, and 0 in 2280–2390 cm⁻¹, the window of atmospheric CO2 that an
//!    imperfect background leaves in either phase. Quantised to i16 (largest value
//!    32 767): 1 776 bytes per spectrum.
//!
//! **Why absorbance and not its first derivative.** Both were tried on the measured
//! gas-phase corpus (`tests/library_measured.rs`, leave-one-out): the first hit was of the
//! same functional-group class for 34 of 54 organic spectra with the smoothed absorbance
//! and 23 of 54 with the first derivative (5-point smoothing), and files of one compound
//! from two sources scored 0.91–1.00 against 0.76–0.94. The derivative amplifies the sharp
//! water-vapour lines and rotational fine structure that vapour spectra carry; the ALS
//! baseline already removes what the derivative would. A fingerprint weight of 1 or 3
//! gave 33 of 54 (weight 2: 34). The smoothing width was chosen the same way (σ = 4 cm⁻¹:
//! 32 of 54).

use crate::diag::Diagnostic;
use crate::ir::{prepare_trace, read_spectrum, HeaderSummary, ReadOptions, SpectrumData};

/// First grid point, cm⁻¹ (mid-IR libraries of both phases reach it or stop above it).
pub const GRID_LOW_CM1: f64 = 450.0;
/// Grid spacing, cm⁻¹ (the usual resolution of routine condensed-phase FTIR libraries).
pub const GRID_STEP_CM1: f64 = 4.0;
/// Grid points: 450 to 3998 cm⁻¹.
pub const GRID_POINTS: usize = 888;
/// Weight of the fingerprint region (below 1500 cm⁻¹) against 1 elsewhere.
pub const FINGERPRINT_WEIGHT: f64 = 2.0;
/// The window left out of comparisons: atmospheric CO2 (asymmetric stretch), cm⁻¹.
pub const CO2_WINDOW_CM1: (f64, f64) = (2280.0, 2390.0);
/// Below this, cm⁻¹, is the fingerprint region.
pub const FINGERPRINT_BELOW_CM1: f64 = crate::ir::band::FINGERPRINT_BELOW_CM1;

/// The wavenumber of grid point `k`.
pub fn grid_x(k: usize) -> f64 {
    GRID_LOW_CM1 + k as f64 * GRID_STEP_CM1
}

/// The grid point nearest to `x` (clamped to the grid).
pub fn grid_index(x: f64) -> usize {
    let k = ((x - GRID_LOW_CM1) / GRID_STEP_CM1).round();
    if k <= 0.0 {
        0
    } else {
        (k as usize).min(GRID_POINTS - 1)
    }
}

/// The weight of grid point `k` in comparisons.
pub fn weight(k: usize) -> f64 {
    let x = grid_x(k);
    if x >= CO2_WINDOW_CM1.0 && x <= CO2_WINDOW_CM1.1 {
        0.0
    } else if x < FINGERPRINT_BELOW_CM1 {
        FINGERPRINT_WEIGHT
    } else {
        1.0
    }
}

/// A spectrum on the grid.
#[derive(Clone, Debug, PartialEq)]
pub struct GridSpectrum {
    /// First covered grid point.
    pub first: usize,
    /// Last covered grid point (inclusive); `first <= last`.
    pub last: usize,
    /// Absorbance scaled to a maximum of 1 over the covered range (0 outside it).
    pub profile: Vec<f32>,
    /// Weighted profile, quantised (0 outside `first ..= last`).
    pub signature: Vec<i16>,
    /// What reading assumed or converted, in order.
    pub notes: Vec<String>,
}

impl GridSpectrum {
    /// The covered range in cm⁻¹.
    pub fn range_cm1(&self) -> (f64, f64) {
        (grid_x(self.first), grid_x(self.last))
    }
}

/// Why a spectrum cannot go on the grid.
#[derive(Clone, Debug, PartialEq)]
pub enum GridError {
    /// The file cannot be read; the reader's diagnostics.
    Unreadable(Vec<Diagnostic>),
    /// The file holds a peak table, not a trace.
    PeakTable,
    /// Too little of the spectrum lies on the grid (covered cells, needed).
    TooNarrow(usize, usize),
    /// The spectrum is flat: nothing to compare.
    Flat,
}

impl std::fmt::Display for GridError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            GridError::Unreadable(d) => write!(
                f,
                "the spectrum cannot be read: {}",
                d.first().map_or_else(|| "unknown problem".to_owned(), |d| d.message.clone())
            ),
            GridError::PeakTable => f.write_str(
                "the file holds a peak table, not a full spectrum: library search compares whole traces",
            ),
            GridError::TooNarrow(got, need) => write!(
                f,
                "only {got} grid cells of {GRID_STEP_CM1} cm⁻¹ lie inside the measured range ({need} needed, 450–4000 cm⁻¹ is the grid)"
            ),
            GridError::Flat => f.write_str("the spectrum is flat: it has no band to compare"),
        }
    }
}

/// Fewest covered cells a spectrum must have (1000 cm⁻¹).
pub const MIN_COVERED_CELLS: usize = 250;

/// Reads a spectrum file's bytes and puts it on the grid.
pub fn grid_from_bytes(bytes: &[u8], origin: &str) -> Result<GridSpectrum, GridError> {
    read_grid(bytes, origin).map(|(_, grid)| grid)
}

/// Reads a spectrum file's bytes: its header summary and the spectrum on the grid.
pub fn read_grid(bytes: &[u8], origin: &str) -> Result<(HeaderSummary, GridSpectrum), GridError> {
    let read =
        read_spectrum(bytes, origin, &ReadOptions::default()).map_err(GridError::Unreadable)?;
    let SpectrumData::Trace(trace) = &read.data else {
        return Err(GridError::PeakTable);
    };
    let mut notes = read.notes.clone();
    let prepared = prepare_trace(trace, true, &mut notes);
    let mut grid = grid_from_trace(&prepared.x, &prepared.y)?;
    notes.append(&mut grid.notes);
    grid.notes = notes;
    Ok((read.header, grid))
}

/// Puts an ascending absorbance trace on the grid (steps 1–4 of the module text).
pub fn grid_from_trace(x: &[f64], y: &[f64]) -> Result<GridSpectrum, GridError> {
    let n = x.len().min(y.len());
    if n < 2 {
        return Err(GridError::TooNarrow(0, MIN_COVERED_CELLS));
    }
    let (x, y) = (&x[..n], &y[..n]);
    let half = GRID_STEP_CM1 / 2.0;
    let covered: Vec<usize> = (0..GRID_POINTS)
        .filter(|&k| grid_x(k) - half >= x[0] && grid_x(k) + half <= x[n - 1])
        .collect();
    let (Some(&first), Some(&last)) = (covered.first(), covered.last()) else {
        return Err(GridError::TooNarrow(0, MIN_COVERED_CELLS));
    };
    if covered.len() < MIN_COVERED_CELLS {
        return Err(GridError::TooNarrow(covered.len(), MIN_COVERED_CELLS));
    }
    // Cumulative integral at the sample points, then cell means from it.
    let mut integral = Vec::with_capacity(n);
    integral.push(0.0);
    for j in 1..n {
        let prev = integral[j - 1];
        integral.push(prev + 0.5 * (y[j] + y[j - 1]) * (x[j] - x[j - 1]));
    }
    let mut j = 0;
    let mut integral_at = |at: f64| -> f64 {
        while j + 2 < n && x[j + 1] <= at {
            j += 1;
        }
        while j > 0 && x[j] > at {
            j -= 1;
        }
        let h = x[j + 1] - x[j];
        let d = (at - x[j]).clamp(0.0, h);
        let slope = if h > 0.0 { (y[j + 1] - y[j]) / h } else { 0.0 };
        integral[j] + y[j] * d + 0.5 * slope * d * d
    };
    let mut cells = vec![0.0f64; GRID_POINTS];
    let mut low_edge = integral_at(grid_x(first) - half);
    for (k, cell) in cells.iter_mut().enumerate().take(last + 1).skip(first) {
        let high_edge = integral_at(grid_x(k) + half);
        *cell = (high_edge - low_edge) / GRID_STEP_CM1;
        low_edge = high_edge;
    }
    // Binomial smoothing inside the covered range (weights renormalised at its ends).
    const KERNEL: [f64; 9] = [1.0, 8.0, 28.0, 56.0, 70.0, 56.0, 28.0, 8.0, 1.0];
    let mut smooth = vec![0.0f64; GRID_POINTS];
    for (k, out) in smooth.iter_mut().enumerate().take(last + 1).skip(first) {
        let (mut sum, mut total) = (0.0, 0.0);
        for (o, w) in KERNEL.iter().enumerate() {
            let Some(i) = (k + o).checked_sub(KERNEL.len() / 2) else {
                continue;
            };
            if i >= first && i <= last {
                sum += w * cells[i];
                total += w;
            }
        }
        *out = sum / total;
    }
    let max = smooth[first..=last]
        .iter()
        .copied()
        .fold(f64::NEG_INFINITY, f64::max);
    let min = smooth[first..=last]
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min);
    if !(max.is_finite() && min.is_finite()) || max - min <= 1e-12 || max <= 0.0 {
        return Err(GridError::Flat);
    }
    let profile: Vec<f32> = smooth
        .iter()
        .enumerate()
        .map(|(k, v)| {
            if k >= first && k <= last {
                (v / max) as f32
            } else {
                0.0
            }
        })
        .collect();
    let weighted: Vec<f64> = profile
        .iter()
        .enumerate()
        .map(|(k, v)| f64::from(*v) * weight(k).sqrt())
        .collect();
    let largest = weighted.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    if largest <= 1e-9 {
        return Err(GridError::Flat);
    }
    let signature = weighted
        .iter()
        .map(|v| (v / largest * f64::from(i16::MAX)).round() as i16)
        .collect();
    Ok(GridSpectrum {
        first,
        last,
        profile,
        signature,
        notes: Vec::new(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ir::synth::{synthesize, SynthBand};

    fn bands() -> Vec<SynthBand> {
        vec![
            SynthBand::lorentzian(1715.0, 16.0, 1.0),
            SynthBand::lorentzian(1360.0, 12.0, 0.5),
            SynthBand::gaussian(2950.0, 40.0, 0.4),
        ]
    }

    #[test]
    fn the_grid_ends_below_4000() {
        assert_eq!(grid_x(GRID_POINTS - 1), 3998.0);
        assert_eq!(grid_index(1715.0), 316);
        assert_eq!(grid_index(10.0), 0);
        assert_eq!(grid_index(9000.0), GRID_POINTS - 1);
    }

    #[test]
    fn fine_and_coarse_sampling_of_one_spectrum_land_on_nearly_the_same_grid() {
        let fine = synthesize(&bands(), 400.0, 4000.0, 0.25, 0.0, 0.0, 0.0, 0.0, 1);
        let coarse = synthesize(&bands(), 400.0, 4000.0, 3.0, 0.0, 0.0, 0.0, 0.0, 1);
        let a = grid_from_trace(&fine.x, &fine.y).expect("fine");
        let b = grid_from_trace(&coarse.x, &coarse.y).expect("coarse");
        assert_eq!((a.first, a.last), (0, GRID_POINTS - 1));
        let worst = a
            .profile
            .iter()
            .zip(&b.profile)
            .map(|(p, q)| (p - q).abs())
            .fold(0.0f32, f32::max);
        assert!(worst < 0.02, "{worst}");
        // The profile peaks at the strongest band.
        let top = (0..GRID_POINTS)
            .max_by(|&i, &j| a.profile[i].total_cmp(&a.profile[j]))
            .expect("points");
        assert!((grid_x(top) - 1715.0).abs() <= 4.0);
    }

    #[test]
    fn partial_coverage_is_kept_and_the_co2_window_weighs_nothing() {
        let s = synthesize(&bands(), 650.0, 4000.0, 1.0, 0.0, 0.0, 0.0, 0.0, 1);
        let g = grid_from_trace(&s.x, &s.y).expect("grid");
        assert_eq!(grid_x(g.first), 654.0);
        assert!(g.signature[..g.first].iter().all(|v| *v == 0));
        assert!(g.signature[grid_index(2340.0)] == 0);
        assert_eq!(weight(grid_index(1000.0)), FINGERPRINT_WEIGHT);
    }

    #[test]
    fn narrow_and_flat_spectra_are_refused_with_the_reason() {
        let s = synthesize(&bands(), 1600.0, 1800.0, 1.0, 0.0, 0.0, 0.0, 0.0, 1);
        assert!(matches!(
            grid_from_trace(&s.x, &s.y),
            Err(GridError::TooNarrow(_, MIN_COVERED_CELLS))
        ));
        let x: Vec<f64> = (0..3000).map(|i| 500.0 + f64::from(i)).collect();
        let y = vec![0.3; x.len()];
        assert_eq!(grid_from_trace(&x, &y), Err(GridError::Flat));
    }
}
