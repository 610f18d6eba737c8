//! The observed band: the unit of IR evidence shared by the band picker, case files and
//! the engine. Words are the ones case files use (`strong | medium | weak`, `broad | sharp`).

use serde::{Deserialize, Serialize};
use std::fmt;

/// Strength class of an observed band relative to the strongest band of the spectrum.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Strength {
    /// A small band, easily lost in noise.
    Weak,
    /// A clear band of middling height.
    Medium,
    /// One of the dominant bands.
    Strong,
}

impl Strength {
    /// All words in increasing order.
    pub const ALL: [Strength; 3] = [Strength::Weak, Strength::Medium, Strength::Strong];

    /// The case-file word.
    pub fn word(self) -> &'static str {
        match self {
            Strength::Weak => "weak",
            Strength::Medium => "medium",
            Strength::Strong => "strong",
        }
    }

    /// Parses the case-file word (exact, lower case).
    pub fn from_word(word: &str) -> Option<Strength> {
        Strength::ALL.into_iter().find(|s| s.word() == word)
    }
}

impl fmt::Display for Strength {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.word())
    }
}

/// Width class of an observed band.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Shape {
    /// Wide band, typically hydrogen-bonded O–H or N–H.
    Broad,
    /// Narrow band.
    Sharp,
}

impl Shape {
    /// The case-file word.
    pub fn word(self) -> &'static str {
        match self {
            Shape::Broad => "broad",
            Shape::Sharp => "sharp",
        }
    }

    /// The shape a full width at half height (cm⁻¹) gives (broad from [`BROAD_FROM_CM1`]).
    pub fn from_width(fwhm: f64) -> Shape {
        if fwhm >= BROAD_FROM_CM1 {
            Shape::Broad
        } else {
            Shape::Sharp
        }
    }

    /// Parses the case-file word (exact, lower case).
    pub fn from_word(word: &str) -> Option<Shape> {
        [Shape::Broad, Shape::Sharp]
            .into_iter()
            .find(|s| s.word() == word)
    }
}

impl fmt::Display for Shape {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.word())
    }
}

/// One observed IR band.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Band {
    /// Position in cm⁻¹.
    pub at: f64,
    /// Strength class.
    pub strength: Strength,
    /// Width class, when the observer stated or measured it.
    #[serde(skip_serializing_if = "Option::is_none", default)]
    pub shape: Option<Shape>,
    /// Full width at half height in cm⁻¹, when measured (a picked band) or stated (a case's
    /// `width`). A measured width outranks the shape word, which is only a hint.
    #[serde(skip_serializing_if = "Option::is_none", default)]
    pub width: Option<f64>,
}

/// Lower edge of the diagnostic region; below it lies the fingerprint region (common practice).
pub const FINGERPRINT_BELOW_CM1: f64 = 1500.0;

/// A band at least this wide (FWHM, cm⁻¹) is broad. In condensed-phase FTIR, sharp
/// stretches and bends (C–H, C=O, C≡N, ring modes) have FWHM of about 5–40 cm⁻¹ and C–O
/// stretches up to about 60 cm⁻¹, while hydrogen-bonded O–H and N–H and the acid O–H
/// envelope span about 100–500 cm⁻¹ (common practice). 75 cm⁻¹ sits in the gap.
pub const BROAD_FROM_CM1: f64 = 75.0;

impl Band {
    /// A band with no stated shape or width.
    pub fn new(at: f64, strength: Strength) -> Band {
        Band {
            at,
            strength,
            shape: None,
            width: None,
        }
    }

    /// The same band with a shape word.
    pub fn with_shape(mut self, shape: Option<Shape>) -> Band {
        self.shape = shape;
        self
    }

    /// The same band with a width (cm⁻¹).
    pub fn with_width(mut self, width: Option<f64>) -> Band {
        self.width = width;
        self
    }

    /// True when the band lies in the diagnostic region (at or above 1500 cm⁻¹).
    pub fn in_diagnostic_region(&self) -> bool {
        self.at >= FINGERPRINT_BELOW_CM1
    }
}
