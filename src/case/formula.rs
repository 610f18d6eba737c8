//! The formula text of a case file turned into a neutral molecular formula by the
//! chemistry core's parser; kept in one function so the case layer has one seam to chem.

use crate::chem::{Composition, Formula};

/// A formula problem: message, 0-based byte offset inside the formula text, hint.
pub struct FormulaProblem {
    /// Lower-case message.
    pub message: String,
    /// Offset inside the formula text, when known.
    pub offset: Option<usize>,
    /// Hint.
    pub help: Option<String>,
}

/// Parses a neutral molecular formula (any notation the chemistry core accepts).
pub fn parse_formula(text: &str) -> Result<(Formula, Composition), FormulaProblem> {
    let formula = Formula::parse(text).map_err(|e| FormulaProblem {
        message: e.kind.to_string(),
        offset: Some(e.offset),
        help: e.kind.hint(),
    })?;
    if formula.charge() != 0 {
        return Err(FormulaProblem {
            message: "the case formula is the neutral molecule; give the ion under ms.ion".into(),
            offset: None,
            help: None,
        });
    }
    let composition = formula.composition();
    if composition.dbe().is_none() {
        return Err(FormulaProblem {
            message: "an element of the formula has no standard valence".into(),
            offset: None,
            help: None,
        });
    }
    Ok((formula, composition))
}
