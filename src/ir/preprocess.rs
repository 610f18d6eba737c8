//! Preprocessing: transmittance to absorbance, uniform resampling, baseline correction by
//! asymmetric least squares, and Savitzky–Golay smoothing and derivatives.

/// Transmittance (fraction) below this is clamped before A = −log10 T: absorbance above 4
/// means less than 0.01 % of the light reaches the detector, under the noise floor of
/// mid-IR detectors, so larger values carry no information (and T ≤ 0, which ratioing
/// noise produces at the bottom of saturated bands, has no logarithm).
pub const TRANSMITTANCE_FLOOR: f64 = 1.0e-4;

/// Converts transmittance (fraction) to absorbance in place, A = −log10 max(T, floor).
/// Returns how many points were clamped at [`TRANSMITTANCE_FLOOR`].
pub fn transmittance_to_absorbance(y: &mut [f64]) -> usize {
    let mut clamped = 0;
    for v in y.iter_mut() {
        if *v < TRANSMITTANCE_FLOOR {
            clamped += 1;
            *v = TRANSMITTANCE_FLOOR;
        }
        *v = -v.log10();
    }
    clamped
}

/// True when `x` is evenly spaced within 1 % of its median step.
pub fn is_uniform(x: &[f64]) -> bool {
    if x.len() < 3 {
        return true;
    }
    // On an even grid the mean step is the median step; no sort needed to confirm it.
    let mean = (x[x.len() - 1] - x[0]) / (x.len() - 1) as f64;
    if x.windows(2)
        .all(|w| ((w[1] - w[0]) - mean).abs() <= 0.01 * mean.abs())
    {
        return true;
    }
    let step = median_step(x);
    x.windows(2)
        .all(|w| ((w[1] - w[0]) - step).abs() <= 0.01 * step.abs())
}

/// Median spacing of `x`.
pub fn median_step(x: &[f64]) -> f64 {
    let mut steps: Vec<f64> = x.windows(2).map(|w| w[1] - w[0]).collect();
    if steps.is_empty() {
        return 0.0;
    }
    steps.sort_by(f64::total_cmp);
    steps[steps.len() / 2]
}

/// Resamples `(x, y)` (x strictly increasing) onto an even grid of `step` from `x[0]`, by
/// linear interpolation.
pub fn resample_uniform(x: &[f64], y: &[f64], step: f64) -> (Vec<f64>, Vec<f64>) {
    if x.len() < 2 || step <= 0.0 || !step.is_finite() {
        return (x.to_vec(), y.to_vec());
    }
    let first = x[0];
    let last = x[x.len() - 1];
    let n = ((last - first) / step).floor() as usize + 1;
    let mut gx = Vec::with_capacity(n);
    let mut gy = Vec::with_capacity(n);
    let mut j = 0;
    for i in 0..n {
        let xi = first + i as f64 * step;
        while j + 2 < x.len() && x[j + 1] < xi {
            j += 1;
        }
        let (x0, x1, y0, y1) = (x[j], x[j + 1], y[j], y[j + 1]);
        let t = if x1 > x0 { (xi - x0) / (x1 - x0) } else { 0.0 };
        gx.push(xi);
        gy.push(y0 + t.clamp(0.0, 1.0) * (y1 - y0));
    }
    (gx, gy)
}

