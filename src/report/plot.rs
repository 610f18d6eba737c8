//! The spectrum trace a report plots: read from the same bytes the bands were picked from,
//! in absorbance with the baseline removed (as the picker saw it), thinned to at most
//! [`MAX_POINTS`] points by keeping each bin's minimum and maximum so that no band's top is
//! lost.

use crate::ir::{prepare_trace, read_spectrum, ReadOptions, SpectrumData};

/// Points kept at most (pairs of bin minimum and maximum).
pub const MAX_POINTS: usize = 1600;

/// One trace of the library overlay: a spectrum's profile on the library grid (absorbance
/// scaled to 1), over its covered range.
#[derive(Clone, Debug, PartialEq)]
pub struct OverlayTrace {
    /// `unknown` or `#rank name`.
    pub label: String,
    /// Wavenumbers, ascending.
    pub x: Vec<f64>,
    /// Scaled absorbance.
    pub y: Vec<f64>,
}

impl OverlayTrace {
    /// The covered part of a grid spectrum's profile.
    pub fn of_grid(label: String, grid: &crate::library::GridSpectrum) -> OverlayTrace {
        let ks = grid.first..=grid.last;
        OverlayTrace {
            label,
            x: ks.clone().map(crate::library::grid::grid_x).collect(),
            y: ks.map(|k| f64::from(grid.profile[k])).collect(),
        }
    }
}

/// The unknown and its best library hits, for the overlay plot.
#[derive(Clone, Debug, PartialEq)]
pub struct LibraryOverlay {
    /// The unknown first, then the hits best first.
    pub traces: Vec<OverlayTrace>,
}

/// An absorbance trace for plotting: ascending wavenumbers.
#[derive(Clone, Debug, PartialEq)]
pub struct PlotTrace {
    /// Wavenumbers, cm⁻¹, ascending.
    pub x: Vec<f64>,
    /// Absorbance (baseline removed).
    pub y: Vec<f64>,
}

/// The plot trace of a spectrum file's bytes; `None` for a peak table or an unreadable
/// file (the band list is plotted instead).
pub fn trace_from_bytes(bytes: &[u8], origin: &str) -> Option<PlotTrace> {
    let read = read_spectrum(bytes, origin, &ReadOptions::default()).ok()?;
    let SpectrumData::Trace(trace) = &read.data else {
        return None;
    };
    let mut notes = Vec::new();
    let prepared = prepare_trace(trace, true, &mut notes);
    Some(thin(&prepared.x, &prepared.y, MAX_POINTS))
}

/// Keeps each bin's minimum and maximum, in x order, so that at most `max_points` remain.
pub fn thin(x: &[f64], y: &[f64], max_points: usize) -> PlotTrace {
    let n = x.len().min(y.len());
    if n <= max_points || max_points < 2 {
        return PlotTrace {
            x: x[..n].to_vec(),
            y: y[..n].to_vec(),
        };
    }
    let bins = max_points / 2;
    let mut out = PlotTrace {
        x: Vec::with_capacity(max_points),
        y: Vec::with_capacity(max_points),
    };
    for b in 0..bins {
        let start = b * n / bins;
        let end = ((b + 1) * n / bins).max(start + 1).min(n);
        let (mut lo, mut hi) = (start, start);
        for i in start..end {
            if y[i] < y[lo] {
                lo = i;
            }
            if y[i] > y[hi] {
                hi = i;
            }
        }
        for i in if lo <= hi { [lo, hi] } else { [hi, lo] } {
            if out.x.last() != Some(&x[i]) {
                out.x.push(x[i]);
                out.y.push(y[i]);
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn thinning_keeps_the_highest_point_and_the_order() {
        let x: Vec<f64> = (0..10_000).map(f64::from).collect();
        let y: Vec<f64> = x
            .iter()
            .map(|v| if *v == 4321.0 { 5.0 } else { 0.0 })
            .collect();
        let t = thin(&x, &y, 100);
        assert!(t.x.len() <= 100);
        assert!(t.x.windows(2).all(|w| w[0] < w[1]));
        assert!(t.x.contains(&4321.0));
    }
}
