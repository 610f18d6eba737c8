//! Invented spectra for demos, tests and benchmarks: sums of Lorentzian and Gaussian bands
//! of known centre, width and height on a chosen baseline, with reproducible noise. Nothing
//! here is measured data.

/// Band profile.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Profile {
    /// Lorentzian (Cauchy) profile.
    Lorentzian,
    /// Gaussian profile.
    Gaussian,
}

/// One invented band.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SynthBand {
    /// Centre, cm⁻¹.
    pub centre: f64,
    /// Full width at half maximum, cm⁻¹.
    pub fwhm: f64,
    /// Peak absorbance.
    pub height: f64,
    /// Profile.
    pub profile: Profile,
}

impl SynthBand {
    /// A Lorentzian band.
    pub fn lorentzian(centre: f64, fwhm: f64, height: f64) -> SynthBand {
        SynthBand {
            centre,
            fwhm,
            height,
            profile: Profile::Lorentzian,
        }
    }

    /// A Gaussian band.
    pub fn gaussian(centre: f64, fwhm: f64, height: f64) -> SynthBand {
        SynthBand {
            centre,
            fwhm,
            height,
            profile: Profile::Gaussian,
        }
    }

    /// Absorbance of this band at wavenumber `x`.
    pub fn at(&self, x: f64) -> f64 {
        let d = x - self.centre;
        match self.profile {
            Profile::Lorentzian => {
                let g = self.fwhm / 2.0;
                self.height * g * g / (d * d + g * g)
            }
            Profile::Gaussian => {
                let s = self.fwhm / (2.0 * (2.0 * 2f64.ln()).sqrt());
                self.height * (-0.5 * d * d / (s * s)).exp()
            }
        }
    }
}

/// A small reproducible random source (xorshift64*), so invented spectra are the same on
/// every machine without a dependency.
#[derive(Clone, Debug)]
pub struct Noise {
    state: u64,
}

impl Noise {
    /// A source seeded with `seed` (0 is replaced by a fixed odd constant).
    pub fn new(seed: u64) -> Noise {
        Noise {
            state: if seed == 0 {
                0x9e37_79b9_7f4a_7c15
            } else {
                seed
            },
        }
    }

    /// Next raw 64-bit value.
    pub fn next_u64(&mut self) -> u64 {
        let mut x = self.state;
        x ^= x >> 12;
        x ^= x << 25;
        x ^= x >> 27;
        self.state = x;
        x.wrapping_mul(0x2545_f491_4f6c_dd1d)
    }

    /// Uniform in [0, 1).
    pub fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }

    /// Standard normal (Box–Muller).
    pub fn normal(&mut self) -> f64 {
        let u1 = self.uniform().max(1e-300);
        let u2 = self.uniform();
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }
}

/// An invented absorbance spectrum on an even grid.
#[derive(Clone, Debug, PartialEq)]
pub struct SynthSpectrum {
    /// Wavenumbers, ascending.
    pub x: Vec<f64>,
    /// Absorbance.
    pub y: Vec<f64>,
}

/// Sums `bands` on the grid `low..=high` with `step`, adds the baseline
/// `offset + slope·(x − low) + curvature·((x − low)/(high − low))²` and Gaussian noise of
/// standard deviation `noise` from `seed`.
#[allow(clippy::too_many_arguments)]
pub fn synthesize(
    bands: &[SynthBand],
    low: f64,
    high: f64,
    step: f64,
    offset: f64,
    slope: f64,
    curvature: f64,
    noise: f64,
    seed: u64,
) -> SynthSpectrum {
    let n = ((high - low) / step).round() as usize + 1;
    let mut rng = Noise::new(seed);
    let x: Vec<f64> = (0..n).map(|i| low + i as f64 * step).collect();
    let y = x
        .iter()
        .map(|&xi| {
            let t = (xi - low) / (high - low);
            let base = offset + slope * (xi - low) + curvature * t * t;
            let bands: f64 = bands.iter().map(|b| b.at(xi)).sum();
            base + bands + noise * rng.normal()
        })
        .collect();
    SynthSpectrum { x, y }
}

/// An invented vapour-phase rotation–vibration contour centred on `centre`: P and R
/// branches (Gaussian, FWHM `branch_fwhm`) at `centre ∓ separation / 2`, and a Q branch
/// (Lorentzian, FWHM `q_fwhm`) at `centre` of `q_fraction` times the branch height.
/// Heights are scaled so that the contour's tallest point is `height`.
pub fn contour(
    centre: f64,
    height: f64,
    separation: f64,
    branch_fwhm: f64,
    q_fraction: f64,
    q_fwhm: f64,
) -> Vec<SynthBand> {
    let mut bands = vec![
        SynthBand::gaussian(centre - separation / 2.0, branch_fwhm, 1.0),
        SynthBand::gaussian(centre + separation / 2.0, branch_fwhm, 1.0),
    ];
    if q_fraction > 0.0 {
        bands.push(SynthBand::lorentzian(centre, q_fwhm, q_fraction));
    }
    let top = (0..=400)
        .map(|i| centre - separation + i as f64 * separation / 200.0)
        .map(|x| bands.iter().map(|b| b.at(x)).sum::<f64>())
        .fold(0.0f64, f64::max);
    for b in &mut bands {
        b.height *= height / top;
    }
    bands
}

/// An invented forest of narrow lines like those of water vapour: irregularly spaced
/// (6–16 cm⁻¹ apart) Lorentzian lines of FWHM `line_fwhm` in 1350–1950 and 3550–3950
/// cm⁻¹, heights spread over 1.5 decades below `max_height`. Positions and heights are
/// pseudo-random from `seed`, not the molecule's real line list.
pub fn line_forest(max_height: f64, line_fwhm: f64, seed: u64) -> Vec<SynthBand> {
    let mut rng = Noise::new(seed);
    let mut out = Vec::new();
    for (lo, hi) in [(1350.0, 1950.0), (3550.0, 3950.0)] {
        let mut at = lo + 10.0 * rng.uniform();
        while at < hi {
            let h = max_height * 10f64.powf(-1.5 * rng.uniform());
            out.push(SynthBand::lorentzian(at, line_fwhm, h));
            at += 6.0 + 10.0 * rng.uniform();
        }
    }
    out
}

/// Invented atmospheric CO2 left by an imperfect background: the asymmetric-stretch P and
/// R maxima near 2338 and 2360 cm⁻¹ (Gaussian, FWHM `branch_fwhm`) of height `height`,
/// and the bend's sharp Q branch at 667 cm⁻¹ at half that height.
pub fn co2(height: f64, branch_fwhm: f64) -> Vec<SynthBand> {
    vec![
        SynthBand::gaussian(2338.0, branch_fwhm, height),
        SynthBand::gaussian(2360.0, branch_fwhm, height * 0.9),
        SynthBand::lorentzian(667.0, 3.0, height * 0.5),
    ]
}

/// Two-column text (wavenumber, percent transmittance) of an absorbance spectrum, highest
/// wavenumber first as spectrometers write it, with a header line naming the units.
pub fn transmittance_text(spectrum: &SynthSpectrum) -> String {
    let mut out = String::from("wavenumber (cm-1),transmittance (%)\n");
    for (x, a) in spectrum.x.iter().zip(&spectrum.y).rev() {
        out.push_str(&format!("{x:.2},{:.5}\n", 100.0 * 10f64.powf(-a)));
    }
    out
}
