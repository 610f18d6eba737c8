//! The formula text of a case file turned into a neutral molecular formula by the
//! chemistry core's parser; kept in one function so the case layer has one seam to chem.

use super::model::FormulaPart;
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

/// The dot-separated parts of a formula that [`parse_formula`] accepted (`C10H15N·HCl`
/// gives `C10H15N` and `HCl`; `CuSO4·5H2O` gives `CuSO4` and `5H2O` with multiplier 5).
/// A part wholly wrapped in brackets with a count after them, `(C9H13N)2`, gives the
/// bracketed formula with that multiplier. Dots inside brackets do not split.
pub fn formula_parts(text: &str) -> Vec<FormulaPart> {
    let mut pieces: Vec<(usize, &str)> = Vec::new();
    let mut depth = 0usize;
    let mut start = 0usize;
    for (i, c) in text.char_indices() {
        match c {
            '(' | '[' => depth += 1,
            ')' | ']' => depth = depth.saturating_sub(1),
            '.' | '·' | '•' if depth == 0 => {
                pieces.push((start, &text[start..i]));
                start = i + c.len_utf8();
            }
            _ => {}
        }
    }
    pieces.push((start, &text[start..]));
    pieces
        .into_iter()
        .filter_map(|(offset, piece)| {
            let lead = piece.len() - piece.trim_start().len();
            let piece = piece.trim();
            let (multiplier, body) = split_multiplier(piece);
            let formula = Formula::parse(body).ok()?;
            Some(FormulaPart {
                text: piece.to_owned(),
                offset: offset + lead,
                multiplier,
                composition: formula.composition(),
            })
        })
        .collect()
}

/// `5H2O` → (5, `H2O`); `(C9H13N)2` → (2, `C9H13N`); anything else → (1, as written).
fn split_multiplier(piece: &str) -> (u32, &str) {
    let digits = piece.len() - piece.trim_start_matches(|c: char| c.is_ascii_digit()).len();
    if digits > 0 {
        if let Ok(n) = piece[..digits].parse::<u32>() {
            return (n.max(1), piece[digits..].trim_start());
        }
    }
    let trailing = piece.len() - piece.trim_end_matches(|c: char| c.is_ascii_digit()).len();
    let head = &piece[..piece.len() - trailing];
    if trailing > 0 && head.starts_with('(') && head.ends_with(')') {
        // Only when the opening bracket closes at the very end: "(CH3)2CHOH" is not wrapped.
        let inner = &head[1..head.len() - 1];
        let mut depth = 0i32;
        let balanced_inside = inner.chars().all(|c| {
            match c {
                '(' => depth += 1,
                ')' => depth -= 1,
                _ => {}
            }
            depth >= 0
        });
        if balanced_inside && depth == 0 {
            if let Ok(n) = piece[piece.len() - trailing..].parse::<u32>() {
                return (n.max(1), inner);
            }
        }
    }
    (1, piece)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parts_split_at_top_level_dots_with_their_multipliers() {
        let parts = formula_parts("C10H15N·HCl");
        let texts: Vec<(&str, u32, String)> = parts
            .iter()
            .map(|p| (p.text.as_str(), p.multiplier, p.composition.to_string()))
            .collect();
        assert_eq!(
            texts,
            vec![
                ("C10H15N", 1, "C10H15N".to_owned()),
                ("HCl", 1, "ClH".to_owned())
            ]
        );
        assert_eq!(parts[1].offset, "C10H15N·".len());
        let hydrate = formula_parts("C7H5NaO2 . 3H2O");
        assert_eq!(hydrate[1].multiplier, 3);
        assert_eq!(hydrate[1].composition.to_string(), "H2O");
        let sulfate = formula_parts("(C9H13N)2·H2SO4");
        assert_eq!(sulfate[0].multiplier, 2);
        assert_eq!(sulfate[0].composition.to_string(), "C9H13N");
        let plain = formula_parts("(CH3)2CHOH");
        assert_eq!(plain.len(), 1);
        assert_eq!(plain[0].multiplier, 1);
        assert_eq!(plain[0].composition.to_string(), "C3H8O");
    }
}