/// Solves `(diag(w) + λ DᵀD) z = w∘y`, D the second-difference operator, by a banded
/// LDLᵀ factorisation of the symmetric pentadiagonal matrix (O(n)).
pub fn whittaker_solve(y: &[f64], w: &[f64], lambda: f64) -> Vec<f64> {
    let n = y.len();
    if n < 3 {
        return y.to_vec();
    }
    // DᵀD bands: main [1,5,6,…,6,5,1], first off-diagonal [-2,-4,…,-4,-2], second [1,…].
    let mut main = vec![6.0; n];
    main[0] = 1.0;
    main[n - 1] = 1.0;
    if n > 3 {
        main[1] = 5.0;
        main[n - 2] = 5.0;
    } else {
        main[1] = 4.0;
    }
    let mut off1 = vec![-4.0; n - 1];
    off1[0] = -2.0;
    off1[n - 2] = -2.0;
    let d: Vec<f64> = (0..n).map(|i| w[i] + lambda * main[i]).collect();
    let e: Vec<f64> = off1.iter().map(|v| lambda * v).collect();
    let f = lambda;
    let mut dd = vec![0.0; n];
    let mut l1 = vec![0.0; n];
    let mut l2 = vec![0.0; n];
    for i in 0..n {
        let mut di = d[i];
        if i >= 1 {
            di -= l1[i - 1] * l1[i - 1] * dd[i - 1];
        }
        if i >= 2 {
            di -= l2[i - 2] * l2[i - 2] * dd[i - 2];
        }
        dd[i] = di;
        if i + 1 < n {
            let mut a = e[i];
            if i >= 1 {
                a -= l2[i - 1] * l1[i - 1] * dd[i - 1];
            }
            l1[i] = a / di;
        }
        if i + 2 < n {
            l2[i] = f / di;
        }
    }
    let mut z: Vec<f64> = (0..n).map(|i| w[i] * y[i]).collect();
    for i in 0..n {
        if i >= 1 {
            z[i] -= l1[i - 1] * z[i - 1];
        }
        if i >= 2 {
            z[i] -= l2[i - 2] * z[i - 2];
        }
    }
    for i in 0..n {
        z[i] /= dd[i];
    }
    for i in (0..n).rev() {
        if i + 1 < n {
            z[i] -= l1[i] * z[i + 1];
        }
        if i + 2 < n {
            z[i] -= l2[i] * z[i + 2];
        }
    }
    z
}

/// Parameters of the asymmetric least squares baseline (Eilers & Boelens 2005).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct AlsParams {
    /// Stiffness as a length in cm⁻¹: λ = (length / spacing)⁴, so the baseline bends the
    /// same on any point spacing. 800 cm⁻¹ keeps the baseline under broad hydrogen-bonded
    /// O–H bands (FWHM up to ~400 cm⁻¹) while following slow drift; linear slopes are
    /// followed exactly at any stiffness.
    pub stiffness_cm1: f64,
    /// Weight of points above the baseline (those below get 1 − p). Eilers & Boelens
    /// suggest 0.001–0.1; 0.01 is used.
    pub asymmetry: f64,
    /// Reweighting rounds (stops earlier when the weights settle).
    pub iterations: usize,
    /// The baseline is fitted on bin means of this width (cm⁻¹) and interpolated back:
    /// a smooth curve needs no finer grid, and it keeps λ well conditioned and the solve fast.
    pub grid_cm1: f64,
}

impl Default for AlsParams {
    fn default() -> AlsParams {
        AlsParams {
            stiffness_cm1: 800.0,
            asymmetry: 0.01,
            iterations: 12,
            grid_cm1: 4.0,
        }
    }
}

/// The asymmetric least squares fit itself (Eilers & Boelens 2005) on evenly spaced points:
/// starting from unit weights, solve the Whittaker smoother with second differences and
/// penalty `lambda`, give points above the fit weight `asymmetry` and the others
/// `1 − asymmetry`, and repeat until the weights stop changing or `iterations` rounds.
pub fn als_fit(y: &[f64], lambda: f64, asymmetry: f64, iterations: usize) -> Vec<f64> {
    let m = y.len();
    let mut w = vec![1.0; m];
    let mut z = y.to_vec();
    for _ in 0..iterations.max(1) {
        z = whittaker_solve(y, &w, lambda);
        let mut changed = false;
        for i in 0..m {
            let new = if y[i] > z[i] {
                asymmetry
            } else {
                1.0 - asymmetry
            };
            if new != w[i] {
                changed = true;
                w[i] = new;
            }
        }
        if !changed {
            break;
        }
    }
    z
}

