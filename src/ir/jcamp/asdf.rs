//! AFFN and ASDF: the number forms of JCAMP-DX data lines (McDonald & Wilks 1988, §5 and
//! Table VII). One tokenizer reads every form and any mix of them, because the first
//! character of each value says which form it is in.
//!
//! Grammar of one data line (after the `$$` comment is stripped):
//! ```text
//! line      = *sep value *( *sep value ) *sep
//! sep       = " " | TAB | "," | ";"
//! value     = affn | sqz | dif | dup
//! affn      = [ "+" | "-" ] ( digits [ "." *digit ] | "." digits ) [ "E" ( "+" | "-" ) digits ]
//! sqz       = sqz-digit *( digit | "." )       ; actual value, sign and first digit in one
//! sqz-digit = "@" | "A".."I" | "a".."i"        ; 0, +1..+9, -1..-9
//! dif       = dif-digit *( digit | "." )       ; difference from the previous ordinate
//! dif-digit = "%" | "J".."R" | "j".."r"        ; 0, +1..+9, -1..-9
//! dup       = dup-digit *digit                 ; repeat count of the previous value, itself included
//! dup-digit = "S".."Z" | "s"                   ; 1..9
//! ```
//! A `+` or `-` always starts a new AFFN value, so the packed form (PAC, `1+2-3`) needs no
//! rule of its own. `E` is an exponent only when a sign and a digit follow it; otherwise it
//! is the SQZ digit +5. `?` and the words `NaN` / `inf` are rejected as not-a-number.

use super::error::{JcampError, JcampErrorKind};

/// One value of a data line.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Token {
    /// An actual value (AFFN or SQZ).
    Actual(f64),
    /// A difference from the previous ordinate (DIF).
    Dif(f64),
    /// A duplicate count (DUP): the previous value or difference occurs `n` times in all.
    Dup(u32),
}

/// A token with its 0-based column.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Located {
    /// The token.
    pub token: Token,
    /// 0-based column of its first character.
    pub column: usize,
}

fn is_sep(b: u8) -> bool {
    matches!(b, b' ' | b'\t' | b',' | b';')
}

/// Reads the digits and dots following a pseudo-digit and builds the value.
fn pseudo_number(bytes: &[u8], start: usize, lead: u32, negative: bool) -> (f64, usize) {
    // Fast path: digits only (the usual case), accumulated exactly while they fit in 2^53.
    let mut end = start;
    let mut value = u64::from(lead);
    let mut exact = true;
    while end < bytes.len() && bytes[end].is_ascii_digit() {
        value = value
            .saturating_mul(10)
            .saturating_add(u64::from(bytes[end] - b'0'));
        exact &= value < (1u64 << 53);
        end += 1;
    }
    if exact && bytes.get(end) != Some(&b'.') {
        let v = value as f64;
        return (if negative { -v } else { v }, end);
    }
    let mut end = start;
    while end < bytes.len() && (bytes[end].is_ascii_digit() || bytes[end] == b'.') {
        end += 1;
    }
    let mut text = String::with_capacity(end - start + 2);
    if negative {
        text.push('-');
    }
    text.push(char::from_digit(lead, 10).unwrap_or('0'));
    // The slice holds only ASCII digits and dots, so it is valid UTF-8.
    text.push_str(std::str::from_utf8(&bytes[start..end]).unwrap_or(""));
    let value = text.parse::<f64>().unwrap_or(f64::NAN);
    (value, end)
}

/// True when `word` (a whole separated word) spells a non-finite number.
fn is_not_a_number_word(word: &str) -> bool {
    let w = word.trim_start_matches(['+', '-']).to_ascii_lowercase();
    matches!(w.as_str(), "nan" | "inf" | "infinity")
}

