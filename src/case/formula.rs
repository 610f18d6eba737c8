//! The formula text of a case file turned into element counts. Kept in one function so
//! that the chemistry core's full parser can take over without touching the rest.

use crate::chem::composition::standard_valence;
use crate::chem::Composition;

/// Parses `C8H8O`-style formulas (element symbols with optional counts, parentheses with
/// multipliers). Message on failure, lower case.
pub fn parse_formula(text: &str) -> Result<Composition, String> {
    let chars: Vec<char> = text.chars().filter(|c| !c.is_whitespace()).collect();
    let mut stack: Vec<Composition> = vec![Composition::new()];
    let mut i = 0;
    let read_count = |i: &mut usize| -> Result<u32, String> {
        let start = *i;
        while *i < chars.len() && chars[*i].is_ascii_digit() {
            *i += 1;
        }
        if start == *i {
            return Ok(1);
        }
        let digits: String = chars[start..*i].iter().collect();
        digits
            .parse::<u32>()
            .ok()
            .filter(|n| *n <= 100_000)
            .ok_or_else(|| format!("count {digits} is too large"))
    };
    while i < chars.len() {
        let c = chars[i];
        if c == '(' {
            stack.push(Composition::new());
            i += 1;
        } else if c == ')' {
            if stack.len() < 2 {
                return Err("unbalanced \")\"".into());
            }
            i += 1;
            let n = read_count(&mut i)?;
            let inner = stack.pop().ok_or("unbalanced \")\"")?;
            let outer = stack.last_mut().ok_or("unbalanced \")\"")?;
            for (s, k) in inner.iter() {
                outer.add(s, k * n);
            }
        } else if c.is_ascii_uppercase() {
            let mut symbol = c.to_string();
            i += 1;
            if i < chars.len() && chars[i].is_ascii_lowercase() {
                symbol.push(chars[i]);
                i += 1;
            }
            if standard_valence(&symbol).is_none() {
                return Err(format!("unknown element symbol \"{symbol}\""));
            }
            let n = read_count(&mut i)?;
            let symbol = if symbol == "D" {
                "H".to_owned()
            } else {
                symbol
            };
            stack.last_mut().ok_or("unbalanced \")\"")?.add(&symbol, n);
        } else {
            return Err(format!(
                "unexpected character \"{c}\" at position {}",
                i + 1
            ));
        }
    }
    if stack.len() != 1 {
        return Err("unbalanced \"(\"".into());
    }
    let composition = stack.pop().unwrap_or_default();
    if composition.n_atoms() == 0 {
        return Err("empty formula".into());
    }
    Ok(composition)
}