/// Asymmetric least squares baseline of `y` on the evenly spaced ascending grid `x`
/// (Eilers & Boelens 2005, "Baseline correction with asymmetric least squares
/// smoothing"). Bands are maxima; the baseline runs under them.
pub fn als_baseline(x: &[f64], y: &[f64], params: &AlsParams) -> Vec<f64> {
    let n = y.len();
    if n < 4 {
        return vec![y.iter().copied().fold(f64::INFINITY, f64::min); n];
    }
    let step = (x[n - 1] - x[0]) / (n - 1) as f64;
    let per_bin = ((params.grid_cm1 / step).round() as usize).max(1);
    // Bin means.
    let mut bx = Vec::with_capacity(n / per_bin + 1);
    let mut by = Vec::with_capacity(n / per_bin + 1);
    for (cx, cy) in x.chunks(per_bin).zip(y.chunks(per_bin)) {
        let k = cx.len() as f64;
        bx.push(cx.iter().sum::<f64>() / k);
        by.push(cy.iter().sum::<f64>() / k);
    }
    let m = by.len();
    let coarse_step = step * per_bin as f64;
    let lambda = (params.stiffness_cm1 / coarse_step).powi(4);
    let z = als_fit(&by, lambda, params.asymmetry, params.iterations);
    if m < 2 {
        return vec![z[0]; n];
    }
    // Back to the fine grid by linear interpolation (extended linearly beyond the centres
    // of the end bins, which lie half a bin inside the spectrum).
    let mut out = Vec::with_capacity(n);
    let mut j = 0;
    for &xi in x {
        while j + 2 < m && bx[j + 1] < xi {
            j += 1;
        }
        let t = (xi - bx[j]) / (bx[j + 1] - bx[j]);
        out.push(z[j] + t * (z[j + 1] - z[j]));
    }
    out
}

/// Inverts a small square matrix by Gauss–Jordan elimination with partial pivoting.
fn invert(mut a: Vec<Vec<f64>>) -> Option<Vec<Vec<f64>>> {
    let n = a.len();
    let mut inv: Vec<Vec<f64>> = (0..n)
        .map(|i| (0..n).map(|j| if i == j { 1.0 } else { 0.0 }).collect())
        .collect();
    for col in 0..n {
        let pivot = (col..n).max_by(|&r, &s| a[r][col].abs().total_cmp(&a[s][col].abs()))?;
        if a[pivot][col].abs() < 1e-300 {
            return None;
        }
        a.swap(col, pivot);
        inv.swap(col, pivot);
        let p = a[col][col];
        for j in 0..n {
            a[col][j] /= p;
            inv[col][j] /= p;
        }
        for r in 0..n {
            if r != col {
                let factor = a[r][col];
                if factor != 0.0 {
                    for j in 0..n {
                        a[r][j] -= factor * a[col][j];
                        inv[r][j] -= factor * inv[col][j];
                    }
                }
            }
        }
    }
    Some(inv)
}

/// Savitzky–Golay weights (Savitzky & Golay 1964): least-squares polynomial of degree
/// `order` through the window offsets `-half..=half`, evaluated (its `derivative`-th
/// derivative, per point spacing) at offset `at`. Dot the weights with the window.
pub fn savgol_weights(half: usize, order: usize, derivative: usize, at: f64) -> Vec<f64> {
    let size = 2 * half + 1;
    let order = order.min(size - 1);
    let offsets: Vec<f64> = (0..size).map(|i| i as f64 - half as f64).collect();
    // Normal matrix JᵀJ.
    let mut normal = vec![vec![0.0; order + 1]; order + 1];
    for (j, row) in normal.iter_mut().enumerate() {
        for (k, cell) in row.iter_mut().enumerate() {
            *cell = offsets.iter().map(|t| t.powi((j + k) as i32)).sum();
        }
    }
    let Some(inv) = invert(normal) else {
        return vec![0.0; size];
    };
    // Derivative of t^j at `at`.
    let basis: Vec<f64> = (0..=order)
        .map(|j| {
            if j < derivative {
                0.0
            } else {
                let falling: f64 = ((j - derivative + 1)..=j).map(|v| v as f64).product();
                falling * at.powi((j - derivative) as i32)
            }
        })
        .collect();
    // weights_i = Σ_j basis_j Σ_k inv[j][k] t_i^k
    offsets
        .iter()
        .map(|t| {
            (0..=order)
                .map(|j| {
                    basis[j]
                        * (0..=order)
                            .map(|k| inv[j][k] * t.powi(k as i32))
                            .sum::<f64>()
                })
                .sum()
        })
        .collect()
}