/// Splits one data line into tokens.
///
/// Grammar: see the module documentation (`line = *sep value ...`).
pub fn tokenize(line: &str, line_idx: usize) -> Result<Vec<Located>, JcampError> {
    let bytes = line.as_bytes();
    let mut tokens = Vec::with_capacity(bytes.len() / 3 + 1);
    let mut i = 0;
    while i < bytes.len() {
        let b = bytes[i];
        if is_sep(b) {
            i += 1;
            continue;
        }
        // Every byte before `i` was ASCII (anything else stops the tokenizer), so the byte
        // index is the column in characters.
        let column = i;
        let at = |kind| JcampError::at(line_idx, column, kind);
        if let Some(word) = not_a_number_word_at(line, i) {
            return Err(at(JcampErrorKind::NotANumber {
                found: word.to_owned(),
            }));
        }
        let (token, end) = match b {
            b'+' | b'-' | b'.' | b'0'..=b'9' => {
                let (value, end) = affn(line, i).map_err(at)?;
                (Token::Actual(value), end)
            }
            b'@' | b'A'..=b'I' | b'a'..=b'i' => {
                let (lead, negative) = pseudo_digit(b, b'@', b'A', b'a');
                let (value, end) = pseudo_number(bytes, i + 1, lead, negative);
                (Token::Actual(value), end)
            }
            b'%' | b'J'..=b'R' | b'j'..=b'r' => {
                let (lead, negative) = pseudo_digit(b, b'%', b'J', b'j');
                let (value, end) = pseudo_number(bytes, i + 1, lead, negative);
                (Token::Dif(value), end)
            }
            b'S'..=b'Z' | b's' => {
                let (count, end) = dup_count(bytes, i);
                (Token::Dup(count), end)
            }
            b'?' => {
                return Err(at(JcampErrorKind::NotANumber {
                    found: "?".to_owned(),
                }))
            }
            _ => {
                let found = line[i..].chars().next().unwrap_or('?');
                return Err(at(JcampErrorKind::UnexpectedCharacter { found }));
            }
        };
        tokens.push(Located { token, column });
        i = end;
    }
    Ok(tokens)
}

/// A whole-word not-a-number spelling (`NaN`, `-inf`) starting at byte `i`, caught
/// before its letters are taken for pseudo-digits.
fn not_a_number_word_at(line: &str, i: usize) -> Option<&str> {
    let bytes = line.as_bytes();
    let first_letter = match bytes[i] {
        b'+' | b'-' => bytes.get(i + 1).copied(),
        b => Some(b),
    };
    let starts_word = i == 0 || is_sep(bytes[i - 1]);
    if !matches!(first_letter, Some(b'n' | b'N' | b'i' | b'I')) || !starts_word {
        return None;
    }
    let end = bytes[i..]
        .iter()
        .position(|&c| is_sep(c))
        .map_or(bytes.len(), |p| i + p);
    line.get(i..end).filter(|word| is_not_a_number_word(word))
}

/// An AFFN value starting at byte `start`: its value and the byte after it.
///
/// Grammar: `affn = [ "+" | "-" ] ( digits [ "." *digit ] | "." digits ) [ "E" ( "+" | "-" ) digits ]`
fn affn(line: &str, start: usize) -> Result<(f64, usize), JcampErrorKind> {
    let bytes = line.as_bytes();
    let mut i = start;
    if bytes[i] == b'+' || bytes[i] == b'-' {
        i += 1;
    }
    let digits_start = i;
    while i < bytes.len() && (bytes[i].is_ascii_digit() || bytes[i] == b'.') {
        i += 1;
    }
    let mantissa = &line[digits_start..i];
    if mantissa.is_empty() || mantissa == "." || mantissa.matches('.').count() > 1 {
        let found = bytes.get(i).map_or(bytes[start] as char, |&c| c as char);
        return Err(if found == '?' {
            JcampErrorKind::NotANumber {
                found: "?".to_owned(),
            }
        } else {
            JcampErrorKind::UnexpectedCharacter { found }
        });
    }
    // Exponent: E followed by a sign and a digit.
    if bytes.get(i) == Some(&b'E')
        && matches!(bytes.get(i + 1), Some(b'+') | Some(b'-'))
        && bytes.get(i + 2).is_some_and(u8::is_ascii_digit)
    {
        i += 2;
        while i < bytes.len() && bytes[i].is_ascii_digit() {
            i += 1;
        }
    }
    let value = line[start..i].parse::<f64>().unwrap_or(f64::NAN);
    if !value.is_finite() {
        return Err(JcampErrorKind::NotANumber {
            found: line[start..i].to_owned(),
        });
    }
    Ok((value, i))
}

/// The leading digit and sign of a SQZ or DIF pseudo-digit `b`: `zero` is 0, `plus_one`
/// onwards +1..+9, `minus_one` onwards −1..−9.
fn pseudo_digit(b: u8, zero: u8, plus_one: u8, minus_one: u8) -> (u32, bool) {
    if b == zero {
        (0, false)
    } else if (plus_one..plus_one + 9).contains(&b) {
        (u32::from(b - plus_one) + 1, false)
    } else {
        (u32::from(b - minus_one) + 1, true)
    }
}

/// A DUP count starting at byte `i` (`S`..`Z` are 1..8, `s` is 9, digits follow): the
/// count and the byte after it.
fn dup_count(bytes: &[u8], i: usize) -> (u32, usize) {
    let b = bytes[i];
    let lead = if b == b's' {
        9
    } else {
        u32::from(b - b'S') + 1
    };
    let mut end = i + 1;
    let mut count: u64 = u64::from(lead);
    while end < bytes.len() && bytes[end].is_ascii_digit() {
        count = count
            .saturating_mul(10)
            .saturating_add(u64::from(bytes[end] - b'0'));
        end += 1;
    }
    (u32::try_from(count).unwrap_or(u32::MAX), end)
}

