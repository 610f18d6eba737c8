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