/// Savitzky–Golay filter of `y` with window `2·half + 1` and polynomial `order`;
/// `derivative` 0 smooths, 1 and 2 give derivatives per point spacing. The ends use the
/// polynomial fitted to the first (last) full window, evaluated off-centre.
pub fn savgol(y: &[f64], half: usize, order: usize, derivative: usize) -> Vec<f64> {
    let n = y.len();
    let size = 2 * half + 1;
    if half == 0 || n < size {
        return if derivative == 0 {
            y.to_vec()
        } else {
            vec![0.0; n]
        };
    }
    let centre = savgol_weights(half, order, derivative, 0.0);
    let mut out = vec![0.0; n];
    for i in half..n - half {
        out[i] = centre
            .iter()
            .zip(&y[i - half..=i + half])
            .map(|(w, v)| w * v)
            .sum();
    }
    for i in 0..half {
        let wl = savgol_weights(half, order, derivative, i as f64 - half as f64);
        out[i] = wl.iter().zip(&y[..size]).map(|(w, v)| w * v).sum();
        let wr = savgol_weights(half, order, derivative, half as f64 - i as f64);
        out[n - 1 - i] = wr.iter().zip(&y[n - size..]).map(|(w, v)| w * v).sum();
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn savgol_five_point_quadratic_weights_match_the_published_table() {
        // Savitzky & Golay 1964, smoothing table, 5 points, quadratic/cubic:
        // (-3, 12, 17, 12, -3) / 35 (from memory; the best-known row of the table).
        let w = savgol_weights(2, 2, 0, 0.0);
        let expected = [-3.0, 12.0, 17.0, 12.0, -3.0].map(|v| v / 35.0);
        for (a, b) in w.iter().zip(expected) {
            assert!((a - b).abs() < 1e-12, "{w:?}");
        }
        // Second derivative, 5 points, quadratic: (2, -1, -2, -1, 2) / 7 (from memory).
        let d2 = savgol_weights(2, 2, 2, 0.0);
        let expected = [2.0, -1.0, -2.0, -1.0, 2.0].map(|v| v / 7.0);
        for (a, b) in d2.iter().zip(expected) {
            assert!((a - b).abs() < 1e-12, "{d2:?}");
        }
    }

    #[test]
    fn whittaker_solve_matches_a_dense_solve() {
        let y = [1.0, 3.0, 2.0, 5.0, 4.0, 6.0, 2.0];
        let w = [1.0, 0.5, 1.0, 0.01, 1.0, 1.0, 0.3];
        let lambda = 2.5;
        let z = whittaker_solve(&y, &w, lambda);
        // Dense check: (W + λ DᵀD) z == W y.
        let n = y.len();
        let mut dtd = vec![vec![0.0; n]; n];
        for r in 0..n - 2 {
            let row = [(r, 1.0), (r + 1, -2.0), (r + 2, 1.0)];
            for &(i, a) in &row {
                for &(j, b) in &row {
                    dtd[i][j] += a * b;
                }
            }
        }
        for i in 0..n {
            let lhs: f64 = (0..n)
                .map(|j| (if i == j { w[i] } else { 0.0 } + lambda * dtd[i][j]) * z[j])
                .sum();
            assert!((lhs - w[i] * y[i]).abs() < 1e-9);
        }
    }

    #[test]
    fn a_straight_sloping_baseline_is_removed_exactly() {
        let x: Vec<f64> = (0..2000).map(|i| 400.0 + i as f64).collect();
        let y: Vec<f64> = x.iter().map(|v| 0.1 + 2e-5 * v).collect();
        let b = als_baseline(&x, &y, &AlsParams::default());
        for (a, b) in y.iter().zip(&b) {
            assert!((a - b).abs() < 1e-6);
        }
    }

    #[test]
    fn transmittance_floor_clamps_zero_and_negative_values() {
        let mut y = [1.0, 0.1, 0.0, -0.01];
        assert_eq!(transmittance_to_absorbance(&mut y), 2);
        assert_eq!(y, [0.0, 1.0, 4.0, 4.0]);
    }
}