/// Largest number of ordinates one DUP count may add; a guard against a corrupt count
/// asking for billions of points.
pub const MAX_DUP: u32 = 1_000_000;

/// Largest number of ordinates a data record may expand to (a mid-IR spectrum has tens of
/// thousands); a guard against DUP counts that would exhaust memory.
pub const MAX_ORDINATES: usize = 10_000_000;

/// Expands ordinate tokens into values. `start` is the value the first DIF may refer to
/// (none at the start of a line). Returns the values and whether the last ordinate was
/// written in DIF form (which makes the next line start with a Y-check value).
///
/// Grammar: `ordinates = actual *( actual | dif | dup )`
pub fn expand_ordinates(
    tokens: &[Located],
    line_idx: usize,
    out: &mut Vec<f64>,
) -> Result<bool, JcampError> {
    // The previous token's effect: an actual value or a difference.
    let mut last: Option<Token> = None;
    let mut current: Option<f64> = None;
    let mut ends_in_dif = false;
    for located in tokens {
        match located.token {
            Token::Actual(v) => {
                out.push(v);
                current = Some(v);
                last = Some(Token::Actual(v));
                ends_in_dif = false;
            }
            Token::Dif(d) => {
                let Some(previous) = current else {
                    return Err(JcampError::at(
                        line_idx,
                        located.column,
                        JcampErrorKind::NoPrecedingOrdinate { what: "DIF value" },
                    ));
                };
                let v = previous + d;
                out.push(v);
                current = Some(v);
                last = Some(Token::Dif(d));
                ends_in_dif = true;
            }
            Token::Dup(n) => {
                if n == 0 {
                    return Err(JcampError::at(
                        line_idx,
                        located.column,
                        JcampErrorKind::ZeroDup,
                    ));
                }
                if n > MAX_DUP || out.len() + n as usize > MAX_ORDINATES {
                    return Err(JcampError::at(
                        line_idx,
                        located.column,
                        JcampErrorKind::OutOfRange {
                            what: format!(
                                "DUP count {n}; expected at most {MAX_DUP} and at most {MAX_ORDINATES} ordinates in all"
                            ),
                        },
                    ));
                }
                let (Some(previous), Some(last_token)) = (current, last) else {
                    return Err(JcampError::at(
                        line_idx,
                        located.column,
                        JcampErrorKind::NoPrecedingOrdinate { what: "DUP count" },
                    ));
                };
                let mut v = previous;
                for _ in 1..n {
                    if let Token::Dif(d) = last_token {
                        v += d;
                    }
                    out.push(v);
                }
                current = Some(v);
                // A DUP after a DUP repeats nothing new; keep the value form.
                last = Some(match last_token {
                    Token::Dif(d) => Token::Dif(d),
                    _ => Token::Actual(v),
                });
            }
        }
    }
    Ok(ends_in_dif)
}

/// Decodes a run of ordinates written in any ASDF form (no abscissa), as in the examples
/// of the standard. Used by tests and by tools that hold a bare ordinate string.
pub fn decode_ordinates(text: &str) -> Result<Vec<f64>, JcampError> {
    let tokens = tokenize(text, 0)?;
    let mut out = Vec::new();
    expand_ordinates(&tokens, 0, &mut out)?;
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exponent_needs_a_sign_otherwise_e_is_the_sqz_digit_five() {
        assert_eq!(decode_ordinates("1E+02").unwrap(), vec![100.0]);
        assert_eq!(decode_ordinates("1E2").unwrap(), vec![1.0, 52.0]);
    }

    #[test]
    fn a_dif_at_the_start_names_its_column() {
        let err = decode_ordinates("  J5").unwrap_err();
        assert_eq!(err.column, Some(2));
        assert!(matches!(
            err.kind,
            JcampErrorKind::NoPrecedingOrdinate { .. }
        ));
    }

    #[test]
    fn question_marks_and_nan_words_are_not_numbers() {
        for bad in ["1 ? 3", "1 NaN 3", "1,inf", "1 -nan"] {
            let err = decode_ordinates(bad).unwrap_err();
            assert!(
                matches!(err.kind, JcampErrorKind::NotANumber { .. }),
                "{bad}: {err:?}"
            );
        }
    }

    #[test]
    fn dup_repeats_a_difference_not_just_a_value() {
        assert_eq!(
            decode_ordinates("10JU").unwrap(),
            vec![10.0, 11.0, 12.0, 13.0]
        );
        assert_eq!(decode_ordinates("10U").unwrap(), vec![10.0, 10.0, 10.0]);
    }
}
